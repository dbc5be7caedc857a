//! Hostile model text: every limit answers with a clear error that names it, and no input makes
//! parsing, checking or compiling panic, overflow the stack, or take time or memory out of
//! proportion to its length. Each test that says "used to" is a regression for a problem found
//! while hardening the pipeline; a finding of the fuzz targets in `crate/fuzz` joins them here,
//! inline or as a small file under `tests/hostile/`.
//!
//! The limits are the crate's own constants; each test builds a text just past one.

use mixwell::lang::Diagnostic;
use mixwell::lang::parser::{MAX_NESTING, MAX_SOURCE_BYTES};
use mixwell::model::{MAX_DATA, MAX_DIMENSION, MAX_LENGTH, MAX_RECORDED, MAX_TERMS, MAX_WORK, Model, check};
use mixwell::tape::Tape;

/// The (first) error `source` must give: its span inside the text, and rendering it must not panic.
fn error(source: &str) -> Diagnostic {
    let all = check(source).err().unwrap_or_else(|| panic!("expected an error from {} bytes of model", source.len()));
    for d in all.iter() {
        assert!(d.span.start <= d.span.end && d.span.end <= source.len(), "span {:?} of {}", d.span, source.len());
    }
    let d = all.first().clone();
    let rendered = d.render("hostile.mw", source);
    assert!(rendered.contains(&d.message));
    // The line under the message is cut around the caret however long the line of text is
    // (it used to be printed whole: megabytes for a long list of data).
    let shown = rendered.lines().nth(2).unwrap_or("");
    assert!(shown.chars().count() <= 200, "{} characters shown", shown.chars().count());
    d
}

fn assert_error(source: &str, wanted: &[&str]) -> Diagnostic {
    let d = error(source);
    for w in wanted {
        assert!(d.message.contains(w), "message {:?} should contain {w:?}", d.message);
    }
    d
}

/// A model that must check, compile and evaluate at the origin.
fn accepted(source: &str) -> (Model, Tape) {
    let model = check(source).unwrap_or_else(|d| panic!("{}", d.render("hostile.mw", source)));
    let tape = Tape::new(&model);
    let _ = tape.log_density(&vec![0.0; tape.dim()], &mut tape.scratch());
    (model, tape)
}

/// `[1, 1, …, 1]` with `n` elements.
fn ones(n: usize) -> String {
    format!("[{}]", vec!["1"; n].join(","))
}

const TAIL: &str = "m : real\ndensity = normal(m; 0, 1)\n";

#[test]
fn source_size_limit() {
    let mut source = format!("# {}\n", "x".repeat(MAX_SOURCE_BYTES));
    source.push_str(TAIL);
    let d = assert_error(&source, &["bytes", &MAX_SOURCE_BYTES.to_string()]);
    assert_eq!(d.span.start, MAX_SOURCE_BYTES);
}

#[test]
fn nesting_limit_for_brackets_and_prefixes() {
    for source in [
        format!("x = {}1{}\n{TAIL}", "(".repeat(MAX_NESTING + 1), ")".repeat(MAX_NESTING + 1)),
        format!("x = {}1\n{TAIL}", "-".repeat(100_000)),
        format!("x = {}1{}\n{TAIL}", "[".repeat(100_000), "]".repeat(100_000)),
        format!("x = {}1{}\n{TAIL}", "exp(".repeat(100_000), ")".repeat(100_000)),
    ] {
        assert_error(&source, &["nested more than", &MAX_NESTING.to_string()]);
    }
}

/// A chain `1 + 1 + … + 1` is built without recursion but is as deep as it is long: it used to
/// overflow the stack of the checker (and of the tree's destructor) instead of being refused.
#[test]
fn nesting_limit_for_operator_and_index_chains() {
    for op in ["+", "-", "*", "/"] {
        let source = format!("x = 1{}\n{TAIL}", format!(" {op} 1").repeat(1_000_000));
        let d = assert_error(&source, &["nested more than", &MAX_NESTING.to_string()]);
        assert!(d.help.is_some_and(|h| h.contains("sum(")));
    }
    let source = format!("v = [1]\nx = v{}\n{TAIL}", "[1]".repeat(1_000_000));
    assert_error(&source, &["nested more than"]);
    let source = format!("x = 2{}\n{TAIL}", "^2".repeat(1_000_000));
    assert_error(&source, &["nested more than"]);
    // A chain well inside the limit is still a model.
    accepted(&format!("x = 1{}\n{TAIL}", " + 1".repeat(MAX_NESTING / 2)));
}

#[test]
fn length_limit_for_literal_lists() {
    // A list of plain numbers used to skip the check that every other list gets.
    let source = format!("x = {}\n{TAIL}", ones(MAX_LENGTH + 1));
    assert_error(&source, &["more than", &MAX_LENGTH.to_string(), "elements"]);
    accepted(&format!("x = {}\n{TAIL}", ones(MAX_LENGTH)));
}

#[test]
fn length_limit_for_matrices_and_vector_parameters() {
    let source = format!("r = {}\nM = [r, r, r, r, r]\n{TAIL}", ones(MAX_LENGTH / 4));
    assert_error(&source, &["more than", &MAX_LENGTH.to_string(), "elements"]);
    let row = ones(MAX_LENGTH / 4);
    let source = format!("M = [{}]\n{TAIL}", [row.as_str(); 5].join(","));
    assert_error(&source, &["more than", &MAX_LENGTH.to_string(), "elements"]);
    let source = format!("b : real[{}]\n{TAIL}", MAX_LENGTH + 1);
    assert_error(&source, &["length of a vector parameter"]);
}

/// `M[i, i]` picks len(i)² elements; the count is refused before any list of them is made (the
/// list used to be made first: 8 TB for the second case).
#[test]
fn length_limit_for_index_results() {
    let source = format!("i = {}\nM = [[1]]\ny = M[i, i]\n{TAIL}", ones(2_000));
    assert_error(&source, &["4000000 elements", &format!("limit of {MAX_LENGTH}")]);
    // len(i)² overflows a 64-bit count only at 2³², but the check does not wait for that.
    let source = format!("i = {}\nM = [[1]]\ny = M[i, i]\n{TAIL}", ones(MAX_LENGTH));
    assert_error(&source, &["elements, more than the limit"]);
    // One index into a matrix picks whole rows: rows picked × row length.
    let source = format!("r = {}\nM = [r]\ni = {}\ny = M[i]\n{TAIL}", ones(4_096), ones(1_024));
    assert_error(&source, &["4194304 elements"]);
    accepted(&format!("i = {}\nM = [[1]]\ny = M[i, i]\n{TAIL}", ones(1_024)));
}

#[test]
fn dimension_limit() {
    let half = MAX_DIMENSION / 2 + 1;
    let source = format!("a : real[{half}]\nb : real[{half}]\ndensity = normal(a; 0, 1) * normal(b; 0, 1)\n");
    assert_error(&source, &["more than", &MAX_DIMENSION.to_string(), "parameter coordinates"]);
}

/// Data computed from data is held too: a list of 2²⁰ and eight copies pass 8·2²⁰ numbers.
#[test]
fn data_limit() {
    let copies = MAX_DATA / MAX_LENGTH;
    let mut source = format!("x = {}\n", ones(MAX_LENGTH));
    for k in 0..copies {
        source.push_str(&format!("y{k} = x\n"));
    }
    source.push_str(TAIL);
    let d = assert_error(&source, &["more than", &MAX_DATA.to_string(), "data limit"]);
    assert_eq!(d.position(&source).line, copies + 1, "the last copy is the one too many");
}

/// A covariance's factor is held as data, counted before the cubic-time factorisation; a named
/// covariance is factorised once however often it is used.
#[test]
fn data_limit_counts_covariance_factors() {
    let d = 512;
    // Seven lists of 2²⁰ and the covariance, then padding that leaves room for one factor and a
    // half (the few literal numbers elsewhere are far fewer than the half).
    let pad = MAX_DATA - 7 * MAX_LENGTH - d * d - 3 * d * d / 2;
    let mut source = format!("x = {}\npad = {}\nC = {}\n", ones(MAX_LENGTH), ones(pad), identity(d));
    for k in 0..6 {
        source.push_str(&format!("y{k} = x\n"));
    }
    source.push_str(&format!("z : real[{d}]\n"));
    let (model, _) = accepted(&format!("{source}density = mvnormal(z; 0, C) * mvnormal(z; 1, C)\n"));
    assert_eq!(model.mvnormals.len(), 1, "one factorisation for two uses");
    let second = format!("{source}density = mvnormal(z; 0, C) * mvnormal(z; 1, C * 2)\n");
    let d = assert_error(&second, &["more than", &MAX_DATA.to_string(), "data limit"]);
    assert_eq!(&second[d.span.start..d.span.end], "C * 2");
}

/// Naming a large list costs a copy each time the checker folds an expression that uses it.
#[test]
fn work_limit() {
    let uses = MAX_WORK / MAX_LENGTH + 1;
    let mut source = format!("x = {}\n", ones(MAX_LENGTH));
    for k in 0..uses {
        source.push_str(&format!("s{k} = sum(x)\n"));
    }
    source.push_str(TAIL);
    assert_error(&source, &["more than", &MAX_WORK.to_string(), "work limit"]);
}

#[test]
fn work_limit_counts_intermediate_results() {
    // Each term of a long sum is a fresh list of 2²⁰ elements in the compiled evaluator.
    let source = format!("x = {}\nb : real\ny = b{}\ndensity = normal(b; 0, 1)\n", ones(MAX_LENGTH), " + x".repeat(40));
    assert_error(&source, &["work limit"]);
}

#[test]
fn recorded_values_limit() {
    let source = format!("x = {}\nb : real\nreport big = x * b\ndensity = normal(b; 0, 1)\n", ones(MAX_RECORDED));
    assert_error(&source, &["more than", &MAX_RECORDED.to_string(), "`big` has"]);
    accepted(&format!("x = {}\nb : real\nreport big = x * b\ndensity = normal(b; 0, 1)\n", ones(MAX_RECORDED - 1)));
}

/// Suggestions for a misspelt name compare it with every name in the model; two long names used
/// to cost time and memory in proportion to the product of their lengths (here 10¹² cells).
#[test]
fn long_unknown_names_get_no_quadratic_suggestion() {
    let long = "a".repeat(1_000_000);
    let source = format!("{long}b = 1\nm : real\ndensity = normal(m; {long}c, 1)\n");
    let d = assert_error(&source, &["unknown name"]);
    assert!(d.help.is_none());
    // Short names still get their suggestion.
    let d = assert_error("sigma = 1\nm : real\ndensity = normal(m; 0, sigam)\n", &["unknown name"]);
    assert_eq!(d.help.as_deref(), Some("did you mean `sigma`?"));
}

/// `[[1, 0, …], [0, 1, …], …]`, the d×d identity.
fn identity(d: usize) -> String {
    let row = |i: usize| format!("[{}]", (0..d).map(|j| if i == j { "1" } else { "0" }).collect::<Vec<_>>().join(","));
    format!("[{}]", (0..d).map(row).collect::<Vec<_>>().join(","))
}

/// Folding one constant used to set up a table as long as all the model's constants and to copy
/// every covariance factor: quadratic in the number of statements (here about 10¹¹ steps).
#[test]
fn many_folded_constants_take_linear_time() {
    let (statements, d) = (100_000, 512);
    let mut source = format!("C = {}\nz : real[{d}]\ndensity = mvnormal(z; 0, C)\n", identity(d));
    for k in 0..statements {
        source.push_str(&format!("c{k} = -{k}\n"));
    }
    let started = std::time::Instant::now();
    let (model, _) = accepted(&source);
    assert_eq!(model.info().data.len(), statements + 1);
    // Linear work here takes well under a second even unoptimised; the quadratic form took
    // minutes. A generous bound, so a busy machine does not fail it.
    assert!(started.elapsed().as_secs() < 60, "took {:?}", started.elapsed());
}

/// Two finite bounds whose difference overflows used to be accepted, giving an infinite
/// log-Jacobian and NaN values.
#[test]
fn bounds_too_far_apart() {
    assert_error("a : between(-1e308, 1e308)\ndensity = normal(a; 0, 1)\n", &["too far apart"]);
}

/// A range is a list like any other: its length is counted before it is made.
#[test]
fn length_limit_for_ranges() {
    let source = format!("x = 1:{}\n{TAIL}", MAX_LENGTH + 1);
    assert_error(&source, &["has 1048577 elements", &format!("limit of {MAX_LENGTH}")]);
    let source = format!("x = 1:1e300\n{TAIL}");
    assert_error(&source, &["the end of a range is 1e300"]);
    accepted(&format!("x = 1:{MAX_LENGTH}\n{TAIL}"));
}

/// Terms checked one at a time (each a list) are capped in all, nested ones multiplying.
#[test]
fn term_limit_for_for_forms_checked_one_by_one() {
    let n = MAX_TERMS + 1;
    let source = format!("y = 1:{n}\ns = sum(y[i:i] for i in 1:{n})\n{TAIL}");
    let started = std::time::Instant::now();
    assert_error(&source, &["more than", &MAX_TERMS.to_string(), "terms"]);
    // Nested, the terms multiply: here the work of naming `y` in each term reaches its limit first.
    let nested = "y = 1:1000\ns = sum(sum(y[j:j] + i for j in 1:1000) for i in 1:1000)\n".to_string() + TAIL;
    assert_error(&nested, &["more than", "limit"]);
    let nested = "s = sum(sum([i, j][1:1] for j in 1:1000) for i in 1:1000)\n".to_string() + TAIL;
    assert_error(&nested, &["more than", &MAX_TERMS.to_string(), "terms"]);
    assert!(started.elapsed().as_secs() < 30, "took {:?}", started.elapsed());
    // A term that is one number per index is computed all at once, with no such limit.
    accepted(&format!(
        "y = 1:{n}\nm : real\ndensity = normal(m; 0, 1) * prod(normal(y[i]; m, 1000000) for i in 1:{n})\n"
    ));
}

/// Errors are capped at the limit however many statements fail, in time linear in the text.
#[test]
fn error_cap_for_many_broken_statements() {
    let mut source = String::new();
    for k in 0..20_000 {
        source.push_str(&format!("a{k} = unknown{k} + (\nb{k} = missing{k}\n"));
    }
    source.push_str(TAIL);
    let started = std::time::Instant::now();
    let errors = check(&source).expect_err("errors");
    assert_eq!(errors.iter().count(), mixwell::lang::diagnostic::MAX_ERRORS);
    assert!(errors.more() > 0);
    assert!(errors.render("hostile.mw", &source).contains("more errors not shown"));
    assert!(started.elapsed().as_secs() < 30, "took {:?}", started.elapsed());
}

/// A long chain of intermediates, each naming the one before, compiles and evaluates without
/// recursing once per link (it used to recurse in the compiler).
#[test]
fn long_chains_of_intermediates() {
    let mut source = String::from("m : real\nd0 = m\n");
    for k in 1..100_000 {
        source.push_str(&format!("d{k} = d{} + 1\n", k - 1));
    }
    source.push_str("density = normal(m; 0, 1) * normal(d99999; 99999, 1)\n");
    let (_, tape) = accepted(&source);
    let lp = tape.log_density(&[0.5], &mut tape.scratch());
    assert!((lp - (-0.25 - 2.0 * 0.918_938_533_204_672_8)).abs() < 1e-9, "{lp}");
}
