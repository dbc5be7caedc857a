//! `mixwell diagnose`: malformed files refused with their place, the diagnostics of known chains
//! read back from CSV, the same summary as `mixwell run` gives for its own draws, reading in
//! several passes, and a closed pipe.

use super::{examples, mixwell, text};
use mixwell::rng::Stream;
use std::path::{Path, PathBuf};
use std::process::{Command, Output, Stdio};

/// A fresh folder for one test's files.
fn folder(name: &str) -> PathBuf {
    let dir = Path::new(env!("CARGO_TARGET_TMPDIR")).join("diagnose").join(name);
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).expect("a folder for the test's files");
    dir
}

/// `mixwell diagnose ARGS` run in `dir`, so that files are named as given.
fn diagnose(dir: &Path, args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_mixwell"))
        .arg("diagnose")
        .args(args)
        .current_dir(dir)
        .stdin(Stdio::null())
        .output()
        .expect("mixwell runs")
}

/// The JSON report of `mixwell diagnose --json - ARGS`.
fn report(dir: &Path, args: &[&str]) -> serde_json::Value {
    let mut all = vec!["--json", "-"];
    all.extend(args);
    let out = diagnose(dir, &all);
    assert_eq!(out.status.code(), Some(0), "{args:?}: {}", text(&out.stderr));
    serde_json::from_slice(&out.stdout).expect("a JSON report")
}

/// Chains as CSV with a chain and an iteration column, as `mixwell run --csv` writes them.
fn chain_column_csv(name: &str, chains: &[Vec<f64>]) -> String {
    let mut out = format!("chain,iteration,{name}\n");
    for (c, chain) in chains.iter().enumerate() {
        for (i, x) in chain.iter().enumerate() {
            out += &format!("{},{},{x}\n", c + 1, i + 1);
        }
    }
    out
}

/// `chains` stationary AR(1) chains x_t = ρx_{t−1} + sqrt(1 − ρ²)ε_t of `len` draws (x_0 ~ N(0, 1)).
fn ar1(seed: u64, chains: usize, len: usize, rho: f64) -> Vec<Vec<f64>> {
    let innovation = (1.0 - rho * rho).sqrt();
    (0..chains)
        .map(|m| {
            let mut rng = Stream::new(seed, m as u64);
            let mut x = rng.normal();
            (0..len)
                .map(|t| {
                    if t > 0 {
                        x = rho * x + innovation * rng.normal();
                    }
                    x
                })
                .collect()
        })
        .collect()
}

/// (what, files and their bytes, options, the start of the error: `FILE:LINE:COLUMN: error: …`).
type Case = (&'static str, &'static [(&'static str, &'static [u8])], &'static [&'static str], &'static str);

const CASES: &[Case] = &[
    ("an empty file", &[("e.csv", b"")], &[], "e.csv:1:1: error: the file is empty"),
    (
        "a header only",
        &[("h.csv", b"chain,iteration,mu\n")],
        &[],
        "h.csv:2:1: error: the file names its columns but holds no draws",
    ),
    (
        "a header only, CRLF",
        &[("h.csv", b"mu,sigma\r\n")],
        &[],
        "h.csv:2:1: error: the file names its columns but holds no draws",
    ),
    (
        "no header: numbers",
        &[("n.csv", b"1.5,2\n3,4\n")],
        &[],
        "n.csv:1:1: error: the first line holds numbers, not column names",
    ),
    (
        "a repeated name",
        &[("d.csv", b"mu,sigma,mu\n1,2,3\n")],
        &[],
        "d.csv:1:10: error: the column name `mu` is used twice (first for column 1)",
    ),
    (
        "a repeated name after a BOM",
        &[("d.csv", b"\xef\xbb\xbfmu,mu\n1,2\n")],
        &[],
        "d.csv:1:4: error: the column name `mu` is used twice",
    ),
    ("an unnamed column", &[("u.csv", b"mu,,sigma\n1,2,3\n")], &[], "u.csv:1:4: error: column 2 has no name"),
    (
        "a trailing comma in the header",
        &[("u.csv", b"mu,sigma,\n1,2,\n")],
        &[],
        "u.csv:1:10: error: column 3 has no name",
    ),
    (
        "a name that is not UTF-8",
        &[("u.csv", b"m\xffu\n1\n")],
        &[],
        "u.csv:1:1: error: the name of column 1 is not UTF-8 text",
    ),
    ("only bookkeeping columns", &[("b.csv", b"chain,iteration\n1,1\n")], &[], "b.csv:1:1: error: no columns of draws"),
    (
        "a row too long",
        &[("r.csv", b"mu,sigma\n1,2\n3,4,5\n")],
        &[],
        "r.csv:3:5: error: this row has 3 cells, but the header names 2 columns",
    ),
    (
        "a row too short",
        &[("r.csv", b"mu,sigma\n1,2\n3\n")],
        &[],
        "r.csv:3:2: error: this row has 1 cell, but the header names 2 columns",
    ),
    ("a blank-looking row", &[("r.csv", b"mu,sigma\n1,2\n   \n")], &[], "r.csv:3:4: error: this row has 1 cell"),
    ("a word", &[("w.csv", b"mu\n1\nabc\n")], &[], "w.csv:3:1: error: `abc` is not a number (column `mu`)"),
    (
        "a missing value written NA",
        &[("w.csv", b"mu,sigma\n1,NA\n")],
        &[],
        "w.csv:2:3: error: `NA` is not a number (column `sigma`)",
    ),
    ("a decimal comma", &[("w.csv", b"mu\n\"1,5\"\n")], &[], "w.csv:2:1: error: `1,5` is not a number"),
    ("NaN", &[("f.csv", b"mu\n1\nNaN\n")], &[], "f.csv:3:1: error: `NaN` is not a finite number (column `mu`)"),
    ("minus infinity", &[("f.csv", b"mu\n-inf\n")], &[], "f.csv:2:1: error: `-inf` is not a finite number"),
    ("a number too large", &[("f.csv", b"mu\n1\n1e999\n")], &[], "f.csv:3:1: error: `1e999` is not a finite number"),
    ("an empty cell", &[("c.csv", b"mu,sigma\n1,\n")], &[], "c.csv:2:3: error: the cell of `sigma` is empty"),
    (
        "CRLF line ends",
        &[("l.csv", b"mu,sigma\r\n1,2\r\n3,oops\r\n")],
        &[],
        "l.csv:3:3: error: `oops` is not a number (column `sigma`)",
    ),
    (
        "quoted fields",
        &[("q.csv", b"\"a,b\",c\n\"1\",\"x\"\n")],
        &[],
        "q.csv:2:5: error: `x` is not a number (column `c`)",
    ),
    (
        "a line break inside a quoted name",
        &[("q.csv", b"\"m\n1\",c\n1,2\n3,q\n")],
        &[],
        "q.csv:4:3: error: `q` is not a number (column `c`)",
    ),
    ("an unclosed quote", &[("q.csv", b"mu,sigma\n1,\"2\n3,4\n")], &[], "q.csv:2:3: error: `2\\n3,4` is not a number"),
    (
        "chains of unequal length",
        &[("u.csv", b"chain,mu\n1,1\n1,2\n1,3\n2,1\n2,2\n")],
        &[],
        "u.csv:6:1: error: chain `2` of u.csv ends here after 2 draws, but chain `1` of u.csv has 3",
    ),
    (
        "files of unequal length",
        &[("a.csv", b"mu\n1\n2\n3\n"), ("b.csv", b"mu\n1\n2\n")],
        &[],
        "b.csv:3:1: error: the chain of b.csv ends here after 2 draws, but the chain of a.csv has 3",
    ),
    (
        "iterations out of order",
        &[("i.csv", b"chain,iteration,mu\n1,1,0\n1,2,0\n1,2,0\n")],
        &[],
        "i.csv:4:3: error: iteration 2 comes after iteration 2 (line 3) in chain `1` of i.csv",
    ),
    (
        "an iteration that is not whole",
        &[("i.csv", b"iteration,mu\n1.5,0\n")],
        &[],
        "i.csv:2:1: error: the iteration `1.5` is not a whole number",
    ),
    ("an empty chain label", &[("c.csv", b"chain,mu\n,1\n")], &[], "c.csv:2:1: error: the chain label is empty"),
    (
        "one chain in two files",
        &[("a.csv", b"chain,mu\n1,0\n"), ("b.csv", b"chain,mu\n1,0\n")],
        &[],
        "b.csv:2:1: error: chain `1` is in a.csv too (from line 2)",
    ),
    (
        "files laid out differently",
        &[("a.csv", b"chain,mu\n1,0\n"), ("b.csv", b"mu\n0\n")],
        &[],
        "b.csv:1:1: error: a.csv has a `chain` column but this file has not",
    ),
    (
        "a column missing from a later file",
        &[("a.csv", b"mu,sigma\n1,2\n"), ("b.csv", b"mu\n1\n")],
        &[],
        "b.csv:1:1: error: there is no column `sigma`, which a.csv has",
    ),
    (
        "a column only in a later file",
        &[("a.csv", b"mu,sigma\n1,2\n"), ("b.csv", b"mu,sigma,tau\n1,2,3\n")],
        &[],
        "b.csv:1:10: error: the column `tau` is not in a.csv",
    ),
    (
        "a chain column asked for but missing",
        &[("m.csv", b"mu\n1\n")],
        &["--layout", "chain-column"],
        "m.csv:1:1: error: there is no `chain` column",
    ),
    ("the same file twice", &[("a.csv", b"mu\n1\n"), ("a.csv", b"")], &[], "a.csv: error: the file is given twice"),
    ("a file that is not there", &[], &["missing.csv"], "missing.csv: error: cannot read the file: No such file"),
];

#[test]
fn every_malformed_file_is_refused_with_its_place_and_status_2() {
    let dir = folder("malformed");
    let mut problems = Vec::new();
    for (n, &(what, files, options, expected)) in CASES.iter().enumerate() {
        let case = dir.join(n.to_string());
        std::fs::create_dir_all(&case).expect("a folder");
        let mut args: Vec<&str> = Vec::new();
        for &(name, bytes) in files {
            std::fs::write(case.join(name), bytes).expect("the file is written");
            args.push(name);
        }
        args.extend(options);
        let out = diagnose(&case, &args);
        let stderr = text(&out.stderr);
        if out.status.code() != Some(2) || !stderr.starts_with(expected) || !out.stdout.is_empty() {
            problems
                .push(format!("{what}: expected status 2 and `{expected}…`, got {:?}: {stderr}", out.status.code()));
        }
    }
    assert!(problems.is_empty(), "{} problems:\n{}", problems.len(), problems.join("\n"));
    assert!(CASES.len() >= 20, "at least twenty malformed files ({})", CASES.len());
}

#[test]
fn bad_command_lines_are_refused() {
    let dir = folder("command_lines");
    std::fs::write(dir.join("ok.csv"), "mu\n1\n2\n3\n4\n").expect("written");
    let cases: &[(&[&str], &str)] = &[
        (&["-"], "diagnose reads each file more than once, so it needs files, not standard input"),
        (&["ok.csv", "--max-memory", "0"], "--max-memory must be a positive number of GiB, not 0"),
        (&["ok.csv", "--max-memory", "NaN"], "--max-memory must be a positive number of GiB, not NaN"),
        (&["ok.csv", "--max-memory", "1e-9"], "judging one quantity of 1 chains × 4 draws needs about"),
        (&["ok.csv", "--layout", "sideways"], "error: invalid value 'sideways'"),
        (&["."], ".: error: this is a folder, not a file of draws"),
        (&[], "error: the following required arguments were not provided"),
    ];
    for &(args, expected) in cases {
        let out = diagnose(&dir, args);
        assert_eq!(out.status.code(), Some(2), "{args:?}: {}", text(&out.stderr));
        assert!(text(&out.stderr).starts_with(expected), "{args:?}: {}", text(&out.stderr));
    }
    let out = diagnose(&dir, &["u.csv", "--truncate"]);
    assert_eq!(out.status.code(), Some(2));
}

/// Files that only look unusual — a byte-order mark, CRLF line ends, quoted cells and names,
/// spaces around cells, comment and blank lines — give the same report as the plain file.
#[test]
fn unusual_but_valid_files_read_like_plain_ones() {
    let dir = folder("unusual");
    let chains = ar1(3, 2, 50, 0.4);
    let plain = chain_column_csv("x", &chains);
    std::fs::write(dir.join("plain.csv"), &plain).expect("written");
    let mut unusual = String::from("\u{feff}# written by hand\r\n\"chain\" , iteration ,\"x\"\r\n\r\n");
    for line in plain.lines().skip(1) {
        let cells: Vec<&str> = line.split(',').collect();
        unusual += &format!("{}, {} ,\"{}\"\r\n", cells[0], cells[1], cells[2]);
    }
    std::fs::write(dir.join("unusual.csv"), unusual).expect("written");
    let a = report(&dir, &["plain.csv"]);
    let b = report(&dir, &["unusual.csv"]);
    assert_eq!(a["quantities"], b["quantities"]);
    assert_eq!(a["warnings"], b["warnings"]);
}

/// The ESS of the mean, (sd / MCSE of the mean)², of 4 AR(1) chains × 2500 draws against the
/// theory N(1 − ρ)/(1 + ρ) (Geyer 1992, §3), for ρ = 0, 0.5 and 0.9, read from CSV files both
/// with a chain column and as one file per chain. The bands were found by simulating 2000
/// replicates with the independent estimator of crate/tests/reference/diagnostics.py
/// (tests/cli/reference/ar1_mean_ess.py): every single run inside its 0.05%–99.95% band, and the
/// average of 20 runs within 4 standard errors of the simulated mean.
#[test]
fn ar1_chains_read_from_csv_give_the_ess_of_the_mean_that_theory_gives() {
    let fixture: serde_json::Value =
        serde_json::from_str(include_str!("reference/ar1_mean_ess.json")).expect("the bands");
    let (chains, len) = (4, 2500);
    assert_eq!((fixture["chains"].as_u64(), fixture["draws"].as_u64()), (Some(chains as u64), Some(len as u64)));
    let dir = folder("ar1");
    for band in fixture["bands"].as_array().expect("bands") {
        let rho = band["rho"].as_f64().expect("rho");
        let theory = (chains * len) as f64 * (1.0 - rho) / (1.0 + rho);
        let bounds = |key: &str| (band[key][0].as_f64().expect("low"), band[key][1].as_f64().expect("high"));
        let (single, average) = (bounds("single"), bounds("average_of_20"));
        let mut ratios = Vec::new();
        for seed in 0..20u64 {
            let draws = ar1(1000 + seed, chains, len, rho);
            let args: Vec<String> = if seed % 2 == 0 {
                std::fs::write(dir.join("chains.csv"), chain_column_csv("x", &draws)).expect("written");
                vec!["chains.csv".into()]
            } else {
                (0..chains)
                    .map(|c| {
                        let name = format!("chain_{c}.csv");
                        let body: String = draws[c].iter().map(|x| format!("{x}\n")).collect();
                        std::fs::write(dir.join(&name), format!("x\n{body}")).expect("written");
                        name
                    })
                    .collect()
            };
            let args: Vec<&str> = args.iter().map(String::as_str).collect();
            let json = report(&dir, &args);
            let x = &json["quantities"][0];
            let ess = (x["sd"].as_f64().expect("sd") / x["mcse_mean"].as_f64().expect("MCSE")).powi(2);
            let ratio = ess / theory;
            assert!(
                (single.0..=single.1).contains(&ratio),
                "ρ = {rho}, seed {seed}: ESS of the mean {ess:.0} is {ratio:.3} × theory {theory:.0}, outside {single:?}"
            );
            ratios.push(ratio);
        }
        let mean = ratios.iter().sum::<f64>() / ratios.len() as f64;
        assert!((average.0..=average.1).contains(&mean), "ρ = {rho}: 20-run average {mean:.4} outside {average:?}");
    }
}

/// Four chains, one shifted by one standard deviation: REFERENCES.md §3.5 (derived limit 1.1007,
/// simulated band for 1000 draws per chain [1.075, 1.13]) — flagged, with the threshold and its
/// source. Unshifted, R-hat stays below 1.005 (§3.4, never exceeded in 4000 simulations).
#[test]
fn chains_shifted_apart_are_flagged_by_rhat() {
    let dir = folder("shifted");
    for seed in 0..5u64 {
        let mut chains = ar1(500 + seed, 4, 1000, 0.0);
        std::fs::write(dir.join("together.csv"), chain_column_csv("theta", &chains)).expect("written");
        let together = report(&dir, &["together.csv"]);
        let rhat = together["quantities"][0]["rhat"].as_f64().expect("R-hat");
        assert!(rhat < 1.005, "seed {seed}: unshifted R-hat {rhat}");
        for x in &mut chains[3] {
            *x += 1.0;
        }
        std::fs::write(dir.join("apart.csv"), chain_column_csv("theta", &chains)).expect("written");
        let apart = report(&dir, &["apart.csv"]);
        let rhat = apart["quantities"][0]["rhat"].as_f64().expect("R-hat");
        assert!((1.075..=1.13).contains(&rhat), "seed {seed}: shifted R-hat {rhat}");
        let warnings: Vec<&str> =
            apart["warnings"].as_array().expect("warnings").iter().filter_map(|w| w.as_str()).collect();
        assert!(
            warnings.iter().any(|w| w.starts_with("theta: R-hat is") && w.contains("above 1.01 (Vehtari et al. 2021)")),
            "seed {seed}: {warnings:?}"
        );
    }
}

/// A single chain is judged (split R-hat compares its halves) and the report says so.
#[test]
fn a_single_chain_is_judged_and_said() {
    let dir = folder("single");
    let chain = ar1(9, 1, 400, 0.3);
    std::fs::write(dir.join("one.csv"), chain_column_csv("x", &chain)).expect("written");
    let json = report(&dir, &["one.csv"]);
    assert_eq!(json["chains"], 1);
    assert!(json["quantities"][0]["rhat"].as_f64().is_some_and(f64::is_finite));
    assert!(
        json["warnings"][0].as_str().expect("a warning").starts_with("there is only one chain (chain `1` of one.csv)")
    );
}

/// Chains cut to the shortest, when asked, are summarised over their first draws, and said to be.
#[test]
fn truncated_chains_use_their_first_draws() {
    let dir = folder("truncate");
    let mut chains = ar1(4, 3, 300, 0.2);
    chains[1].truncate(250);
    std::fs::write(dir.join("uneven.csv"), chain_column_csv("x", &chains)).expect("written");
    let out = diagnose(&dir, &["uneven.csv"]);
    assert!(text(&out.stderr).ends_with("the first 250 of each (--truncate)\n"), "{}", text(&out.stderr));
    let cut = report(&dir, &["uneven.csv", "--truncate"]);
    let even: Vec<Vec<f64>> = chains.iter().map(|c| c[..250].to_vec()).collect();
    std::fs::write(dir.join("even.csv"), chain_column_csv("x", &even)).expect("written");
    let expected = report(&dir, &["even.csv"]);
    assert_eq!(cut["quantities"], expected["quantities"]);
    assert_eq!(cut["draws"], 250);
    assert_eq!(cut["chain_sources"][0]["draws"], 300);
    assert!(cut["warnings"][0].as_str().expect("a warning").contains("truncated to its first 250"));
}

/// The quantities' rows of a summary table: from the line after the column heads to the first
/// blank line, without the `derived` heading.
fn table_rows(table: &str) -> Vec<&str> {
    table
        .lines()
        .skip_while(|l| !l.contains("bulk-ESS"))
        .skip(1)
        .take_while(|l| !l.is_empty())
        .filter(|l| *l != "derived")
        .collect()
}

/// `mixwell diagnose` on the draws `mixwell run --csv` wrote gives the run's own summary: the
/// same quantities in the JSON, to the bit, the same warnings about them, and the same rows in
/// the table — for every example, as one file and as one file per chain.
#[test]
fn diagnose_reproduces_the_summary_of_run() {
    let dir = folder("run");
    for model in examples() {
        let name = model.file_stem().expect("a name").to_string_lossy().into_owned();
        let model = model.to_string_lossy().into_owned();
        let csv = dir.join(format!("{name}.csv"));
        let csv = csv.to_string_lossy();
        let run_args = ["run", &model, "--seed", "11", "--chains", "3", "--draws", "200", "--warmup", "100"];
        let quick = ["--trials", "6", "--window", "30", "--quiet"];
        let mut args = run_args.to_vec();
        args.extend(quick);
        args.extend(["--json", "-", "--csv", &csv]);
        let out = mixwell(&args, b"");
        assert_eq!(out.status.code(), Some(0), "{name}: {}", text(&out.stderr));
        let run: serde_json::Value = serde_json::from_slice(&out.stdout).expect("JSON");
        let mut args = run_args.to_vec();
        args.extend(quick);
        let run_table = text(&mixwell(&args, b"").stdout);

        let judged = report(&dir, &[&format!("{name}.csv")]);
        let mut quantities = run["parameters"].as_array().expect("parameters").clone();
        quantities.extend(run["derived"].as_array().expect("derived").iter().cloned());
        assert_eq!(judged["quantities"].as_array().expect("quantities"), &quantities, "{name}");
        let about_quantities: Vec<&serde_json::Value> = run["warnings"]
            .as_array()
            .expect("warnings")
            .iter()
            .filter(|w| !w.as_str().unwrap_or("").starts_with("chain "))
            .collect();
        let judged_warnings: Vec<&serde_json::Value> =
            judged["warnings"].as_array().expect("warnings").iter().collect();
        assert_eq!(judged_warnings, about_quantities, "{name}");
        let table = text(&diagnose(&dir, &[&format!("{name}.csv")]).stdout);
        assert_eq!(table_rows(&table), table_rows(&run_table), "{name}:\n{table}\n{run_table}");
        assert!(!table_rows(&table).is_empty());
    }
}

/// A budget that holds one quantity at a time makes several passes over the file; the report is
/// the same to the byte as when everything is read at once.
#[test]
fn a_tiny_memory_budget_reads_in_passes_with_the_same_report() {
    let dir = folder("passes");
    let (chains, len, quantities) = (3, 400, 7);
    let mut csv = String::from("chain,iteration");
    for q in 0..quantities {
        csv += &format!(",q{q}");
    }
    csv.push('\n');
    let columns: Vec<Vec<Vec<f64>>> = (0..quantities).map(|q| ar1(70 + q as u64, chains, len, 0.3)).collect();
    for c in 0..chains {
        for i in 0..len {
            csv += &format!("{},{}", c + 1, i + 1);
            for column in &columns {
                csv += &format!(",{}", column[c][i]);
            }
            csv.push('\n');
        }
    }
    std::fs::write(dir.join("wide.csv"), csv).expect("written");
    let whole = diagnose(&dir, &["wide.csv", "--json", "-"]);
    assert_eq!(whole.status.code(), Some(0), "{}", text(&whole.stderr));
    // One quantity is 8 × 3 × 400 bytes; its diagnostics need 12 copies more (WORKING_COPIES):
    // a budget of 14.5 copies reads two quantities per pass, four passes in all.
    let copy = (8 * chains * len) as f64 / (1u64 << 30) as f64;
    for copies in [14.5, 13.5] {
        let budget = format!("{}", copy * copies);
        let parts = diagnose(&dir, &["wide.csv", "--json", "-", "--max-memory", &budget]);
        assert_eq!(parts.status.code(), Some(0), "{}", text(&parts.stderr));
        assert_eq!(parts.stdout, whole.stdout, "{copies} copies");
    }
    let budget = format!("{}", copy * 12.5);
    let out = diagnose(&dir, &["wide.csv", "--max-memory", &budget]);
    assert_eq!(out.status.code(), Some(2));
    assert!(
        text(&out.stderr).starts_with("judging one quantity of 3 chains × 400 draws needs about"),
        "{}",
        text(&out.stderr)
    );
}

/// Writing to a pipe whose reader has gone (`… --json - | head -1`) ends quietly with success:
/// no panic, no backtrace, nothing on standard error.
#[test]
fn a_closed_pipe_ends_quietly() {
    let dir = folder("pipe");
    std::fs::write(dir.join("draws.csv"), chain_column_csv("x", &ar1(5, 2, 3000, 0.5))).expect("written");
    let model = examples()[0].to_string_lossy().into_owned();
    let run = ["run", &model, "--seed", "2", "--draws", "2000", "--tune", "none", "--quiet"];
    let cases: Vec<Vec<&str>> = vec![
        [&run[..], &["--json", "-"]].concat(),
        run.to_vec(),
        [&run[..], &["--json", "/dev/null", "--csv", "/dev/stdout"]].concat(),
        vec!["diagnose", "draws.csv", "--json", "-"],
        vec!["diagnose", "draws.csv"],
        vec!["diagnose", "draws.csv", "--json", "/dev/stdout"],
    ];
    for args in cases {
        let mut child = Command::new(env!("CARGO_BIN_EXE_mixwell"))
            .args(&args)
            .current_dir(&dir)
            .stdin(Stdio::null())
            .stdout(Stdio::piped())
            .stderr(Stdio::piped())
            .spawn()
            .expect("mixwell starts");
        // The reader goes away before anything is written.
        drop(child.stdout.take());
        let out = child.wait_with_output().expect("mixwell ends");
        assert_eq!(out.status.code(), Some(0), "{args:?}: {}", text(&out.stderr));
        assert!(out.stderr.is_empty(), "{args:?}: {}", text(&out.stderr));
    }
}

/// A gigabyte of draws (4 chains × 280,000 draws × 50 quantities, 1.03 GiB of text) read
/// within a quarter of a GiB: several passes, peak resident memory measured by `/usr/bin/time -v`
/// and held under the budget plus 64 MiB for the program itself. Slow (about a minute and a GB
/// of disk), so not run in CI: `cargo test --release --test cli -- --ignored gigabyte --nocapture`.
#[test]
#[ignore = "slow: writes and reads a 1 GB file; run by hand (DEVELOPERS.md)"]
fn a_gigabyte_of_draws_is_judged_in_bounded_memory() {
    use std::io::Write;
    let dir = folder("gigabyte");
    let (chains, len, quantities) = (4usize, 280_000usize, 50usize);
    let path = dir.join("big.csv");
    {
        let mut out = std::io::BufWriter::new(std::fs::File::create(&path).expect("created"));
        write!(out, "chain,iteration").expect("written");
        for q in 0..quantities {
            write!(out, ",theta{q}").expect("written");
        }
        writeln!(out).expect("written");
        for c in 0..chains {
            let mut streams: Vec<Stream> = (0..quantities).map(|q| Stream::new(c as u64, q as u64)).collect();
            let mut x = vec![0.0; quantities];
            for i in 0..len {
                write!(out, "{},{}", c + 1, i + 1).expect("written");
                for (q, stream) in streams.iter_mut().enumerate() {
                    x[q] = 0.5 * x[q] + 0.75f64.sqrt() * stream.normal();
                    write!(out, ",{}", x[q]).expect("written");
                }
                writeln!(out).expect("written");
            }
        }
    }
    let size = std::fs::metadata(&path).expect("written").len();
    assert!(size >= 1 << 30, "the file has {size} bytes, less than a GiB");
    let budget_gib = 0.25;
    let started = std::time::Instant::now();
    let out = Command::new("/usr/bin/time")
        .args(["-v", env!("CARGO_BIN_EXE_mixwell"), "diagnose", "big.csv", "--json", "report.json", "--quiet"])
        .arg("--max-memory")
        .arg(budget_gib.to_string())
        .current_dir(&dir)
        .output()
        .expect("/usr/bin/time runs (Debian package `time`)");
    let seconds = started.elapsed().as_secs_f64();
    let stderr = text(&out.stderr);
    assert_eq!(out.status.code(), Some(0), "{stderr}");
    let peak_kib: f64 = stderr
        .lines()
        .find_map(|l| l.trim().strip_prefix("Maximum resident set size (kbytes): "))
        .and_then(|v| v.trim().parse().ok())
        .expect("time -v reports the peak resident set");
    let peak_mib = peak_kib / 1024.0;
    println!(
        "{size} bytes, {chains} chains × {len} draws × {quantities} quantities: {seconds:.1} s, peak RSS {peak_mib:.0} MiB"
    );
    assert!(peak_mib < budget_gib * 1024.0 + 64.0, "peak RSS {peak_mib:.0} MiB over the {budget_gib} GiB budget");
    let json: serde_json::Value =
        serde_json::from_slice(&std::fs::read(dir.join("report.json")).expect("the report")).expect("JSON");
    assert_eq!(json["quantities"].as_array().map(Vec::len), Some(quantities));
    assert_eq!(json["draws"], len);
    let _ = std::fs::remove_file(&path);
}
