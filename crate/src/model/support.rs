//! Supports of parameters and the maps that let samplers work on the whole real line.
//!
//! A bounded parameter x is written as x = g(u) with u unconstrained; the density of u is the
//! density of x times |g'(u)|, so the log-Jacobian log|g'(u)| is added (change of variables; e.g.
//! Gelman et al. 2013, Bayesian Data Analysis 3rd ed., §1.8 (from memory)).

use super::builtins::{log_logistic, logistic};

/// How one coordinate maps between the unconstrained line and its support.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Transform {
    /// `real`: x = u.
    Identity,
    /// `above(a)`, `positive` (a = 0): x = a + eᵘ.
    Above(f64),
    /// `below(b)`: x = b − eᵘ.
    Below(f64),
    /// `between(a, b)`, `unit` (0, 1): x = a + (b − a)·logistic(u).
    Between(f64, f64),
}

impl Transform {
    /// The constrained value of unconstrained `u`.
    #[inline]
    pub fn constrain(self, u: f64) -> f64 {
        match self {
            Transform::Identity => u,
            Transform::Above(a) => a + libm::exp(u),
            Transform::Below(b) => b - libm::exp(u),
            Transform::Between(a, b) => a + (b - a) * logistic(u),
        }
    }

    /// log |dx/du| at `u`.
    #[inline]
    pub fn log_jacobian(self, u: f64) -> f64 {
        match self {
            Transform::Identity => 0.0,
            Transform::Above(_) | Transform::Below(_) => u,
            Transform::Between(a, b) => libm::log(b - a) + log_logistic(u) + log_logistic(-u),
        }
    }

    /// The unconstrained coordinate of `x`, or `None` when `x` is not inside the support.
    pub fn unconstrain(self, x: f64) -> Option<f64> {
        let u = match self {
            Transform::Identity => x,
            Transform::Above(a) => libm::log(x - a),
            Transform::Below(b) => libm::log(b - x),
            Transform::Between(a, b) => {
                let p = (x - a) / (b - a);
                libm::log(p) - libm::log1p(-p)
            }
        };
        u.is_finite().then_some(u)
    }

    /// The support in words, for messages: "above 0", "between 0 and 1".
    pub fn describe(self) -> String {
        match self {
            Transform::Identity => "the real line".into(),
            Transform::Above(a) => format!("above {a}"),
            Transform::Below(b) => format!("below {b}"),
            Transform::Between(a, b) => format!("between {a} and {b}"),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    fn transforms() -> impl Strategy<Value = Transform> {
        prop_oneof![
            Just(Transform::Identity),
            (-50.0..50.0f64).prop_map(Transform::Above),
            (-50.0..50.0f64).prop_map(Transform::Below),
            (-50.0..50.0f64, 0.01..100.0f64).prop_map(|(a, w)| Transform::Between(a, a + w)),
        ]
    }

    proptest! {
        /// The log-Jacobian equals the log of a central finite difference of the inverse
        /// transform (step h = 1e-5; truncation error O(h²) relative, well inside 1e-6).
        #[test]
        fn log_jacobian_matches_finite_differences(t in transforms(), u in -8.0..8.0f64) {
            let h = 1e-5;
            let slope = (t.constrain(u + h) - t.constrain(u - h)) / (2.0 * h);
            let numeric = libm::log(slope.abs());
            prop_assert!((numeric - t.log_jacobian(u)).abs() < 1e-6, "{t:?} at {u}: {numeric} vs {}", t.log_jacobian(u));
        }

        /// Constraining and unconstraining are inverse (to rounding) and land inside the support.
        #[test]
        fn round_trip(t in transforms(), u in -8.0..8.0f64) {
            let x = t.constrain(u);
            let back = t.unconstrain(x).unwrap_or(f64::NAN);
            // Bounds up to 50 away with widths down to 0.01 lose at most ~1e-9 in u at |u| = 8.
            prop_assert!((back - u).abs() < 1e-7 * (1.0 + u.abs()), "{t:?}: {u} -> {x} -> {back}");
        }
    }

    #[test]
    fn outside_the_support_has_no_unconstrained_value() {
        assert_eq!(Transform::Above(0.0).unconstrain(-1.0), None);
        assert_eq!(Transform::Between(0.0, 1.0).unconstrain(1.0), None);
        assert_eq!(Transform::Below(2.0).unconstrain(2.5), None);
        assert_eq!(Transform::Identity.unconstrain(f64::NAN), None);
    }
}
