//! The language's per-element and indexed forms against values computed independently: a
//! per-observation mixture, a change point whose year is summed out, an AR(2) series, and links
//! written as on paper at extreme linear predictors. The reference values come from
//! `crate/tests/reference/language.py` (mpmath at 50 digits; closed-form and quadrature
//! posteriors); the data are invented scenarios. The posteriors are checked within 4 MCSE.

mod common;

use common::{column, compile, sample, slices};
use mixwell::diag;
use mixwell::kernel::{Kind, Settings};
use mixwell::tape::Tape;
use serde_json::Value;

fn fixture() -> Value {
    serde_json::from_str(include_str!("reference/language.json")).expect("fixture parses")
}

fn floats(v: &Value) -> Vec<f64> {
    v.as_array().expect("an array").iter().map(|x| x.as_f64().expect("a number")).collect()
}

fn list(values: &[f64]) -> String {
    format!("[{}]", values.iter().map(|v| format!("{v:?}")).collect::<Vec<_>>().join(", "))
}

/// The log density on the constrained scale (no Jacobian) at constrained `values`.
fn at(tape: &Tape, values: &[f64]) -> f64 {
    let theta = tape.unconstrain(values).expect("inside the supports");
    tape.log_density_parts(&theta, &mut tape.scratch()).0
}

fn close(got: f64, want: f64) -> bool {
    (got - want).abs() <= 1e-11 * want.abs().max(1.0)
}

/// Arrival delays (minutes) of a ferry that runs two routes — invented data.
fn mixture_model(y: &[f64], unknown: &str, head: &str) -> String {
    format!(
        "delay = {}\nn = length(delay)\n{head}{unknown}\n\
         density = prod((1 - w) * normal(delay[i]; a, s) + w * normal(delay[i]; b, t) for i in 1:n)",
        list(y)
    )
}

#[test]
fn per_observation_mixture_matches_mpmath_where_each_component_underflows() {
    let f = fixture();
    let y = floats(&f["mixture"]["y"]);
    let source = mixture_model(&y, "w : unit\na : real\ns : positive\nb : real\nt : positive\n", "")
        + " * normal(a; 0, 10) * normal(b; 0, 10) * halfnormal(s; 5) * halfnormal(t; 5)\n";
    let tape = compile(&source);
    let priors = |p: &[f64]| {
        let normal = |x: f64| -0.5 * (x / 10.0) * (x / 10.0) - libm::log(10.0) - 0.918_938_533_204_672_8;
        let half = |x: f64| libm::log(2.0) - 0.5 * (x / 5.0) * (x / 5.0) - libm::log(5.0) - 0.918_938_533_204_672_8;
        normal(p[1]) + normal(p[3]) + half(p[2]) + half(p[4])
    };
    for point in f["mixture"]["points"].as_array().expect("points") {
        let p = floats(&point["at"]);
        let want = point["exact"].as_f64().expect("value") + priors(&p);
        let got = at(&tape, &p);
        assert!(got.is_finite() && close(got, want), "at {p:?}: {got} vs mpmath {want}");
    }
}

#[test]
fn per_observation_mixture_weight_matches_quadrature() {
    let f = fixture();
    let (y, posterior) = (floats(&f["mixture"]["y"]), &f["mixture"]["weight_posterior"]);
    let fixed = floats(&posterior["fixed"]);
    let head = format!("a = {}\ns = {}\nb = {}\nt = {}\n", fixed[0], fixed[1], fixed[2], fixed[3]);
    let source = mixture_model(&y, "w : unit\n", &head) + " * beta(w; 2, 2)\n";
    let tape = compile(&source);
    let collected = sample(&tape, Settings::default_for(Kind::Slice, 1), 4, 500, 4000, 11);
    let s = diag::summarise(&slices(&column(&tape, &collected, "w")));
    let (mean, sd) = (posterior["mean"].as_f64().unwrap(), posterior["sd"].as_f64().unwrap());
    assert!((s.mean - mean).abs() < 4.0 * s.mcse_mean, "E[w] {} vs {mean} (MCSE {})", s.mean, s.mcse_mean);
    assert!((s.sd - sd).abs() < 0.1 * sd, "sd(w) {} vs {sd}", s.sd);
}

/// Fog-horn failures per winter at a lighthouse whose compressor was replaced one winter —
/// invented data. The winter of the change is summed out of the density as on paper.
fn change_point_model(y: &[f64]) -> String {
    format!(
        "failures = {}\nn = length(failures)\nearly : positive\nlate : positive\n\
         density = gamma(early; 2, 1) * gamma(late; 2, 1)\n\
         \x20       * mean(poisson(failures[1:c]; early) * poisson(failures[c+1:n]; late) for c in 1:n)\n\
         ll = [log(poisson(failures[1:c]; early)) + log(poisson(failures[c+1:n]; late)) for c in 1:n]\n\
         report p_change = exp(ll - logsumexp(ll))\n",
        list(y)
    )
}

#[test]
fn change_point_log_density_matches_the_enumeration() {
    let f = fixture();
    let tape = compile(&change_point_model(&floats(&f["change_point"]["y"])));
    for point in f["change_point"]["points"].as_array().expect("points") {
        let p = floats(&point["at"]);
        let want = point["exact"].as_f64().expect("value");
        let got = at(&tape, &p);
        assert!(close(got, want), "at {p:?}: {got} vs mpmath {want}");
    }
}

#[test]
fn change_point_posterior_matches_the_closed_form() {
    let f = fixture();
    let y = floats(&f["change_point"]["y"]);
    let exact = &f["change_point"]["posterior"];
    let tape = compile(&change_point_model(&y));
    let collected = sample(&tape, Settings::default_for(Kind::Slice, 2), 4, 500, 4000, 5);
    for name in ["early", "late"] {
        let s = diag::summarise(&slices(&column(&tape, &collected, name)));
        let (mean, sd) =
            (exact[format!("{name}_mean")].as_f64().unwrap(), exact[format!("{name}_sd")].as_f64().unwrap());
        assert!((s.mean - mean).abs() < 4.0 * s.mcse_mean, "E[{name}] {} vs {mean} (MCSE {})", s.mean, s.mcse_mean);
        assert!((s.sd - sd).abs() < 0.1 * sd, "sd({name}) {} vs {sd}", s.sd);
    }
    // The posterior of the winter of the change, averaged over the draws' conditional
    // probabilities, for the three likeliest winters.
    let p = floats(&exact["p_change"]);
    let mut order: Vec<usize> = (0..p.len()).collect();
    order.sort_by(|&a, &b| p[b].total_cmp(&p[a]));
    for &c in &order[..3] {
        let s = diag::summarise(&slices(&column(&tape, &collected, &format!("p_change[{}]", c + 1))));
        assert!(
            (s.mean - p[c]).abs() < 4.0 * s.mcse_mean,
            "P(change after winter {}) {} vs {} (MCSE {})",
            c + 1,
            s.mean,
            p[c],
            s.mcse_mean
        );
    }
}

#[test]
fn ar2_reads_as_on_paper_in_both_forms() {
    let f = fixture();
    let y = floats(&f["ar2"]["y"]);
    // River water-temperature anomalies (°C) — invented data.
    let head = format!("temp = {}\nn = length(temp)\np = 2\nmu : real\nphi : real[2]\ns : positive\n", list(&y));
    let sliced = format!(
        "{head}density = normal(temp[p+1:n]; mu + sum(phi[k] * (temp[p+1-k:n-k] - mu) for k in 1:p), s) \
         * normal(mu; 0, 1) * normal(phi; 0, 1) * halfnormal(s; 1)\n"
    );
    let indexed = format!(
        "{head}density = prod(normal(temp[t]; mu + sum(phi[k] * (temp[t - k] - mu) for k in 1:p), s) for t in p+1:n) \
         * normal(mu; 0, 1) * normal(phi; 0, 1) * halfnormal(s; 1)\n"
    );
    for source in [sliced, indexed] {
        let tape = compile(&source);
        for point in f["ar2"]["points"].as_array().expect("points") {
            let p = floats(&point["at"]);
            let want = point["exact"].as_f64().expect("value");
            let priors = -0.5 * (p[0] * p[0] + p[1] * p[1] + p[2] * p[2]) - 3.0 * 0.918_938_533_204_672_8
                + libm::log(2.0)
                - 0.5 * p[3] * p[3]
                - 0.918_938_533_204_672_8;
            let got = at(&tape, &p) - priors;
            assert!(close(got, want), "{source}\nat {p:?}: {got} vs mpmath {want}");
        }
    }
}

#[test]
fn links_written_as_on_paper_are_stable_at_800() {
    for case in fixture()["links"].as_array().expect("links") {
        let (eta, x, want) =
            (case["eta"].as_f64().unwrap(), case["x"].as_f64().unwrap(), case["exact"].as_f64().unwrap());
        let factor = match case["family"].as_str().unwrap() {
            "bernoulli" => format!("bernoulli({x}; logistic(eta))"),
            "binomial" => format!("binomial({x}; {}, logistic(eta))", case["trials"]),
            _ => format!("poisson({x}; exp(eta))"),
        };
        let tape = compile(&format!("eta : real\ndensity = {factor} * normal(eta; 0, 1000)\n"));
        let prior = -0.5 * (eta / 1000.0) * (eta / 1000.0) - libm::log(1000.0) - 0.918_938_533_204_672_8;
        let got = at(&tape, &[eta]) - prior;
        assert!(close(got, want), "{factor} at eta = {eta}: {got} vs mpmath {want}");
    }
}

#[test]
fn terms_computed_together_and_one_by_one_agree_to_the_bit() {
    // `y[i]` is one number per term (all terms at once); `y[i:i]` a one-element list per term
    // (term by term). Same model, same numbers, same order of additions.
    let y = [0.3, -1.2, 2.5, 0.9, 4.0, -0.7];
    for body in ["normal(y[i]; m, 1)", "0.3 * normal(y[i]; m, 1) + 0.7 * normal(y[i]; -m, 2)"] {
        let together = format!("y = {}\nm : real\ndensity = prod({body} for i in 1:6) * normal(m; 0, 1)\n", list(&y));
        let apart = together.replace("y[i]", "y[i:i]");
        let (a, b) = (compile(&together), compile(&apart));
        for m in [-2.0, 0.1, 3.7] {
            assert_eq!(at(&a, &[m]).to_bits(), at(&b, &[m]).to_bits(), "{body} at {m}");
        }
    }
}

/// The change-point model exactly as the README prints it, and its linear-time form with
/// running sums, give the enumerated log density.
#[test]
fn the_readme_change_point_and_its_running_sum_form_match_the_enumeration() {
    let readme = include_str!("../../README.md");
    let section = readme.split("### Summing out a discrete parameter").nth(1).expect("the section");
    let blocks: Vec<&str> =
        section.split("```text\n").skip(1).map(|b| b.split("```").next().expect("a block")).collect();
    let model = blocks[0].to_string();
    let head: String = model.lines().take_while(|l| !l.starts_with("density")).map(|l| format!("{l}\n")).collect();
    let running = format!("{head}{}", blocks[1]);
    let f = fixture();
    assert_eq!(
        floats(&f["change_point"]["y"]),
        floats(
            &serde_json::from_str(
                model.lines().find(|l| l.starts_with("failures = ")).expect("data").trim_start_matches("failures = ")
            )
            .expect("a list")
        )
    );
    for source in [model, running] {
        let tape = compile(&source);
        for point in f["change_point"]["points"].as_array().expect("points") {
            let p = floats(&point["at"]);
            let (got, want) = (at(&tape, &p), point["exact"].as_f64().expect("value"));
            assert!(close(got, want), "{source}\nat {p:?}: {got} vs mpmath {want}");
        }
    }
}
