//! One run plan behind every way of asking for a run: the flags, a link made from them, and a
//! link made by the earlier version all give the same runs, comparisons included; and a link
//! cannot ask for a run beyond the memory limit.

use super::{mixwell, text};

fn bakery() -> String {
    concat!(env!("CARGO_MANIFEST_DIR"), "/../examples/bakery.mw").to_string()
}

/// `mixwell ARGS`, which must succeed; its standard output.
fn ok(args: &[&str]) -> String {
    let out = mixwell(args, b"");
    assert_eq!(out.status.code(), Some(0), "mixwell {args:?}: {}", text(&out.stderr));
    text(&out.stdout)
}

#[test]
fn the_same_flags_make_the_same_links_as_the_earlier_version() {
    let fixture: serde_json::Value = serde_json::from_str(
        &std::fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/../tests/golden/earlier_links.json"))
            .expect("tests/golden/earlier_links.json"),
    )
    .expect("JSON");
    let bakery = bakery();
    for entry in fixture["links"].as_array().expect("a list") {
        let flags: Vec<&str> = entry["flags"].as_str().expect("flags").split(' ').collect();
        let mut args = vec!["link", bakery.as_str(), "--page", "http://x/"];
        args.extend(&flags);
        assert_eq!(ok(&args).trim(), entry["link"].as_str().expect("a link"), "mixwell link {flags:?}");
    }
}

/// A comparison's reports without the wall-clock column, which differs between runs.
fn without_speed(json: &str) -> serde_json::Value {
    let mut report: serde_json::Value = serde_json::from_str(json).expect("a JSON report");
    for row in report["comparison"].as_array_mut().expect("a comparison") {
        row.as_object_mut().expect("a row").remove("min_bulk_ess_per_second");
    }
    report
}

/// The comparison `mixwell run` makes from `flags`, and the one it makes from their link.
fn compared(flags: &[&str]) -> (serde_json::Value, serde_json::Value) {
    let bakery = bakery();
    let mut run = vec!["run", bakery.as_str(), "--compare", "--json", "-", "--quiet"];
    run.extend(flags);
    let mut link = vec!["link", bakery.as_str()];
    link.extend(flags);
    let link = ok(&link).trim().to_string();
    (without_speed(&ok(&run)), without_speed(&ok(&["run", "--link", &link, "--compare", "--json", "-", "--quiet"])))
}

const SMALL: &[&str] =
    &["--trials", "6", "--window", "30", "--draws", "200", "--warmup", "50", "--pilot", "40", "--seed", "8"];

#[test]
fn a_link_compares_the_methods_as_its_flags_do() {
    let (direct, linked) = compared(SMALL);
    assert_eq!(linked, direct);
    let methods: Vec<&str> =
        direct["comparison"].as_array().expect("rows").iter().map(|r| r["method"].as_str().unwrap_or("")).collect();
    assert_eq!(methods, ["none", "bo", "rm", "am"]);
    // Every method was given the budget of the flags: 4 chains × 6 trials × 30 steps.
    for row in &direct["comparison"].as_array().expect("rows")[1..] {
        assert_eq!(row["tuning_evaluations"], 720, "{row}");
    }
    // A link of an adaptation run carries its steps (180), not the trials × window that made
    // them: Bayesian optimisation gets the same budget, split as 2 trials × 90 steps.
    let (direct, linked) = compared(&[&["--tune", "rm"], SMALL].concat());
    for (a, b) in
        direct["comparison"].as_array().expect("rows").iter().zip(linked["comparison"].as_array().expect("rows"))
    {
        assert_eq!(a["tuning_evaluations"], b["tuning_evaluations"], "{a}\n{b}");
        if a["method"] != "bo" {
            assert_eq!(a, b);
        }
    }
}

#[test]
fn a_link_cannot_ask_for_a_run_beyond_the_memory_limit() {
    let wide = std::env::temp_dir().join(format!("mixwell-wide-{}.mw", std::process::id()));
    std::fs::write(&wide, "x : real[2000]\ndensity = normal(x; 0, 1)\n").expect("written");
    let link = ok(&["link", &wide.to_string_lossy(), "--window", "100000", "--seed", "1"]).trim().to_string();
    let _ = std::fs::remove_file(&wide);
    let out = mixwell(&["run", "--link", &link, "--quiet"], b"");
    let stderr = text(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{stderr}");
    assert!(stderr.starts_with("this run would need about 6.2 GiB"), "{stderr}");
    assert!(
        stderr.contains("the trial windows alone would take 6.0 GiB") && stderr.contains("lower --window"),
        "{stderr}"
    );
}
