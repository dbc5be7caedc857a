//! The bad-input matrix: hostile or mistaken input across the command line, share links and
//! numeric edge cases, each with its exact expected outcome — refused with a message that names
//! the problem (and where, for model text), or a run that completes with a warning that explains
//! it. Never a panic, a hang, or silent nonsense. Together with the malformed models of
//! `malformed.rs` it holds well over a hundred inputs; DEVELOPERS.md describes it.

use super::{mixwell, text};

/// What must happen.
enum Expect {
    /// Exit status 2, nothing on standard output, and standard error starting with `starts` and
    /// containing `contains`.
    Refused { starts: &'static str, contains: &'static str },
    /// Exit status 0 and a warning in the report containing this.
    Warns(&'static str),
}
use Expect::*;

/// A quick run: small budgets so the matrix stays fast.
const QUICK: &[&str] =
    &["--draws", "100", "--warmup", "50", "--trials", "4", "--window", "20", "--pilot", "20", "--seed", "1", "--quiet"];

const NORMAL: &str = "mu : real\ndensity = normal(mu; 0, 1)\n";
/// A model with 2,000 coordinates, for runs whose memory grows with the dimension.
const WIDE: &str = "x : real[2000]\ndensity = normal(x; 0, 1)\n";

/// (what, arguments after `run` or the command, model on standard input, expectation).
const CASES: &[(&str, &[&str], &str, Expect)] = &[
    // --- command-line arguments of `run` ---
    (
        "no chains",
        &["run", "-", "--chains", "0"],
        NORMAL,
        Refused { starts: "--chains: the number of chains must be from 1 to 64", contains: "not 0" },
    ),
    (
        "too many chains",
        &["run", "-", "--chains", "65"],
        NORMAL,
        Refused { starts: "--chains: the number of chains", contains: "not 65" },
    ),
    (
        "too few draws",
        &["run", "-", "--draws", "3"],
        NORMAL,
        Refused { starts: "--draws: the number of draws per chain must be from 4", contains: "not 3" },
    ),
    (
        "a billion draws",
        &["run", "-", "--draws", "1000000000"],
        NORMAL,
        Refused { starts: "--draws: the number of draws per chain", contains: "10000000" },
    ),
    (
        "draws beyond memory",
        &["run", "-", "--draws", "9000000", "--chains", "64", "--tune", "none"],
        NORMAL,
        Refused { starts: "this run would need about", contains: "raise --max-memory" },
    ),
    // --- memory: refused before anything is allocated, naming the part and the option ---
    (
        "trial windows beyond memory",
        &["run", "-", "--window", "100000"],
        WIDE,
        Refused { starts: "this run would need about", contains: "the trial windows alone would take 6.0 GiB" },
    ),
    (
        "trial windows beyond memory: the remedy",
        &["run", "-", "--window", "100000"],
        WIDE,
        Refused { starts: "this run would need about", contains: "lower --window, or raise --max-memory" },
    ),
    (
        "a surrogate of 10,000 trials",
        &["run", "-", "--trials", "10000"],
        NORMAL,
        Refused { starts: "this run would need about", contains: "the surrogate alone would take 4.5 GiB" },
    ),
    (
        "wide draws beyond memory",
        &["run", "-", "--tune", "none", "--draws", "1000000"],
        WIDE,
        Refused { starts: "this run would need about", contains: "lower --draws" },
    ),
    (
        "adaptive Metropolis of 2,000 coordinates on 64 chains",
        &["run", "-", "--tune", "am", "--chains", "64"],
        WIDE,
        Refused { starts: "this run would need about", contains: "the adaptation alone would take" },
    ),
    (
        "a million pilot sweeps of 2,000 coordinates within a small limit",
        &["run", "-", "--pilot", "1000000", "--max-memory", "0.1"],
        WIDE,
        Refused { starts: "this run would need about 0.", contains: "more than --max-memory 0.1" },
    ),
    (
        "a comparison keeps the chosen run's draws",
        &["run", "-", "--draws", "5000000", "--chains", "16", "--compare"],
        NORMAL,
        Refused { starts: "this run would need about", contains: "lower --draws" },
    ),
    (
        "non-numeric draws",
        &["run", "-", "--draws", "many"],
        NORMAL,
        Refused { starts: "error: invalid value 'many'", contains: "--draws" },
    ),
    (
        "zero scale",
        &["run", "-", "--scale", "0"],
        NORMAL,
        Refused { starts: "--scale: the random-walk scale must be a positive number", contains: "not 0" },
    ),
    (
        "negative scale",
        &["run", "-", "--scale", "-1"],
        NORMAL,
        Refused { starts: "--scale: the random-walk scale must be a positive number", contains: "not -1" },
    ),
    (
        "NaN scale",
        &["run", "-", "--scale", "NaN"],
        NORMAL,
        Refused { starts: "--scale: the random-walk scale must be a positive number", contains: "NaN" },
    ),
    (
        "infinite scale",
        &["run", "-", "--scale", "inf"],
        NORMAL,
        Refused { starts: "--scale: the random-walk scale must be a positive number", contains: "inf" },
    ),
    (
        "blend above 1",
        &["run", "-", "--blend", "1.5"],
        NORMAL,
        Refused { starts: "--blend: the blend must be between 0 and 1", contains: "1.5" },
    ),
    (
        "zero width",
        &["run", "-", "--sampler", "slice", "--width", "0"],
        NORMAL,
        Refused { starts: "--width: the slice width must be a positive number", contains: "not 0" },
    ),
    (
        "zero step-out",
        &["run", "-", "--sampler", "slice", "--stepout", "0"],
        NORMAL,
        Refused { starts: "--stepout: the step-out limit must be a whole number from 1 to 10000", contains: "not 0" },
    ),
    (
        "huge step-out",
        &["run", "-", "--sampler", "slice", "--stepout", "20000"],
        NORMAL,
        Refused { starts: "--stepout: the step-out limit", contains: "not 20000" },
    ),
    (
        "width for a random walk",
        &["run", "-", "--width", "2"],
        NORMAL,
        Refused { starts: "--width: a setting of the slice sampler, not of random-walk Metropolis", contains: "" },
    ),
    (
        "scale for a slice sampler",
        &["run", "-", "--sampler", "slice", "--scale", "2"],
        NORMAL,
        Refused { starts: "--scale: a setting of random-walk Metropolis, not of the slice sampler", contains: "" },
    ),
    (
        "Robbins–Monro for slice",
        &["run", "-", "--sampler", "slice", "--tune", "rm"],
        NORMAL,
        Refused { starts: "--tune: Robbins–Monro and adaptive Metropolis adapt a random walk", contains: "" },
    ),
    (
        "no trials",
        &["run", "-", "--trials", "0"],
        NORMAL,
        Refused { starts: "--trials: the number of tuning trials must be from 1", contains: "not 0" },
    ),
    (
        "tiny trial window",
        &["run", "-", "--window", "2"],
        NORMAL,
        Refused { starts: "--window: the steps per tuning trial must be from 4", contains: "not 2" },
    ),
    (
        "negative seed",
        &["run", "-", "--seed", "-1"],
        NORMAL,
        Refused { starts: "error: invalid value '-1'", contains: "--seed" },
    ),
    (
        "seed beyond 2^53",
        &["run", "-", "--seed", "9007199254740992"],
        NORMAL,
        Refused { starts: "--seed: the seed must be at most 2^53 − 1", contains: "9007199254740992" },
    ),
    (
        "zero memory limit",
        &["run", "-", "--max-memory", "0"],
        NORMAL,
        Refused { starts: "--max-memory must be a positive number of GiB", contains: "" },
    ),
    (
        "huge pilot",
        &["run", "-", "--pilot", "2000000"],
        NORMAL,
        Refused { starts: "--pilot: the number of pilot sweeps must be from 0 to 1000000", contains: "" },
    ),
    (
        "huge warm-up",
        &["run", "-", "--warmup", "200000000"],
        NORMAL,
        Refused { starts: "--warmup: the number of warm-up steps must be from 0", contains: "" },
    ),
    (
        "unknown flag",
        &["run", "-", "--fast"],
        NORMAL,
        Refused { starts: "error: unexpected argument '--fast'", contains: "" },
    ),
    (
        "unknown sampler",
        &["run", "-", "--sampler", "hmc"],
        NORMAL,
        Refused { starts: "error: invalid value 'hmc'", contains: "rwm" },
    ),
    (
        "unknown tuning method",
        &["run", "-", "--tune", "grid"],
        NORMAL,
        Refused { starts: "error: invalid value 'grid'", contains: "bo" },
    ),
    (
        "unknown subcommand",
        &["sample", "-"],
        NORMAL,
        Refused { starts: "error: unrecognized subcommand 'sample'", contains: "" },
    ),
    (
        "no model",
        &["run"],
        NORMAL,
        Refused { starts: "error: the following required arguments were not provided", contains: "MODEL" },
    ),
    (
        "missing file",
        &["run", "/no/such/model.mw"],
        "",
        Refused { starts: "cannot read `/no/such/model.mw`", contains: "No such file" },
    ),
    ("a directory as model", &["check", "/"], "", Refused { starts: "cannot read `/`", contains: "" }),
    (
        "unwritable JSON path",
        &[
            "run",
            "-",
            "--json",
            "/no/such/dir/report.json",
            "--draws",
            "10",
            "--warmup",
            "0",
            "--pilot",
            "10",
            "--tune",
            "none",
            "--quiet",
        ],
        NORMAL,
        Refused { starts: "cannot write `/no/such/dir/report.json`", contains: "" },
    ),
    (
        "unwritable CSV path",
        &[
            "run",
            "-",
            "--csv",
            "/no/such/dir/draws.csv",
            "--draws",
            "10",
            "--warmup",
            "0",
            "--pilot",
            "10",
            "--tune",
            "none",
            "--quiet",
        ],
        NORMAL,
        Refused { starts: "cannot write `/no/such/dir/draws.csv`", contains: "" },
    ),
    (
        "link with other run options",
        &["run", "--link", "http://x/#run=mw1.abc", "--seed", "3"],
        "",
        Refused { starts: "--link fixes the whole run", contains: "" },
    ),
    (
        "link and model both",
        &["run", "-", "--link", "http://x/#run=mw1.abc"],
        NORMAL,
        Refused { starts: "error: the argument '[MODEL]' cannot be used with '--link <URL>'", contains: "" },
    ),
    (
        "density without --at",
        &["density", "-"],
        NORMAL,
        Refused { starts: "error: the following required arguments were not provided", contains: "--at" },
    ),
    // --- share links ---
    (
        "link without a run",
        &["run", "--link", "http://127.0.0.1:8000/#view=plots"],
        "",
        Refused { starts: "this link does not carry a mixwell run", contains: "run=" },
    ),
    (
        "link from another version",
        &["run", "--link", "http://x/#run=mw7.AAAA"],
        "",
        Refused { starts: "this link comes from another version of mixwell", contains: "" },
    ),
    (
        "link that is not base64",
        &["run", "--link", "http://x/#run=mw1.%%%%"],
        "",
        Refused { starts: "the link is damaged", contains: "cut short" },
    ),
    (
        "link that does not unpack",
        &["run", "--link", "http://x/#run=mw1.AAAAAAAAAAAA"],
        "",
        Refused { starts: "the link is damaged", contains: "unpack" },
    ),
    // --- numeric edge cases in models ---
    (
        "NaN in data",
        &["check", "-"],
        "y = [1, 0/0]\nmu : real\ndensity = normal(y; mu, 1)\n",
        Refused { starts: "<stdin>:1:5: error: `y` has the value NaN at element 2", contains: "" },
    ),
    (
        "infinity in data",
        &["check", "-"],
        "y = [1, -1/0]\nmu : real\ndensity = normal(y; mu, 1)\n",
        Refused { starts: "<stdin>:1:5: error: `y` has the value -inf at element 2", contains: "" },
    ),
    (
        "overflowing literal",
        &["check", "-"],
        "y = [1, 2e308]\n",
        Refused { starts: "<stdin>:1:9: error: the number `2e308` is too large", contains: "" },
    ),
    (
        "count data with a fraction",
        &["check", "-"],
        "k = [0, 1.5]\nr : positive\ndensity = poisson(k; r)\n",
        Refused {
            starts: "<stdin>:3:19: error: the value 1.5 (element 2) is outside the support of `poisson`",
            contains: "",
        },
    ),
    (
        "probability data outside (0, 1)",
        &["check", "-"],
        "p = [0.2, 1.2]\na : positive\ndensity = beta(p; a, a)\n",
        Refused {
            starts: "<stdin>:3:16: error: the value 1.2 (element 2) is outside the support of `beta`",
            contains: "",
        },
    ),
    (
        "uniform data outside its bounds",
        &["check", "-"],
        "u = [0.5, 3]\nm : real\ndensity = uniform(u; 0, 2) * normal(m; 0, 1)\n",
        Refused {
            starts: "<stdin>:3:19: error: the value 3 (element 2) is outside the support of `uniform`",
            contains: "",
        },
    ),
    (
        "singular covariance",
        &["check", "-"],
        "b : real[2]\ndensity = mvnormal(b; 0, [[1, 1], [1, 1]])\n",
        Refused { starts: "<stdin>:2:26: error: this covariance", contains: "positive definite" },
    ),
    (
        "density −∞ everywhere",
        &["run", "-", "--quiet"],
        "x : real\ndensity = normal(x; 0, -1)\n",
        Refused { starts: "chain 1: no starting point with a finite density in 100 tries", contains: "support" },
    ),
    (
        "density NaN everywhere",
        &["run", "-", "--quiet"],
        "x : real\ndensity = normal(x; 0, 1) * sqrt(-1 - x * x)\n",
        Refused { starts: "chain 1: no starting point with a finite density", contains: "" },
    ),
    (
        "improper flat posterior drifts",
        &["run", "-", "--tune", "none"],
        "x : real\ndensity = exp(0 * x)\n",
        Warns("an improper posterior"),
    ),
    (
        "zero-variance data",
        &["run", "-"],
        "y = [5, 5, 5]\nmu : real\nsigma : positive\ndensity = normal(y; mu, sigma)\n",
        Warns("R-hat is"),
    ),
    (
        "a chain that never moves",
        &["run", "-", "--tune", "none", "--scale", "1e9"],
        NORMAL,
        Warns("never moved while sampling"),
    ),
    (
        "a derived quantity that never moves",
        &["run", "-", "--tune", "none"],
        "mu : real\nc = mu * 0\ndensity = normal(mu; 0, 1)\n",
        Warns("c: "),
    ),
    (
        "scales far beyond the pilot's reach",
        &["run", "-", "--tune", "none"],
        "mu : real\ndensity = normal(mu; 1e300, 1e300)\n",
        Warns("R-hat is"),
    ),
];

#[test]
fn every_bad_input_meets_its_expected_outcome() {
    let mut problems = Vec::new();
    for (what, args, stdin, expect) in CASES {
        let mut all: Vec<&str> = args.to_vec();
        if matches!(expect, Warns(_)) {
            all.extend(QUICK);
            all.extend(["--json", "-"]);
        }
        let out = mixwell(&all, stdin.as_bytes());
        let (stdout, stderr) = (text(&out.stdout), text(&out.stderr));
        let ok = match expect {
            Refused { starts, contains } => {
                out.status.code() == Some(2)
                    && stdout.is_empty()
                    && stderr.starts_with(starts)
                    && stderr.contains(contains)
            }
            Warns(fragment) => {
                let report: Option<serde_json::Value> = serde_json::from_str(&stdout).ok();
                let warnings = report.as_ref().and_then(|r| r["warnings"].as_array().cloned()).unwrap_or_default();
                out.status.code() == Some(0)
                    && warnings.iter().any(|w| w.as_str().is_some_and(|w| w.contains(fragment)))
            }
        };
        if !ok {
            problems.push(format!(
                "{what}: status {:?}\nstderr: {stderr}\nstdout: {}",
                out.status.code(),
                &stdout[..stdout.len().min(400)]
            ));
        }
    }
    assert!(problems.is_empty(), "{} of {} cases failed:\n\n{}", problems.len(), CASES.len(), problems.join("\n\n"));
    assert!(CASES.len() + super::malformed::CASES.len() >= 100, "the matrix holds at least 100 inputs");
}
