//! Checker tests: what the language's forms mean (which nodes they become), every error with its
//! position, warnings, and the rules against improper posteriors.

use super::*;
use crate::lang::Severity;

fn model(src: &str) -> Model {
    check(src).unwrap_or_else(|d| panic!("{}", d.render("test", src)))
}

/// Every error: (line, column, message).
fn errors(src: &str) -> Vec<(usize, usize, String)> {
    match check(src) {
        Ok(_) => panic!("expected errors from\n{src}"),
        Err(d) => d
            .iter()
            .map(|e| {
                let p = e.position(src);
                (p.line, p.column, e.message.clone())
            })
            .collect(),
    }
}

fn first_error(src: &str) -> crate::lang::Diagnostic {
    check(src).err().unwrap_or_else(|| panic!("expected an error from\n{src}")).first().clone()
}

/// Every node of the density and of the intermediates it names.
fn nodes(m: &Model) -> Vec<&Node> {
    let mut out = Vec::new();
    let mut stack = vec![&m.log_density];
    stack.extend(m.derived.iter().map(|d| &d.node));
    while let Some(n) = stack.pop() {
        out.push(n);
        stack.extend(n.children());
    }
    out
}

fn has(m: &Model, pred: impl Fn(&NodeKind) -> bool) -> bool {
    nodes(m).iter().any(|n| pred(&n.kind))
}

#[test]
fn built_in_names_are_free_for_data_and_parameters() {
    let m = model(
        "mean = [1.5, 2.5]\nsum = 2\nbeta : real\ngamma : positive\nnormal : real\n\
         density = normal(beta; sum, 1) * gamma(gamma; 2, 1) * normal(mean; beta + normal, gamma) * normal(normal; 0, 1)\n",
    );
    let names: Vec<&str> = m.parameters.iter().map(|p| p.name.as_str()).collect();
    assert_eq!(names, ["beta", "gamma", "normal"]);
    assert_eq!(m.info().data.iter().map(|d| d.name.as_str()).collect::<Vec<_>>(), ["mean", "sum"]);
    // `density` alone stays the density's name.
    assert_eq!(errors("density : real\n")[0].2, "`density` is the name of the model's density");
}

#[test]
fn pi_is_pi_unless_the_model_names_something_pi() {
    let m = model("x : real\nc = 2 * pi\ndensity = normal(x; c, 1)\n");
    assert_eq!(m.constants.iter().find(|c| c.name.as_deref() == Some("c")).unwrap().values, [std::f64::consts::TAU]);
    let m = model("pi : unit\nx : real\ndensity = normal(x; 0, 1) * beta(pi; 2, 2)\n");
    assert_eq!(m.parameters[0].name, "pi");
    assert_eq!(errors("x : real\ndensity = normal(x; pi, 1)\npi = 3\n")[0].2, "`pi` is used before it is defined");
}

#[test]
fn logistic_is_a_function_without_a_semicolon_and_a_distribution_with_one() {
    let m = model("x : real\nreport p = logistic(x)\ndensity = logistic(x; 0, 1)\n");
    assert!(matches!(m.derived[0].node.kind, NodeKind::Map(UnaryFn::Logistic, _)));
    assert!(matches!(m.log_density.kind, NodeKind::LogDensity { family: Family::Logistic, .. }));
}

#[test]
fn links_written_as_on_paper_become_the_stable_families() {
    let family = |src: &str| {
        let m = model(src);
        nodes(&m).iter().find_map(|n| match &n.kind {
            NodeKind::LogDensity { family, .. } | NodeKind::LogDensityEach { family, .. } => Some(*family),
            _ => None,
        })
    };
    let head = "y = [0, 1, 1]\nn = [3, 4, 5]\nt = [2, 1, 0.5]\nb : real\n";
    assert_eq!(family(&format!("{head}density = bernoulli(y; logistic(b))\n")), Some(Family::BernoulliLogit));
    assert_eq!(family(&format!("{head}density = binomial(y; n, logistic(2 * b))\n")), Some(Family::BinomialLogit));
    assert_eq!(family(&format!("{head}density = poisson(y; exp(b))\n")), Some(Family::PoissonLog));
    assert_eq!(family(&format!("{head}density = poisson(y; t * exp(b))\n")), Some(Family::PoissonLog));
    assert_eq!(family(&format!("{head}density = poisson(y; exp(b) * t)\n")), Some(Family::PoissonLog));
    // Through a named intermediate, and per term of a `for`.
    assert_eq!(family(&format!("{head}p = logistic(b)\ndensity = bernoulli(y; p)\n")), Some(Family::BernoulliLogit));
    let each = format!("{head}density = prod(bernoulli(y[i]; logistic(b * i)) for i in 1:3)\n");
    assert_eq!(family(&each), Some(Family::BernoulliLogit));
    // Other forms stay as written.
    assert_eq!(family(&format!("{head}density = bernoulli(y; 1 / (1 + exp(-b)))\n")), Some(Family::Bernoulli));
    // The fused name is not part of the language.
    let d = first_error(&format!("{head}density = bernoulli_logit(y; b)\n"));
    assert_eq!(d.message, "unknown distribution `bernoulli_logit`");
    assert!(!d.help.unwrap_or_default().contains("bernoulli_logit"));
}

#[test]
fn reported_quantities_and_local_intermediates() {
    let src = "y = [1, 2]\nmu : real\neta = 2 * mu\nreport twice = eta\nunused = mu ^ 2\n\
               density = normal(y; eta, 1) * normal(mu; 0, 1)\n";
    let m = model(src);
    let info = m.info();
    assert_eq!(info.derived.iter().map(|d| d.name.as_str()).collect::<Vec<_>>(), ["twice"]);
    assert_eq!(m.warnings.len(), 1);
    let w = &m.warnings[0];
    assert_eq!((w.severity, w.position(src).line), (Severity::Warning, 5));
    assert!(w.message.contains("`unused` is computed but neither the density nor a reported quantity uses it"));
    // Data cannot be reported.
    assert!(errors("x : real\nreport c = 3\ndensity = normal(x; 0, 1)\n")[0].2.contains("it is data"));
}

#[test]
fn ranges_slices_and_sequence_functions() {
    let m = model(
        "y = [4, 5, 6, 7]\nx : real\nz = y[2:]\nw = y[:2]\ne = y[4:3]\nd = diff(y, 2)\nc = cumsum(y)\nk = 3:5\ndensity = normal(x; 0, 1)\n",
    );
    let value = |name: &str| m.constants.iter().find(|c| c.name.as_deref() == Some(name)).unwrap().values.clone();
    assert_eq!(value("z"), [5.0, 6.0, 7.0]);
    assert_eq!(value("w"), [4.0, 5.0]);
    assert!(value("e").is_empty());
    assert_eq!(value("d"), [2.0, 2.0]);
    assert_eq!(value("c"), [4.0, 9.0, 15.0, 22.0]);
    assert_eq!(value("k"), [3.0, 4.0, 5.0]);
    let m = model("M = [[1, 2], [3, 4], [5, 6]]\nx : real\nc = M[:, 2]\nr = M[2:, 1]\ndensity = normal(x; 0, 1)\n");
    let value = |name: &str| m.constants.iter().find(|c| c.name.as_deref() == Some(name)).unwrap().values.clone();
    assert_eq!(value("c"), [2.0, 4.0, 6.0]);
    assert_eq!(value("r"), [3.0, 5.0]);
    assert_eq!(errors("x : real\ny = 3:1\ndensity = normal(x; 0, 1)\n")[0].2, "the range 3:1 runs backwards");
    assert_eq!(errors("x : real\ny = 1:2.5\ndensity = normal(x; 0, 1)\n")[0].2, "the end of a range is 2.5");
    assert!(errors("x : real\ny = 2:\ndensity = normal(x; 0, 1)\n")[0].2.contains("only means something in `[…]`"));
    assert!(errors("x : real\ny = 1:x\ndensity = normal(x; 0, 1)\n")[0].2.contains("must be known before sampling"));
    assert!(
        errors("y = [1, 2]\nx : real\nz = y[2:3]\ndensity = normal(x; 0, 1)\n")[0]
            .2
            .contains("index 3 is out of range")
    );
    assert!(errors("x : real\nm = mean(1:0)\ndensity = normal(x; 0, 1)\n")[0].2.contains("of an empty list"));
}

#[test]
fn a_for_whose_terms_are_numbers_is_computed_all_at_once() {
    let m = model(
        "y = [1.5, -0.5, 2.0]\nw : unit\na : real\n\
         density = normal(a; 0, 3) * prod((1 - w) * normal(y[i]; a, 1) + w * normal(y[i]; -a, 2) for i in 1:3)\n",
    );
    assert!(has(&m, |k| matches!(k, NodeKind::LogDensityEach { .. })));
    assert!(!has(&m, |k| matches!(k, NodeKind::Fold(..))));
    assert!(has(&m, |k| matches!(k, NodeKind::Zip(BinaryFn::LogAddExp, ..))));
}

#[test]
fn a_for_whose_terms_are_lists_goes_term_by_term() {
    // Slices whose ends depend on the index (a change point), and a nested `for` using the outer index.
    let m = model(
        "y = [3, 1, 4, 1, 5]\na : positive\nb : positive\n\
         density = gamma(a; 2, 1) * gamma(b; 2, 1) * mean(poisson(y[1:c]; a) * poisson(y[c+1:5]; b) for c in 1:5)\n",
    );
    assert!(has(&m, |k| matches!(k, NodeKind::Fold(BinaryFn::LogAddExp, items) if items.len() == 5)));
    let m = model(
        "y = [0.1, 0.4, -0.2, 0.3, 0.5]\nphi : real[2]\ns : positive\n\
         density = normal(phi; 0, 1) * halfnormal(s; 1) * prod(normal(y[t]; sum(phi[k] * y[t - k] for k in 1:2), s) for t in 3:5)\n",
    );
    // The outer index stays all at once; the inner sum over k is two terms, each a column.
    assert!(has(&m, |k| matches!(k, NodeKind::Fold(BinaryFn::Add, items) if items.len() == 2)));
    assert!(has(&m, |k| matches!(k, NodeKind::LogDensityEach { .. })));
}

#[test]
fn for_forms_report_their_misuse() {
    let e = |src: &str| errors(src)[0].2.clone();
    let head = "y = [1, 2, 3]\nx : real\n";
    assert!(
        e(&format!("{head}density = normal(x; 0, 1) * prod(normal(y[i]; x, 1) for i in 1:4)\n"))
            .contains("index 4 is out of range")
    );
    assert!(
        e(&format!("{head}density = normal(x; 0, 1) * prod(normal(y[i]; x, 1) for x in 1:3)\n"))
            .contains("`x` is already defined on line 2")
    );
    assert!(
        e(&format!("{head}density = normal(x; 0, 1) * sum(sum(i for i in 1:2) for i in 1:2)\n"))
            .contains("already the index of an enclosing")
    );
    assert!(
        e(&format!("{head}density = normal(x; 0, 1) * prod(normal(y[i]; x, 1) for i in 3)\n"))
            .contains("runs over a list")
    );
    assert!(
        e(&format!("{head}density = normal(x; 0, 1) * cumsum(i for i in 1:3)\n"))
            .contains("does not take a `for` directly")
    );
    assert!(
        e(&format!("{head}z = [y[1:i] for i in 1:3]\ndensity = normal(x; 0, 1)\n"))
            .contains("the terms differ in shape")
    );
    assert!(
        e(&format!("{head}density = normal(x; 0, 1) * sum(normal(y[i]; x, 1) for i in 1:0)\n"))
            .contains("has no terms")
    );
    // An error in one term says which.
    let d = first_error(&format!("{head}z = sum(y[1:i + 1] for i in 1:3)\ndensity = normal(x; 0, 1)\n"));
    assert!(d.message.contains("index 4 is out of range"), "{}", d.message);
    assert_eq!(d.notes, ["in the term where `i` is 3"]);
}

#[test]
fn a_sum_of_list_products_is_refused_with_both_readings() {
    let src = "y = [-1.5, 2.2, 1.9]\nw : unit\na : real\nb : real\n\
               density = normal(a; 0, 5) * normal(b; 0, 5) * ((1 - w) * normal(y; a, 1) + w * normal(y; b, 1))\n";
    let d = first_error(src);
    assert_eq!(d.position(src).line, 5);
    assert!(d.message.contains("two readings"), "{}", d.message);
    assert_eq!(
        d.notes,
        [
            "a mixture for each element: `prod((1 - w) * normal(y[i]; a, 1) + w * normal(y[i]; b, 1) for i in 1:3)`",
            "a mixture of the whole products: `(1 - w) * prod(normal(y; a, 1)) + w * prod(normal(y; b, 1))`",
        ]
    );
    // Both rewritten forms are models.
    let head = "y = [-1.5, 2.2, 1.9]\nw : unit\na : real\nb : real\ndensity = normal(a; 0, 5) * normal(b; 0, 5) * ";
    for note in &d.notes {
        let form = note.split('`').nth(1).expect("a quoted form");
        model(&format!("{head}({form})\n"));
    }
    // A sum of single factors is a mixture as before.
    model("w : unit\nx : real\ndensity = w * normal(x; -2, 1) + (1 - w) * normal(x; 2, 1) - 0.01 * normal(x; 0, 1)\n");
}

#[test]
fn every_independent_error_is_reported_once() {
    let src = "y = [1, 2, 3]\nmu : rael\nsigma : positive\nz = y[4]\n\
               density = normal(y; mu, sigam) * nromal(mu; 0, 1) * normal(sigma; 0, z)\n";
    let found = errors(src);
    let messages: Vec<&str> = found.iter().map(|e| e.2.as_str()).collect();
    assert_eq!(
        messages,
        ["unknown support `rael`", "index 4 is out of range", "unknown name `sigam`", "unknown distribution `nromal`"],
        "{found:?}"
    );
    // Uses of the broken `mu` and `z` add nothing.
    assert_eq!(found.iter().map(|e| e.0).collect::<Vec<_>>(), [2, 4, 5, 5]);
}

#[test]
fn parameters_that_nothing_constrains_are_refused() {
    // Declared and unused, or only some elements used.
    let d = first_error("x : real\ny : positive\ndensity = normal(x; 0, 1)\n");
    assert!(d.message.starts_with("`y` appears in no factor"), "{}", d.message);
    assert_eq!(d.position("x : real\n").line, 2);
    let d = first_error("b : real[4]\ndensity = normal(b[1:2]; 0, 1)\n");
    assert!(d.message.starts_with("`b[3]`, `b[4]` appear in no factor"), "{}", d.message);
    // Only in a reported quantity.
    assert!(
        first_error("x : real\ny : real\nreport z = y\ndensity = normal(x; 0, 1)\n")
            .message
            .contains("`y` appears in no factor")
    );
    // Present, but the density does not change with it.
    let d = first_error("x : real\ndensity = exp(0 * x)\n");
    assert!(d.message.starts_with("nothing constrains `x` as it grows"), "{}", d.message);
    let d = first_error("x : real\ndensity = exp(-max(x, 0))\n");
    assert!(d.message.starts_with("nothing constrains `x` as it falls"), "{}", d.message);
    let d = first_error("s : positive\nm : real\ndensity = normal(m; 0, 1) * exp(-1 / s)\n");
    assert!(d.message.starts_with("nothing constrains `s` as it grows"), "{}", d.message);
    // A bounded parameter in no factor is uniform: a warning.
    let m = model("p : unit\nx : real\ndensity = normal(x; 0, 1)\n");
    assert_eq!(m.warnings.len(), 1);
    assert!(m.warnings[0].message.contains("uniform between 0 and 1"));
    // Proper: a prior; a likelihood that falls off; a flat end towards a finite bound.
    model("y = [1.2, 0.7]\nmu : real\ns : positive\ndensity = normal(y; mu, s)\n");
    model("s : positive\ndensity = exp(-s)\n");
    model("x : real\ndensity = exp(-x^2)\n");
    // Known limit: a ridge along a + b is not found (both directions alone do fall off).
    model("a : real\nb : real\ndensity = normal(1; a + b, 1)\n");
}
