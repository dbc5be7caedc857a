#!/usr/bin/env python3
"""Reference values for crate/tests/multivariate.rs.

Writes multivariate.json beside this file. Each case carries
  * "scipy": scipy.stats (dirichlet, multinomial, multivariate_normal) or scipy.special
    (log_softmax), in double precision;
  * "exact": the textbook formula (BDA3 Appendix A, Gelman et al. 2013) at 50 digits in mpmath,
    rounded once to the nearest double;
and, for the LKJ normalising constant of dimension 2, the integral of (1 - r^2)^(eta - 1) over
(-1, 1) by mpmath's quadrature (the density of the one correlation of a 2x2 matrix).
Rows copied from REFERENCES.md section 1 carry the value printed there as "published".

Inputs are written as Python floats, i.e. exactly the doubles the test reads.

Rerun from the repository root (versions pinned in requirements.txt):
    python3 crate/tests/reference/multivariate.py
"""


import mpmath as mp
import numpy as np
import scipy
import scipy.special as sp
import scipy.stats as st

from fixture_io import write_fixture

mp.mp.dps = 50


def m(v):
    return mp.mpf(float(v))


def dirichlet_exact(x, alpha):
    x, alpha = [m(v) for v in x], [m(v) for v in alpha]
    return (mp.loggamma(mp.fsum(alpha)) - mp.fsum(mp.loggamma(a) for a in alpha)
            + mp.fsum((a - 1) * mp.log(v) for a, v in zip(alpha, x)))


def multinomial_exact(k, p):
    k, p = [m(v) for v in k], [m(v) for v in p]
    n = mp.fsum(k)
    return (mp.loggamma(n + 1) - mp.fsum(mp.loggamma(v + 1) for v in k)
            + mp.fsum(v * mp.log(q) for v, q in zip(k, p) if v > 0))


def log_softmax_exact(s):
    s = [m(v) for v in s]
    lse = mp.log(mp.fsum(mp.exp(v) for v in s))
    return [v - lse for v in s]


def mvn_exact_chol(x_rows, mean_rows, chol, d):
    """Sum over rows of the log density with covariance L L^T, from L directly."""
    L = mp.matrix(d, d)
    for i in range(d):
        for j in range(i + 1):
            L[i, j] = m(chol[i * d + j])
    total = mp.mpf(0)
    for x, mu in zip(x_rows, mean_rows):
        r = mp.matrix([m(a) - m(b) for a, b in zip(x, mu)])
        z = mp.lu_solve(L, r)
        total += (-d * mp.log(2 * mp.pi) / 2 - mp.fsum(mp.log(L[i, i]) for i in range(d))
                  - mp.fsum(z[i] ** 2 for i in range(d)) / 2)
    return total


def mvn_exact_cov(x_rows, mean_rows, cov, d):
    S = mp.matrix([[m(cov[i * d + j]) for j in range(d)] for i in range(d)])
    total = mp.mpf(0)
    for x, mu in zip(x_rows, mean_rows):
        r = mp.matrix([m(a) - m(b) for a, b in zip(x, mu)])
        quad = (r.T * mp.lu_solve(S, r))[0]
        total += -d * mp.log(2 * mp.pi) / 2 - mp.log(mp.det(S)) / 2 - quad / 2
    return total


def main():
    rng = np.random.default_rng(20240612)
    dirichlet = []
    # REFERENCES.md section 1 (dirichlet_3d rows), then generated ones.
    published = [
        ([0.2, 0.3, 0.5], [1.0, 1.0, 1.0], 0.69314718055994531),
        ([0.2, 0.3, 0.5], [2.0, 3.0, 4.0], 2.0228711901914416),
        ([0.6, 0.3, 0.1], [0.5, 1.5, 2.5], -2.0829802346909729),
    ]
    generated = [
        ([0.25, 0.75], [0.3, 0.7]),
        ([0.999, 0.001], [50.0, 0.2]),
        ([0.1, 0.2, 0.3, 0.4], [0.1, 0.1, 0.1, 0.1]),
        ([0.3, 0.3, 0.4], [500.0, 500.0, 700.0]),
        ([0.25, 0.25, 0.5], [1e4, 1e4, 2e4]),
    ]
    for _ in range(3):
        k = int(rng.integers(3, 7))
        a = np.round(rng.gamma(2.0, 2.0, size=k), 3) + 0.05
        x = rng.dirichlet(a)
        x = list(np.round(x[:-1], 6))
        x.append(1.0 - sum(x))
        generated.append(([float(v) for v in x], [float(v) for v in a]))
    for x, a, *pub in [(x, a, p) for x, a, p in published] + generated:
        row = {"x": x, "alpha": a, "scipy": float(st.dirichlet(a).logpdf(x)), "exact": float(dirichlet_exact(x, a))}
        if pub:
            row["published"] = pub[0]
        dirichlet.append(row)

    multinomial = []
    for k, p in [
        ([2.0, 3.0], [0.3, 0.7]),
        ([0.0, 0.0, 5.0], [0.2, 0.0, 0.8]),
        ([3.0, 1.0, 4.0, 1.0, 5.0], [0.1, 0.2, 0.3, 0.15, 0.25]),
        ([100.0, 156.0], [0.4, 0.6]),
        ([60.0, 120.0, 76.0], [0.2, 0.5, 0.3]),
        ([250000.0, 500300.0, 249700.0], [0.25, 0.5, 0.25]),
        ([3.0, 999997.0], [1e-6, 0.999999]),
        ([12.0, 0.0, 7.0, 400.0], [0.03, 0.001, 0.02, 0.949]),
    ]:
        multinomial.append({"k": k, "p": p, "scipy": float(st.multinomial(int(sum(k)), p).logpmf(k)),
                            "exact": float(multinomial_exact(k, p))})

    scores = []
    for s in [[1.0, -0.5, 2.0], [0.0, 0.0], [800.0, 799.0, -800.0], [-1e3, 5.0, 5.0, 4.5]]:
        exact = log_softmax_exact(s)
        scipy_v = sp.log_softmax(np.array(s))
        scores.append({"scores": s, "scipy": [float(v) for v in scipy_v], "exact": [float(v) for v in exact]})

    mvn = []
    for d, rows, seed in [(1, 1, 1), (2, 1, 2), (3, 4, 3), (5, 2, 4), (8, 3, 5)]:
        r = np.random.default_rng(seed)
        a = np.round(r.normal(size=(d, d)), 3)
        cov = np.round(a @ a.T + 0.3 * np.eye(d), 6)
        chol = np.linalg.cholesky(cov)
        chol = np.round(np.tril(chol), 6)  # a lower-triangular factor with short decimals
        for i in range(d):
            chol[i, i] = abs(chol[i, i])
        mean = np.round(r.normal(size=d), 3)
        xs = np.round(mean + r.normal(size=(rows, d)) * 1.5, 3)
        x_rows = [list(map(float, v)) for v in xs]
        mean_rows = [list(map(float, mean))] * rows
        chol_flat = [float(v) for v in chol.reshape(-1)]
        cov_from_chol = chol @ chol.T
        scipy_chol = float(sum(st.multivariate_normal(mean, cov_from_chol).logpdf(v) for v in xs))
        cov_flat = [float(v) for v in cov.reshape(-1)]
        scipy_cov = float(sum(st.multivariate_normal(mean, cov).logpdf(v) for v in xs))
        mvn.append({
            "dim": d, "x": [v for row in x_rows for v in row], "mean": list(map(float, mean)),
            "chol": chol_flat, "cov": cov_flat,
            "scipy_chol": scipy_chol, "exact_chol": float(mvn_exact_chol(x_rows, mean_rows, chol_flat, d)),
            "scipy_cov": scipy_cov, "exact_cov": float(mvn_exact_cov(x_rows, mean_rows, cov_flat, d)),
        })

    lkj2 = []
    for eta in [0.5, 1.0, 1.7, 3.0, 10.0]:
        e = m(eta)
        integral = mp.quad(lambda r: (1 - r * r) ** (e - 1), [-1, 0, 1])
        lkj2.append({"eta": eta, "log_integral": float(mp.log(integral))})

    out = {
        "generator": "crate/tests/reference/multivariate.py",
        "versions": {"numpy": np.__version__, "scipy": scipy.__version__, "mpmath": mp.__version__},
        "dirichlet": dirichlet,
        "multinomial": multinomial,
        "softmax": scores,
        "mvnormal": mvn,
        "lkj_d2": lkj2,
    }
    path = write_fixture(__file__, "multivariate.json", out)
    print("wrote", path)


if __name__ == "__main__":
    main()
