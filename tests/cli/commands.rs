//! `check` and `density` on the example models.

use super::{examples, mixwell, text};

#[test]
fn check_lists_every_example() {
    for path in examples() {
        let path = path.to_string_lossy();
        let out = mixwell(&["check", &path], b"");
        assert_eq!(out.status.code(), Some(0), "{path}: {}", text(&out.stderr));
        assert!(text(&out.stdout).contains("well formed"), "{}", text(&out.stdout));
        let out = mixwell(&["check", &path, "--json"], b"");
        let json: serde_json::Value = serde_json::from_slice(&out.stdout).expect("valid JSON");
        assert!(!json["parameters"].as_array().expect("a parameter list").is_empty());
    }
}

/// `mixwell density` on every example against the same models written independently with
/// scipy.stats (tests/cli/reference/example_densities.py), to 1e-10 relative.
#[test]
fn density_of_every_example_agrees_with_scipy() {
    let fixture: serde_json::Value =
        serde_json::from_str(include_str!("reference/example_densities.json")).expect("fixture");
    let cases = fixture["cases"].as_array().expect("cases");
    let covered: Vec<&str> = cases.iter().map(|c| c["example"].as_str().expect("name")).collect();
    for path in examples() {
        let file = path.file_name().expect("a file").to_string_lossy().into_owned();
        assert!(covered.contains(&file.as_str()), "{file} has no scipy reference value");
    }
    for case in cases {
        let path = format!("{}/../examples/{}", env!("CARGO_MANIFEST_DIR"), case["example"].as_str().expect("name"));
        let mut args = vec!["density".to_string(), path.clone(), "--json".to_string()];
        for (name, values) in case["at"].as_object().expect("point") {
            let list: Vec<String> = values.as_array().expect("values").iter().map(|v| v.to_string()).collect();
            args.extend(["--at".to_string(), format!("{name}={}", list.join(","))]);
        }
        let args: Vec<&str> = args.iter().map(String::as_str).collect();
        let out = mixwell(&args, b"");
        assert_eq!(out.status.code(), Some(0), "{path}: {}", text(&out.stderr));
        let got: serde_json::Value = serde_json::from_slice(&out.stdout).expect("JSON output");
        for key in ["log_density", "log_density_unconstrained"] {
            let (ours, scipy) = (got[key].as_f64().expect("a number"), case[key].as_f64().expect("a number"));
            let relative = (ours - scipy).abs() / scipy.abs();
            assert!(
                relative < 1e-10,
                "{path} {key}: mixwell {ours}, scipy {scipy}, relative difference {relative:.1e}"
            );
        }
    }
}

#[test]
fn density_refuses_bad_points() {
    let bakery = format!("{}/../examples/bakery.mw", env!("CARGO_MANIFEST_DIR"));
    for (at, fragment) in [
        (&["mu=215", "sigma=-1"][..], "outside its support"),
        (&["mu=215"], "no value given for sigma"),
        (&["mu=215", "sigma=2", "mu=1"], "more than once"),
        (&["mu=abc", "sigma=2"], "`abc` is not a number"),
        (&["mu=1,2", "sigma=2"], "2 value(s) given"),
        (&["mx=1", "sigma=2"], "did you mean `mu`?"),
        (&["mu", "sigma=2"], "expected NAME=VALUE"),
    ] {
        let mut args = vec!["density", bakery.as_str()];
        for a in at {
            args.extend(["--at", a]);
        }
        let out = mixwell(&args, b"");
        assert_eq!(out.status.code(), Some(2), "{at:?}");
        assert!(text(&out.stderr).contains(fragment), "{at:?}: {}", text(&out.stderr));
    }
}

/// A link carries a whole run: opening it twice gives identical reports, and they equal the run
/// made from the model file with the same options.
#[test]
fn the_same_link_gives_the_same_report() {
    let bakery = format!("{}/../examples/bakery.mw", env!("CARGO_MANIFEST_DIR"));
    let options = ["--seed", "99", "--trials", "8", "--window", "30", "--draws", "300", "--freeze", "mixture"];
    let mut args = vec!["link", bakery.as_str()];
    args.extend(options);
    let link = text(&mixwell(&args, b"").stdout).trim().to_string();
    assert!(link.starts_with("http://127.0.0.1:8000/#run=mw1."), "{link}");
    let first = mixwell(&["run", "--link", &link, "--json", "-", "--quiet"], b"");
    let second = mixwell(&["run", "--link", &link, "--json", "-", "--quiet"], b"");
    assert_eq!(first.status.code(), Some(0), "{}", text(&first.stderr));
    assert_eq!(first.stdout, second.stdout);
    let mut args = vec!["run", bakery.as_str(), "--json", "-", "--quiet"];
    args.extend(options);
    assert_eq!(mixwell(&args, b"").stdout, first.stdout);
}
