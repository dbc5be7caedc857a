//! Malformed models: each must be refused with exit status 2 and an error in the GNU
//! `FILE:LINE:COL: error: message` form (GNU Coding Standards, "Formatting Error Messages"),
//! the offending line, and a caret — never a panic.

use super::{mixwell, text};

/// (model text, line, column, a fragment of the message).
pub const CASES: &[(&str, usize, usize, &str)] = &[
    ("", 1, 1, "the model has no density"),
    ("mu : real\n", 2, 1, "the model has no density"),
    ("density = normal(1; 0, 1)\n", 1, 11, "does not depend on any parameter"),
    ("mu : rael\ndensity = normal(mu; 0, 1)", 1, 6, "unknown support `rael`"),
    ("mu : real\ndensity = normal(mu; 0, 1) *\n", 3, 1, "unexpected end of text"),
    ("mu : real\ndensity = normal(mu; 0, 1\n", 3, 1, "unexpected end of text"),
    ("mu : real\ndensity = normal(mu, 0, 1)", 2, 11, "needs its variable first"),
    ("mu : real\ndensity = normal(mu; 0)", 2, 11, "takes 2 parameters after `;`, not 1"),
    ("mu : real\ndensity = nromal(mu; 0, 1)", 2, 11, "unknown distribution `nromal`"),
    ("mu : real\ndensity = normal(mu; 0, sigma)", 2, 25, "unknown name `sigma`"),
    ("mu : real\nmu : positive\ndensity = normal(mu; 0, 1)", 2, 1, "`mu` is defined twice"),
    ("mu : real\ndensity = normal(mu; 0, 1)\ndensity = normal(mu; 0, 2)", 3, 1, "exactly one density"),
    ("mu : real\ndensity = normal(mu; 0, s)\ns = 2", 2, 25, "`s` is used before it is defined"),
    ("x = [1, 2, 3]\nmu : real\ndensity = normal(x[4]; mu, 1)", 3, 20, "index 4 is out of range"),
    ("x = [1, 2, 3]\nmu : real\ndensity = normal(x[0]; mu, 1)", 3, 20, "index 0 is out of range"),
    ("x = [1, 2, 3]\nmu : real\ndensity = normal(x[1.5]; mu, 1)", 3, 20, "index 1.5 is out of range"),
    (
        "x = [1, 2]\ny = [1, 2, 3]\nmu : real\ndensity = normal(x + y; mu, 1)",
        4,
        18,
        "a list of 2 and the right side is a list of 3",
    ),
    ("mu : real[0]\ndensity = normal(mu; 0, 1)", 1, 11, "the length of a vector parameter is 0"),
    ("mu : real[2.5]\ndensity = normal(mu; 0, 1)", 1, 11, "the length of a vector parameter is 2.5"),
    ("mu : between(1, 0)\ndensity = normal(mu; 0, 1)", 1, 14, "is not below the upper bound"),
    ("mu : between(0)\ndensity = normal(mu; 0, 1)", 1, 15, "unexpected `)`"),
    ("mu : above(nu)\ndensity = normal(mu; 0, 1)", 1, 12, "unknown name `nu`"),
    ("mu : real\ndensity = poisson(mu; 3)", 2, 19, "needs data as its variable"),
    ("k = [1, 2.5]\nr : positive\ndensity = poisson(k; r)", 3, 19, "the value 2.5 (element 2) is outside the support"),
    (
        "y = [1, -2]\nr : positive\ndensity = exponential(y; r)",
        3,
        23,
        "the value -2 (element 2) is outside the support",
    ),
    ("y = [0, 1, 2]\np : unit\ndensity = bernoulli(y; p)", 3, 21, "the value 2 (element 3)"),
    ("x = 1e999", 1, 5, "too large for a 64-bit float"),
    ("mu : real\ndensity = normal(mu; 0, 1) $", 2, 28, "the character `$`"),
    ("mu : real\ndensity = normal(mu; 0, 1))", 2, 27, "unexpected `)`"),
    ("mu real\n", 1, 4, "unexpected `real`"),
    ("= 3", 1, 1, "unexpected `=`"),
    ("mu : real\ndensity = -normal(mu; 0, 1)", 2, 11, "a density factor must be positive"),
    ("mu : real\ndensity = 0 * normal(mu; 0, 1)", 2, 11, "a density factor must be positive"),
    ("mu : real\ndensity = normal(mu; 0, 1)^[1, 2]", 2, 28, "the power of a density factor is a list of 2"),
    ("normal : real\ndensity = normal(normal; 0, 1) * exp", 2, 34, "`exp` is a function or distribution, not a value"),
    ("mu : real\ndensity = normal(mu; 0, 1) * mu(2)", 2, 30, "`mu` is a parameter, not a function"),
    ("density : real", 1, 1, "`density` is the name of the model's density"),
    ("m = [[1, 2], [3]]", 1, 14, "this element is a list of 1 but the first is a list of 2"),
    ("m = [[[1]]]", 1, 6, "lists nest at most two deep"),
    ("v = []", 1, 5, "an empty list"),
    ("mu : real\ndensity = normal(mu; 0, 1) * foo(mu)", 2, 30, "unknown function `foo`"),
    ("mu : real\ndensity = normal(mu; 0, 1) * exp(mu; 1)", 2, 30, "unknown distribution `exp`"),
    ("mu : real\ndensity = normal(mu; 0, 1) * sum(mu, mu)", 2, 30, "`sum` takes 1 argument, not 2"),
    (
        "b : real[2]\nM = [[1, 2, 3]]\ndensity = normal(matvec(M, b); 0, 1)",
        3,
        18,
        "`matvec` needs a matrix with as many columns",
    ),
    ("b : real[2]\ndensity = normal(dot(b, [1, 2, 3]); 0, 1)", 2, 18, "`dot` needs two lists of one length"),
    ("mu : real\ndensity = normal(mu; 0, 1) * mu[1]", 2, 30, "`mu` is a single number"),
    ("x = [1, 2]\nmu : real\ndensity = normal(x[1, 1]; mu, 1)", 3, 20, "`x` is a list of 2 but 2 indices are given"),
    ("x = [1, 2]\nmu : real\ni : real\ndensity = normal(x[i]; mu, 1)", 4, 20, "an index must be known before sampling"),
    ("b : real[2]\ndensity = mvnormal(b; 0, [[1, 2], [2, 1]])", 2, 26, "this covariance"),
    (
        "b : real[2]\ndensity = mvnormal(b; 0, [[1, 0, 0], [0, 1, 0], [0, 0, 1]])",
        2,
        26,
        "the covariance is a 3×3 matrix",
    ),
    (
        "x = [1, 2]\nmu : real\ndensity = normal(x; mu, [1, 2, 3])",
        3,
        25,
        "this list has 3 elements but an earlier one has 2",
    ),
    ("mu : real\ndensity = normal(mu; [[1]], 1)", 2, 22, "takes numbers or lists, not a matrix"),
    ("\u{0}\u{1}binary", 1, 1, "the character"),
    ("mu : real\ns = exp(mu)\ndensity = normal(mu; 0, 1) * poisson(s; 1)", 3, 38, "needs data as its variable"),
    ("x = log(-1)\n", 1, 5, "`x` has the value NaN"),
    ("x = 1 / 0\n", 1, 5, "`x` has the value inf"),
    ("mu : between(0, 1 / 0)\ndensity = normal(mu; 0, 1)", 1, 17, "the bound is inf"),
    ("mu : real\ndensity = normal(mu; 0, 1)\n x", 3, 3, "unexpected end of text"),
    ("mu : real\ndensity = normal(mu; 0, 1) * mu", 2, 1, ""),
    (
        "mu : real\ndensity = normal(mu; 0, 1)\nmu2 = mu ^ [1, 2] + [1, 2, 3]",
        3,
        7,
        "a list of 2 and the right side is a list of 3",
    ),
    // Ranges, slices, `for` forms, `report`, links, sequence functions, improper posteriors and
    // other languages' forms (each with the language's alternative in its hint).
    ("x : real\ny = 5:2\ndensity = normal(x; 0, 1)", 2, 5, "the range 5:2 runs backwards"),
    ("x : real\ny = 1:2.5\ndensity = normal(x; 0, 1)", 2, 7, "the end of a range is 2.5"),
    ("x : real\ny = 1:x\ndensity = normal(x; 0, 1)", 2, 7, "the end of a range must be known before sampling"),
    ("x : real\ny = 2:\ndensity = normal(x; 0, 1)", 2, 6, "a range with an open end only means something in `[…]`"),
    ("x : real\ny = 1:2:3\ndensity = normal(x; 0, 1)", 2, 8, "a range has two ends"),
    ("y = [1, 2, 3]\nx : real\ndensity = normal(y[2:5]; x, 1)", 3, 20, "index 4 is out of range"),
    ("y = [1, 2, 3]\nx : real\ndensity = normal(y[2:]; x, 1) * normal(y[0:]; x, 1)", 3, 42, "index 0 is out of range"),
    (
        "y = [1, 2, 3]\nx : real\ndensity = prod(normal(y[i]; x, 1) for i in 3)",
        3,
        44,
        "a `for` runs over a list, and this is a single number",
    ),
    (
        "y = [1, 2, 3]\nx : real\ndensity = prod(normal(y[x]; x, 1) for x in 1:3)",
        3,
        39,
        "`x` is already defined on line 2",
    ),
    (
        "y = [1, 2, 3]\nx : real\ndensity = sum(normal(y[i]; x, 1) for i in 1:3, 2)",
        3,
        46,
        "a `for` must be the only argument",
    ),
    (
        "y = [1, 2, 3]\nx : real\ndensity = normal(x; 0, 1) * cumsum(i for i in 1:3)",
        3,
        29,
        "`cumsum` does not take a `for` directly",
    ),
    (
        "y = [1, 2, 3]\nx : real\nz = [y[1:i] for i in 1:3]\ndensity = normal(x; 0, 1)",
        3,
        6,
        "the terms differ in shape: the first is a list of 1, term 2",
    ),
    (
        "x : real\ndensity = normal(x; 0, 1) * sum(normal(x; i, 1) for i in 1:0)",
        2,
        29,
        "this `for` has no terms: its list is empty",
    ),
    ("x : real\ndensity = normal(x; 0, 1) * (x for i in 1:2)", 2, 30, "a `for` needs brackets or a function around it"),
    (
        "x : real\nreport c = 3\ndensity = normal(x; 0, 1)",
        2,
        8,
        "`c` does not depend on any parameter: it is data, not a",
    ),
    ("report x : real\ndensity = normal(x; 0, 1)", 1, 10, "parameters are always reported"),
    (
        "y = [1, 2]\nw : unit\na : real\ndensity = normal(a; 0, 1) * (w * normal(y; a, 1) + (1 - w) * normal(y; 0, 1))",
        4,
        30,
        "this sum of factors has two readings: `normal(y; a, 1)` is",
    ),
    (
        "y = [1, 0]\na : real\ndensity = normal(a; 0, 1) * bernoulli_logit(y; a)",
        3,
        29,
        "unknown distribution `bernoulli_logit`",
    ),
    ("x : real\ndensity = normal(x; 0, 1) * logistic(x, 2)", 2, 29, "`logistic` takes 1 argument, not 2"),
    ("x : real\ny : real\ndensity = normal(x; 0, 1)", 2, 1, "`y` appears in no factor of the density, so nothing"),
    ("x : real\ndensity = exp(0 * x)", 1, 1, "nothing constrains `x` as it grows: the density is the same"),
    (
        "y = [1, 2]\nx : real\nd = diff(y, 3)\ndensity = normal(x; 0, 1)",
        3,
        5,
        "a lag of 3 is longer than the list of 2",
    ),
    (
        "M = [[1, 2], [3, 4]]\nx : real\nc = cumsum(M)\ndensity = normal(x; 0, 1)",
        3,
        12,
        "`cumsum` takes a list, not a 2×2 matrix",
    ),
    ("x : real\nm = mean(1:0)\ndensity = normal(x; 0, 1)", 2, 10, "`mean` of an empty list"),
    ("x : real\nfor i in 1:3 {\n  x ~ normal(0, 1)\n}", 2, 1, "loops are not statements in a model"),
    ("x : real\nif x > 0\ndensity = normal(x; 0, 1)", 2, 1, "the language has no `if`"),
    ("f(x) = x ^ 2\nx : real\ndensity = normal(x; 0, 1)", 1, 1, "functions cannot be defined in a model"),
    ("x : real\nx ~ normal(0, 1)", 2, 3, "unexpected the character `~`, which is not part of the language"),
    (
        "x : real\ndensity = normal(x; 0, 1) * (x > 0)",
        2,
        32,
        "unexpected the character `>`, which is not part of the language",
    ),
    ("x : real\ndensity = { normal(x; 0, 1) }", 2, 11, "unexpected `{`"),
    (
        "x <- 3\nm : real\ndensity = normal(m; x, 1)",
        1,
        3,
        "unexpected the character `<`, which is not part of the language",
    ),
    ("x : real\nx2 = x ** 2\ndensity = normal(x; 0, 1)", 2, 9, "unexpected `*`"),
    (
        "x : real\ndensity = normal(x; 0, 1) * sum(sum(i * j for j in 1:2) for i in 1:2 for k in 1:2)",
        2,
        70,
        "one `for` at a time",
    ),
];

#[test]
fn every_malformed_model_gets_a_positioned_error_and_status_2() {
    let mut problems = Vec::new();
    let mut checked = 0;
    for &(source, line, column, fragment) in CASES {
        if fragment.is_empty() {
            continue; // a well-formed control case, checked below
        }
        for command in [&["check", "-"][..], &["density", "-", "--at", "mu=0"][..]] {
            let out = mixwell(command, source.as_bytes());
            let stderr = text(&out.stderr);
            let head = format!("<stdin>:{line}:{column}: error: ");
            let well_formed = out.status.code() == Some(2)
                && stderr.starts_with(&head)
                && stderr.lines().next().is_some_and(|l| l.contains(fragment))
                && stderr.lines().nth(3).is_some_and(|l| l.contains('^'))
                && out.stdout.is_empty();
            if !well_formed {
                problems.push(format!(
                    "{source:?} ({command:?}): expected status 2 and `{head}…{fragment}`, got {:?}\n{stderr}",
                    out.status.code()
                ));
            }
        }
        checked += 1;
    }
    assert!(problems.is_empty(), "{} problems:\n{}", problems.len(), problems.join("\n"));
    assert!(checked >= 50, "at least fifty malformed models ({checked})");
}

/// Every independent error of a file is rendered, in order, each with its caret; `check --json`
/// lists them all on standard output.
#[test]
fn every_error_of_a_file_is_reported() {
    let source = "y = [1, 2, 3]\nmu : rael\nz = y[4]\ndensity = normal(y; mu, sigam) * nromal(z; 0, 1)\n";
    let out = mixwell(&["check", "-"], source.as_bytes());
    let stderr = text(&out.stderr);
    assert_eq!(out.status.code(), Some(2));
    let heads: Vec<&str> = stderr.lines().filter(|l| l.starts_with("<stdin>:")).collect();
    assert_eq!(
        heads,
        [
            "<stdin>:2:6: error: unknown support `rael`",
            "<stdin>:3:7: error: index 4 is out of range",
            "<stdin>:4:25: error: unknown name `sigam`",
            "<stdin>:4:34: error: unknown distribution `nromal`",
        ],
        "{stderr}"
    );
    assert_eq!(stderr.lines().filter(|l| l.trim_start().starts_with('|') && l.contains('^')).count(), 4);
    let out = mixwell(&["check", "-", "--json"], source.as_bytes());
    assert_eq!(out.status.code(), Some(2));
    let json: serde_json::Value = serde_json::from_slice(&out.stdout).expect("JSON on standard output");
    let errors = json["errors"].as_array().expect("a list of errors");
    assert_eq!(errors.len(), 4);
    assert_eq!(errors[2]["from"], serde_json::json!({ "line": 4, "column": 25 }));
    assert_eq!(errors[3]["help"], "did you mean `normal`?");
    assert_eq!(json["ok"], false);
}

/// A model that reads but has something probably not meant: a warning on standard error in the
/// same form, exit status 0, and the warning in `check --json`.
#[test]
fn warnings_are_positioned_and_do_not_fail() {
    let source = "mu : real\nextra = mu * 2\ndensity = normal(mu; 0, 1)\n";
    let out = mixwell(&["check", "-"], source.as_bytes());
    assert_eq!(out.status.code(), Some(0));
    let stderr = text(&out.stderr);
    assert!(stderr.starts_with("<stdin>:2:1: warning: `extra` is computed but neither the density"), "{stderr}");
    let out = mixwell(&["check", "-", "--json"], source.as_bytes());
    let json: serde_json::Value = serde_json::from_slice(&out.stdout).expect("JSON");
    assert_eq!(json["warnings"][0]["severity"], "warning");
    assert_eq!(json["warnings"][0]["from"], serde_json::json!({ "line": 2, "column": 1 }));
}

#[test]
fn control_case_is_well_formed() {
    let out = mixwell(&["check", "-"], b"mu : real\ndensity = normal(mu; 0, 1) * mu");
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
}

#[test]
fn deep_nesting_huge_text_and_binary_files_are_refused_cleanly() {
    let deep = format!("x = {}1{}", "(".repeat(5000), ")".repeat(5000));
    let out = mixwell(&["check", "-"], deep.as_bytes());
    assert_eq!(out.status.code(), Some(2));
    assert!(text(&out.stderr).contains("nested more than"), "{}", text(&out.stderr));

    let huge = "# padding\n".repeat(500_000);
    let out = mixwell(&["check", "-"], huge.as_bytes());
    assert_eq!(out.status.code(), Some(2));
    assert!(text(&out.stderr).contains("more than the limit"), "{}", text(&out.stderr));

    let out = mixwell(&["check", "-"], b"mu : real\n\xff\xfe density");
    assert_eq!(out.status.code(), Some(2));
    assert!(text(&out.stderr).starts_with("<stdin>:2:1: error: the file is not UTF-8 text"), "{}", text(&out.stderr));
}

#[test]
fn bad_command_lines_exit_with_status_2() {
    for args in [&["check"][..], &["sample", "x"], &["density", "-"], &["check", "/no/such/file.mw"]] {
        let out = mixwell(args, b"");
        assert_eq!(out.status.code(), Some(2), "{args:?}: {}", text(&out.stderr));
        assert!(!out.stderr.is_empty());
    }
}
