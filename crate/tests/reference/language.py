#!/usr/bin/env python3
"""Reference values for the model language's per-element and indexed forms (crate/tests/language.rs).

Every value is computed here from the textbook formula with mpmath at 50 significant digits,
independently of mixwell's code; the posterior summaries are exact (closed forms, or 1-d
quadrature), not simulated.

  * mixture: a two-component normal mixture for each observation,
        log p(y | w, a, s, b, t) = sum_i log[(1 - w) N(y_i; a, s) + w N(y_i; b, t)],
    at points including one where every component density of one observation underflows a
    double (a naive log of a sum gives -inf there); and the posterior of w alone (a, s, b, t
    known, w ~ Beta(2, 2)) by quadrature: its mean and sd.
  * change point: yearly counts y_1..y_n, rates early, late ~ Gamma(2, 1) (shape, rate), the
    last year of the early regime c uniform on 1..n (c = n: no change),
        p(y | early, late) = (1/n) sum_c prod_{t<=c} Pois(y_t; early) prod_{t>c} Pois(y_t; late).
    The log density at points, and the exact posterior: with S_c = y_1 + ... + y_c, T = S_n,
    Gamma-Poisson conjugacy gives the marginal likelihood of each c in closed form,
        m(c) = [G(2 + S_c) / (1 + c)^(2 + S_c)] [G(2 + T - S_c) / (1 + n - c)^(2 + T - S_c)] / prod y_t!,
    so P(c | y) = m(c) / sum m, E[early | y] = sum_c P(c | y) (2 + S_c)/(1 + c), and likewise
    the second moments for the sd (Gelman et al. 2013, BDA3 section 2.6, the Poisson-gamma model).
  * ar2: a second-order autoregression conditional on the first two values,
        sum_{t=3}^n log N(y_t; mu + phi1 (y_{t-1} - mu) + phi2 (y_{t-2} - mu), s).
  * links: bernoulli(y; logistic(eta)), binomial(k; n, logistic(eta)), poisson(k; exp(eta)) at
    |eta| up to 800, where the probability or the rate rounds to 0 or 1 in a double.

The data are invented (see the model texts in language.rs): ferry arrival delays, a lighthouse's
fog-horn failures per winter, and a river's water-temperature anomalies.

Rerun from the repository root (versions pinned in requirements.txt):
    python3 crate/tests/reference/language.py
Generated with Python 3.11.7, mpmath 1.3.0.
"""

import json
import os

import mpmath as mp

mp.mp.dps = 50


def m(v):
    """The exact binary value of a double, as an mpmath number."""
    return mp.mpf(float(v))


def log_normal(x, mu, s):
    return -mp.log(s) - mp.log(2 * mp.pi) / 2 - (x - mu) ** 2 / (2 * s ** 2)


def log_poisson(k, rate):
    return k * mp.log(rate) - rate - mp.loggamma(k + 1)


def log_gamma_density(x, shape, rate):
    return shape * mp.log(rate) - mp.loggamma(shape) + (shape - 1) * mp.log(x) - rate * x


# ---------------------------------------------------------------------------------------------
# Two-component mixture per observation.

DELAYS = [-1.2, 0.4, 2.9, 3.4, -0.3, 4.1, 0.8, 3.0, -0.9, 2.2, 38.0]


def mixture_log_lik(w, a, s, b, t, ys=DELAYS):
    w, a, s, b, t = map(m, (w, a, s, b, t))
    total = mp.mpf(0)
    for y in ys:
        y = m(y)
        total += mp.log((1 - w) * mp.exp(log_normal(y, a, s)) + w * mp.exp(log_normal(y, b, t)))
    return total


MIXTURE_POINTS = [
    (0.3, 0.0, 1.0, 3.0, 1.0),
    (0.55, -0.5, 0.8, 3.2, 0.6),
    (0.1, 0.2, 0.5, 2.5, 0.4),  # 38 is ~90 sd from both components: each density underflows
]

# The posterior of w with the other parameters fixed at the first point, w ~ Beta(2, 2).
FIXED = (0.0, 1.0, 3.0, 1.0)


def mixture_weight_posterior():
    a, s, b, t = FIXED

    def unnormalised(w):
        return mp.exp(mixture_log_lik(w, a, s, b, t) + mp.log(6 * w * (1 - w)))

    z = mp.quad(unnormalised, [0, 0.5, 1])
    mean = mp.quad(lambda w: w * unnormalised(w), [0, 0.5, 1]) / z
    second = mp.quad(lambda w: w * w * unnormalised(w), [0, 0.5, 1]) / z
    return float(mean), float(mp.sqrt(second - mean ** 2))


# ---------------------------------------------------------------------------------------------
# Change point with the year marginalised.

FAILURES = [4, 2, 3, 5, 3, 2, 4, 3, 6, 2, 3, 4, 1, 3, 5, 3, 1, 0, 2, 1, 1, 0, 2, 1, 0, 1, 1, 2, 0, 1]


def change_point_log_density(early, late, ys=FAILURES):
    early, late = m(early), m(late)
    n = len(ys)
    terms = []
    for c in range(1, n + 1):
        terms.append(sum(log_poisson(y, early) for y in ys[:c]) + sum(log_poisson(y, late) for y in ys[c:]))
    log_mean = mp.log(mp.fsum(mp.exp(t) for t in terms)) - mp.log(n)
    return log_gamma_density(early, 2, 1) + log_gamma_density(late, 2, 1) + log_mean


def change_point_posterior(ys=FAILURES):
    n, total = len(ys), sum(ys)
    log_m, moments = [], []
    for c in range(1, n + 1):
        s = sum(ys[:c])
        a1, b1 = 2 + s, 1 + c
        a2, b2 = 2 + total - s, 1 + n - c
        log_m.append(mp.loggamma(a1) - a1 * mp.log(b1) + mp.loggamma(a2) - a2 * mp.log(b2))
        # E and E of the square of Gamma(a, b): a/b and a(a+1)/b^2.
        moments.append((mp.mpf(a1) / b1, mp.mpf(a1 * (a1 + 1)) / b1 ** 2, mp.mpf(a2) / b2, mp.mpf(a2 * (a2 + 1)) / b2 ** 2))
    top = max(log_m)
    weights = [mp.exp(v - top) for v in log_m]
    z = mp.fsum(weights)
    p = [w / z for w in weights]
    e1 = mp.fsum(pc * mo[0] for pc, mo in zip(p, moments))
    s1 = mp.fsum(pc * mo[1] for pc, mo in zip(p, moments))
    e2 = mp.fsum(pc * mo[2] for pc, mo in zip(p, moments))
    s2 = mp.fsum(pc * mo[3] for pc, mo in zip(p, moments))
    return {
        "early_mean": float(e1),
        "early_sd": float(mp.sqrt(s1 - e1 ** 2)),
        "late_mean": float(e2),
        "late_sd": float(mp.sqrt(s2 - e2 ** 2)),
        "p_change": [float(v) for v in p],
    }


# ---------------------------------------------------------------------------------------------
# AR(2), conditional on the first two values.

ANOMALIES = [0.3, 0.9, 1.2, 0.7, 0.1, -0.4, -0.2, 0.5, 1.1, 0.8, 0.2, -0.6, -0.9, -0.3, 0.4]


def ar2_log_lik(mu, phi1, phi2, s, ys=ANOMALIES):
    mu, phi1, phi2, s = map(m, (mu, phi1, phi2, s))
    ys = [m(y) for y in ys]
    return mp.fsum(
        log_normal(ys[t], mu + phi1 * (ys[t - 1] - mu) + phi2 * (ys[t - 2] - mu), s) for t in range(2, len(ys))
    )


# ---------------------------------------------------------------------------------------------
# Links at extreme linear predictors.


def links():
    out = []
    for eta in [-800.0, -30.0, 0.5, 30.0, 800.0]:
        e = m(eta)
        for y in [0, 1]:
            # log p = -log(1 + e^-eta), log(1 - p) = -log(1 + e^eta)
            value = -mp.log(1 + mp.exp(-e)) if y == 1 else -mp.log(1 + mp.exp(e))
            out.append({"family": "bernoulli", "eta": eta, "x": y, "trials": None, "exact": float(value)})
        for k, n in [(0, 10), (3, 10), (10, 10)]:
            value = (mp.loggamma(n + 1) - mp.loggamma(k + 1) - mp.loggamma(n - k + 1)
                     - k * mp.log(1 + mp.exp(-e)) - (n - k) * mp.log(1 + mp.exp(e)))
            out.append({"family": "binomial", "eta": eta, "x": k, "trials": n, "exact": float(value)})
    for eta in [-800.0, -3.0, 2.0, 700.0]:
        for k in [0, 4]:
            value = log_poisson(k, mp.exp(m(eta)))
            out.append({"family": "poisson", "eta": eta, "x": k, "trials": None, "exact": float(value)})
    return out


def main():
    mean, sd = mixture_weight_posterior()
    out = {
        "generator": "crate/tests/reference/language.py",
        "versions": {"mpmath": mp.__version__},
        "mixture": {
            "y": DELAYS,
            "points": [{"at": list(p), "exact": float(mixture_log_lik(*p))} for p in MIXTURE_POINTS],
            "weight_posterior": {"fixed": list(FIXED), "prior": [2, 2], "mean": mean, "sd": sd},
        },
        "change_point": {
            "y": FAILURES,
            "points": [
                {"at": [e, l], "exact": float(change_point_log_density(e, l))}
                for e, l in [(3.0, 1.0), (1.5, 2.5), (0.2, 9.0)]
            ],
            "posterior": change_point_posterior(),
        },
        "ar2": {
            "y": ANOMALIES,
            "points": [{"at": list(p), "exact": float(ar2_log_lik(*p))} for p in [(0.2, 1.1, -0.5, 0.3), (-0.1, 0.4, 0.2, 1.5)]],
        },
        "links": links(),
    }
    path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "language.json")
    with open(path, "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")
    print(f"wrote {path}")


if __name__ == "__main__":
    main()
