//! Golden runs: for each example, the first draws of each chain at a fixed seed are stored in
//! tests/golden/draws.json, and a run must reproduce them bit for bit — here natively, and in
//! the page by the browser tests with the same file. A change that alters draws must update the
//! fixture deliberately: run `MIXWELL_UPDATE_GOLDEN=1 cargo test --test cli golden` and say in
//! the commit message why the draws changed.

use super::{examples, mixwell, text};

/// The run every golden case uses: short, tuned, two chains.
pub const OPTIONS: &[&str] = &[
    "--seed", "2026", "--chains", "2", "--pilot", "20", "--trials", "6", "--window", "20", "--warmup", "20", "--draws",
    "5",
];

fn fixture_path() -> std::path::PathBuf {
    std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../tests/golden/draws.json")
}

/// The CSV of draws of `example` under [`OPTIONS`], and the link that carries the same run.
fn golden_run(example: &std::path::Path) -> (String, String) {
    let path = example.to_string_lossy();
    let mut args = vec!["link", path.as_ref()];
    args.extend(OPTIONS);
    let link = text(&mixwell(&args, b"").stdout).trim().to_string();
    let csv = std::env::temp_dir().join(format!(
        "mixwell-golden-{}-{}.csv",
        std::process::id(),
        example.display().to_string().len()
    ));
    let csv_arg = csv.to_string_lossy().into_owned();
    let out = mixwell(&["run", "--link", &link, "--csv", &csv_arg, "--quiet"], b"");
    assert_eq!(out.status.code(), Some(0), "{path}: {}", text(&out.stderr));
    let draws = std::fs::read_to_string(&csv).expect("the CSV was written");
    let _ = std::fs::remove_file(&csv);
    (draws, link)
}

#[test]
fn golden_runs_reproduce_bit_for_bit() {
    let mut runs = serde_json::Map::new();
    for example in examples() {
        let name = example.file_name().expect("a file").to_string_lossy().into_owned();
        let (csv, link) = golden_run(&example);
        runs.insert(name, serde_json::json!({ "link": link, "csv": csv }));
    }
    if std::env::var_os("MIXWELL_UPDATE_GOLDEN").is_some() {
        let fixture = serde_json::json!({
            "about": "First draws of every example under tests/cli/golden.rs OPTIONS; regenerate deliberately.",
            "options": OPTIONS,
            "runs": runs,
        });
        std::fs::write(fixture_path(), serde_json::to_string_pretty(&fixture).expect("JSON") + "\n").expect("written");
        return;
    }
    let stored: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(fixture_path()).expect("tests/golden/draws.json exists"))
            .expect("JSON");
    for (name, run) in &runs {
        let expected = stored["runs"][name]["csv"].as_str().unwrap_or_else(|| panic!("no golden draws for {name}"));
        let got = run["csv"].as_str().expect("text");
        // Exact text: every value is written in Rust's shortest round-trip form, so equal text
        // means equal bits.
        assert_eq!(got, expected, "{name}: the draws changed; if deliberate, regenerate the fixture (see this file)");
        assert_eq!(run["link"], stored["runs"][name]["link"], "{name}: the link changed");
    }
}
