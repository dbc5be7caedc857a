//! Evaluator tests: compiled models against the same density written out by hand.

use super::*;
use crate::model::check;

fn tape(src: &str) -> Tape {
    Tape::new(&check(src).unwrap_or_else(|d| panic!("{}", d.render("test", src))))
}

/// log N(x; m, s) written out (BDA3 Appendix A form, REFERENCES.md §1).
fn log_normal_pdf(x: f64, m: f64, s: f64) -> f64 {
    -0.5 * ((x - m) / s).powi(2) - libm::log(s) - 0.5 * libm::log(2.0 * std::f64::consts::PI)
}

fn close(a: f64, b: f64) -> bool {
    (a - b).abs() <= 1e-12 * (1.0 + a.abs().max(b.abs()))
}

#[test]
fn normal_model_matches_the_hand_written_density_and_jacobian() {
    let t =
        tape("y = [1.5, 2.5, 0.5]\nmu : real\nsigma : positive\ndensity = normal(mu; 0, 10) * normal(y; mu, sigma)\n");
    let (mu, sigma) = (0.7, 1.3);
    let theta = [mu, libm::log(sigma)];
    let (constrained, jacobian) = t.log_density_parts(&theta, &mut t.scratch());
    let by_hand =
        log_normal_pdf(mu, 0.0, 10.0) + [1.5, 2.5, 0.5].iter().map(|&y| log_normal_pdf(y, mu, sigma)).sum::<f64>();
    assert!(close(constrained, by_hand), "{constrained} vs {by_hand}");
    // x = eᵘ has log-Jacobian u = log σ.
    assert!(close(jacobian, libm::log(sigma)));
    assert!(close(t.log_density(&theta, &mut t.scratch()), by_hand + libm::log(sigma)));
}

#[test]
fn constants_are_folded_away() {
    let t = tape("a = 3\nmu : real\ndensity = normal(mu; 2 * a + log(exp(1)), sqrt(4) * sum([1, 2]) / 3)\n");
    // Only the parameter's transform and the one density factor remain to run.
    assert_eq!(t.ops.len(), 2, "{:?}", t.ops);
    let lp = t.log_density(&[1.0], &mut t.scratch());
    assert!(close(lp, log_normal_pdf(1.0, 7.0, 2.0)));
}

#[test]
fn products_quotients_powers_and_mixtures_become_log_sums() {
    let t = tape("x : real\ndensity = normal(x; 0, 1)^2 / 4 * exp(-x) + 0.5 * normal(x; 3, 1)\n");
    let x = 0.4;
    let a = 2.0 * log_normal_pdf(x, 0.0, 1.0) - libm::log(4.0) - x;
    let b = libm::log(0.5) + log_normal_pdf(x, 3.0, 1.0);
    let expected = libm::log(libm::exp(a) + libm::exp(b));
    assert!(close(t.log_density(&[x], &mut t.scratch()), expected));
}

#[test]
fn derived_quantities_indexing_and_linear_algebra() {
    let src = "\
M = [[1, 2], [3, 4], [5, 6]]
g = [3, 1, 1]
b : real[2]
s : positive
report fit = matvec(M, b)
report picked = fit[g]
report corner = M[3, 2] * b[1]
report tot = dot(b, [10, 100]) + mean(fit) + max(fit) + min(b[1], b[2])
density = normal(b; 0, 1) * normal(s; 1, 1) * normal(picked; 0, s)
";
    let t = tape(src);
    assert_eq!(
        t.columns(),
        ["b[1]", "b[2]", "s", "fit[1]", "fit[2]", "fit[3]", "picked[1]", "picked[2]", "picked[3]", "corner", "tot"]
    );
    let theta = [0.5, -1.0, libm::log(2.0)];
    let mut scratch = t.scratch();
    let lp = t.log_density(&theta, &mut scratch);
    let mut draw = vec![0.0; t.columns().len()];
    t.write_draw(&theta, &mut scratch, &mut draw);
    let fit = [0.5 - 2.0, 1.5 - 4.0, 2.5 - 6.0];
    let tot = 5.0 - 100.0 + (fit.iter().sum::<f64>() / 3.0) + fit[0] + -1.0;
    assert_eq!(draw, [0.5, -1.0, 2.0, fit[0], fit[1], fit[2], fit[2], fit[0], fit[0], 3.0, tot]);
    let by_hand = log_normal_pdf(0.5, 0.0, 1.0)
        + log_normal_pdf(-1.0, 0.0, 1.0)
        + log_normal_pdf(2.0, 1.0, 1.0)
        + [fit[2], fit[0], fit[0]].iter().map(|&v| log_normal_pdf(v, 0.0, 2.0)).sum::<f64>()
        + libm::log(2.0);
    assert!(close(lp, by_hand), "{lp} vs {by_hand}");
}

#[test]
fn supports_map_back_and_forth() {
    let t = tape(
        "a : between(-1, 3)\nb : below(2)[2]\nc : unit\ndensity = normal(a; 0, 1) * normal(b; 0, 1) * normal(c; 0, 1)\n",
    );
    let values = [2.5, 1.0, -7.0, 0.25];
    let theta = t.unconstrain(&values).expect("inside the supports");
    let back = t.constrain(&theta);
    assert!(values.iter().zip(&back).all(|(a, b)| close(*a, *b)), "{back:?}");
    assert_eq!(t.unconstrain(&[3.0, 1.0, 1.0, 0.5]), Err(0));
    assert_eq!(t.unconstrain(&[0.0, 1.0, 2.0, 0.5]), Err(2));
}

#[test]
fn impossible_values_give_minus_infinity_or_nan_not_a_panic() {
    let t = tape("s : real\ndensity = normal(1; 0, s) * sqrt(s)\n");
    let lp = t.log_density(&[-1.0], &mut t.scratch());
    assert!(!lp.is_finite() || lp.is_nan());
}

mod folding {
    //! A value folded while checking (the interpreter in `model::eval`) and the same value
    //! computed while sampling (the compiled tape) are the same bits.
    use super::*;
    use proptest::prelude::*;

    /// Random expressions in `x`, with every kind of arithmetic the two evaluators share.
    fn arb_expr() -> impl Strategy<Value = String> {
        let leaf =
            prop_oneof![Just("x".to_string()), (-5.0..5.0f64).prop_map(|v| format!("({v:?})")), Just("pi".into())];
        leaf.prop_recursive(4, 24, 3, |inner| {
            let unary = prop_oneof![
                Just("exp"),
                Just("log"),
                Just("log1p"),
                Just("expm1"),
                Just("sqrt"),
                Just("abs"),
                Just("lgamma"),
                Just("logistic"),
                Just("logit"),
                Just("sin"),
                Just("cos"),
            ];
            let binary = prop_oneof![Just("+"), Just("-"), Just("*"), Just("/"), Just("^")];
            let pair = prop_oneof![Just("min"), Just("max"), Just("pow")];
            prop_oneof![
                (unary, inner.clone()).prop_map(|(f, a)| format!("{f}({a})")),
                (inner.clone(), binary, inner.clone()).prop_map(|(a, op, b)| format!("({a} {op} {b})")),
                (pair, inner.clone(), inner.clone()).prop_map(|(f, a, b)| format!("{f}({a}, {b})")),
                (inner.clone(), inner.clone()).prop_map(|(a, b)| format!("sum([{a}, {b}, x]) + logsumexp([{a}, {b}])")),
                inner.clone().prop_map(|a| format!("sum(cumsum([{a}, x, 1]) * [1, 2, 3]) - prod(diff([x, {a}, 2]))")),
                inner.prop_map(|a| format!("mean(normal(z; {a}, 2) for z in [x, 1]) + log(poisson(2; exp(x)))")),
            ]
        })
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(256))]

        #[test]
        fn folded_and_sampled_values_agree_to_the_bit(e in arb_expr(), x in -3.0..3.0f64) {
            // `r` lists x too, so it always depends on the parameter in the sampled model.
            let folded = format!("x = {x:?}\nr = [{e}, x]\np : real\ndensity = normal(p; 0, 1)\n");
            // A non-finite folded value is refused, and so is a `for` nested in one with the same index.
            let Ok(m) = check(&folded) else { return Ok(()) };
            let constant = m.constants.iter().find(|c| c.name.as_deref() == Some("r")).expect("r is data");
            let sampled = format!("x : real\nreport r = [{e}, x]\ndensity = normal(x; 0, 1)\n");
            let t = tape(&sampled);
            let theta = [x];
            let mut scratch = t.scratch();
            let _ = t.log_density(&theta, &mut scratch);
            let mut draw = vec![0.0; t.columns().len()];
            t.write_draw(&theta, &mut scratch, &mut draw);
            prop_assert_eq!(draw[0].to_bits(), theta[0].to_bits());
            prop_assert_eq!(constant.values[0].to_bits(), draw[1].to_bits(), "{}: {} vs {}", e, constant.values[0], draw[1]);
        }
    }
}
