#!/usr/bin/env python3
"""Independent reference values for mixwell's Gaussian-process regression and expected improvement.

Rerun from the repository root:  python3 crate/tests/reference/gp.py
It rewrites crate/tests/reference/gp_fixture.json. Library versions are recorded in the fixture
(written with numpy 2.4.6 and mpmath 1.3.0).

GP: Rasmussen & Williams (2006), Gaussian Processes for Machine Learning, Algorithm 2.1 (predictive
mean, variance, log marginal likelihood) and eq. 5.9 (gradient), written here with numpy only,
in a different way from the Rust code: the inverse of K_y comes from numpy.linalg.inv and the
kernel derivatives are formed as whole matrices. Hyperparameter order for the gradient:
(log l_1, ..., log l_d, log sigma_f, log sigma_n), as in REFERENCES.md section 7.

EI: Jones, Schonlau & Welch (1998), J. Global Optimization 13, closed form for maximisation,
evaluated with mpmath at 60 significant digits (log EI is given too, for cases where EI underflows).
"""
import json
import os

import mpmath
import numpy as np


def scaled_sq_dist(a, b, ls):
    """(x_i - x'_k)^2 / l_j^2 per dimension: array of shape (d, n_a, n_b)."""
    diff = a[:, None, :] - b[None, :, :]
    return np.moveaxis((diff / ls) ** 2, -1, 0)


def kernel(kind, a, b, ls, sf):
    """Kernel matrix and its derivatives w.r.t. log l_j (list) for SE-ARD and Matern-5/2-ARD."""
    parts = scaled_sq_dist(a, b, ls)
    r2 = parts.sum(axis=0)
    if kind == "se":
        k = sf**2 * np.exp(-0.5 * r2)
        dk = [k * p for p in parts]  # d/dlog l_j of exp(-r^2/2) = r_j^2 * k
    elif kind == "matern52":
        r = np.sqrt(r2)
        s5 = np.sqrt(5.0)
        e = np.exp(-s5 * r)
        k = sf**2 * (1 + s5 * r + 5 * r2 / 3) * e
        # dk/dr * dr/dlog l_j, with dr/dlog l_j = -r_j^2 / r; the r cancels.
        dk = [sf**2 * (5.0 / 3.0) * (1 + s5 * r) * e * p for p in parts]
    else:
        raise ValueError(kind)
    return k, dk


def gp_case(name, kind, x, y, mean, ls, sf, sn, xs):
    x = np.asarray(x, dtype=float)
    xs = np.asarray(xs, dtype=float)
    y = np.asarray(y, dtype=float)
    ls = np.asarray(ls, dtype=float)
    n = len(y)
    k, dk = kernel(kind, x, x, ls, sf)
    ky = k + sn**2 * np.eye(n)
    # Algorithm 2.1
    L = np.linalg.cholesky(ky)
    alpha = np.linalg.solve(L.T, np.linalg.solve(L, y - mean))
    ks, _ = kernel(kind, x, xs, ls, sf)
    f_mean = mean + ks.T @ alpha
    v = np.linalg.solve(L, ks)
    kss = sf**2 * np.ones(len(xs))
    f_var = kss - (v * v).sum(axis=0)
    log_ml = -0.5 * (y - mean) @ alpha - np.log(np.diag(L)).sum() - 0.5 * n * np.log(2 * np.pi)
    # eq. 5.9: d log p / d theta = 1/2 tr((alpha alpha^T - K_y^{-1}) dK_y/dtheta)
    w = np.outer(alpha, alpha) - np.linalg.inv(ky)
    derivs = dk + [2.0 * k, 2.0 * sn**2 * np.eye(n)]
    grad = [0.5 * np.sum(w * dkj) for dkj in derivs]
    # Sanity check of the analytic gradient by central differences, in this script only.
    def lml(theta):
        d = len(ls)
        l2, sf2, sn2 = np.exp(theta[:d]), np.exp(theta[d]), np.exp(theta[d + 1])
        kk, _ = kernel(kind, x, x, l2, sf2)
        kyy = kk + sn2**2 * np.eye(n)
        sign, logdet = np.linalg.slogdet(kyy)
        r = y - mean
        return -0.5 * r @ np.linalg.solve(kyy, r) - 0.5 * logdet - 0.5 * n * np.log(2 * np.pi)
    theta = np.concatenate([np.log(ls), [np.log(sf), np.log(sn)]])
    for j in range(len(theta)):
        h = 1e-5
        e = np.zeros_like(theta)
        e[j] = h
        fd = (lml(theta + e) - lml(theta - e)) / (2 * h)
        assert abs(fd - grad[j]) < 1e-7 * (1 + abs(grad[j])), (name, j, fd, grad[j])
    return {
        "name": name,
        "kernel": kind,
        "dim": int(x.shape[1]),
        "x": x.ravel().tolist(),
        "y": y.tolist(),
        "mean": mean,
        "length_scales": ls.tolist(),
        "signal_sd": sf,
        "noise_sd": sn,
        "x_star": xs.ravel().tolist(),
        "pred_mean": f_mean.tolist(),
        "latent_var": f_var.tolist(),
        "noisy_var": (f_var + sn**2).tolist(),
        "log_ml": float(log_ml),
        "grad_log_params": [float(g) for g in grad],
    }


def ei_case(mu, sd, best, margin):
    """Expected improvement for maximisation (Jones, Schonlau & Welch 1998) at 60 digits."""
    with mpmath.workdps(60):
        mu, sd, best, margin = (mpmath.mpf(repr(v)) for v in (mu, sd, best, margin))
        u = mu - best - margin
        z = u / sd
        ei = u * mpmath.ncdf(z) + sd * mpmath.npdf(z)
        return {
            "mean": float(mu),
            "sd": float(sd),
            "incumbent": float(best),
            "margin": float(margin),
            "ei": float(ei),
            "log_ei": float(mpmath.log(ei)),
        }


def main():
    sec7_x = [[-2.0], [-1.0], [0.0], [1.5], [3.0]]
    sec7_y = [-0.8, -0.5, 0.3, 1.1, 0.2]
    sec7_xs = [[-1.5], [0.75], [4.0]]
    # An invented two-dimensional data set on the unit square, for the ARD and constant-mean paths.
    x2 = [[0.1, 0.2], [0.4, 0.9], [0.8, 0.3], [0.55, 0.5], [0.2, 0.75], [0.95, 0.85], [0.6, 0.05]]
    y2 = [0.3, 1.2, -0.4, 0.8, 1.0, 0.1, -0.7]
    xs2 = [[0.5, 0.5], [0.0, 0.0], [0.3, 0.6], [1.0, 1.0]]
    cases = [
        gp_case("sec7_se", "se", sec7_x, sec7_y, 0.0, [1.2], 1.3, 0.1, sec7_xs),
        gp_case("sec7_matern52", "matern52", sec7_x, sec7_y, 0.0, [1.2], 1.3, 0.1, sec7_xs),
        gp_case("ard2_se", "se", x2, y2, 0.35, [0.3, 0.7], 0.9, 0.2, xs2),
        gp_case("ard2_matern52", "matern52", x2, y2, 0.35, [0.3, 0.7], 0.9, 0.2, xs2),
    ]
    ei = [
        ei_case(1.0, 0.5, 0.8, 0.0),
        ei_case(0.5, 1.0, 1.0, 0.01),
        ei_case(0.0, 1.0, 0.0, 0.0),
        ei_case(0.0, 1.0, 2.0, 0.0),
        ei_case(0.0, 1.0, 5.0, 0.0),
        ei_case(-3.0, 0.5, 0.0, 0.0),
        ei_case(0.0, 1.0, 10.0, 0.0),
        ei_case(0.0, 1.0, 14.142135623730951, 0.0),
        ei_case(0.0, 1.0, 25.0, 0.0),
        ei_case(0.0, 1.0, 40.0, 0.0),
        ei_case(0.0, 2.0, 200.0, 0.5),
        ei_case(0.0, 1.0, 1e4, 0.0),
        ei_case(0.3, 1e-3, 0.29, 0.0),
        ei_case(5.0, 0.1, 1.0, 0.0),
    ]
    out = {
        "generator": "crate/tests/reference/gp.py",
        "numpy_version": np.__version__,
        "mpmath_version": mpmath.__version__,
        "gp_cases": cases,
        "ei_cases": ei,
    }
    path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "gp_fixture.json")
    with open(path, "w") as fh:
        json.dump(out, fh, indent=1)
        fh.write("\n")


if __name__ == "__main__":
    main()
