#!/usr/bin/env python3
"""Writes the fuzzers' seed corpus: every example model, small variations that reach each
family, function, support and index form, and a few near-misses that fail in the checker.

Rerun from crate/fuzz with `python3 make_seeds.py` (Python 3.11, standard library only); it
rewrites seeds/parse_check_compile and seeds/evaluate. The variations are invented toy models.
"""
import hashlib
import pathlib
import struct

HERE = pathlib.Path(__file__).resolve().parent
EXAMPLES = HERE.parent.parent / "examples"

VARIATIONS = [
    # every univariate family, with its variate as data or as a parameter
    "y = [0.5, 1.5, 2.5]\nm : real\ns : positive\ndensity = normal(m; 0, 1) * halfnormal(s; 1) * normal(y; m, s)\n",
    "y = [0.5, -1.5]\nnu : above(1)\nm : real\ndensity = gamma(nu; 2, 0.1) * student_t(y; nu, m, 1)\n",
    "y = [0.5, -1.5]\nm : real\nb : positive\ndensity = cauchy(y; m, b) * laplace(m; 0, b) * logistic(m; 0, 2)\n",
    "t = [0.2, 1.1, 3.0]\nr : positive\ndensity = exponential(t; r) * gamma(r; 2, 2) * inv_gamma(r; 3, 1)\n",
    "p = [0.1, 0.9]\na : positive\nb : positive\ndensity = beta(p; a, b) * lognormal(a; 0, 1) * weibull(b; 2, 1)\n",
    "u : between(-2, 3)\nw : real\ndensity = uniform(u; -2, 3) * uniform(1; w, w + 2) * halfcauchy(3; 1)\n",
    "k = [0, 3, 7]\nn = [10, 10, 10]\nlam : positive\np : unit\ndensity = poisson(k; lam) * binomial(k; n, p) * negbinomial(k; lam, 2)\n",
    "y = [1, 0, 1, 1]\np : unit\na : real\ndensity = bernoulli(y; p) * bernoulli(y; logistic(a)) * normal(a; 0, 1)\n",
    # links written as on paper, with an exposure
    "k = [0, 3, 7]\nn = [10, 10, 10]\ne = [1, 2, 3]\nb : real\ndensity = normal(b; 0, 1) * binomial(k; n, logistic(b))"
    " * poisson(k; e * exp(b))\n",
    # functions, element-wise arithmetic, reductions, derived quantities
    "x : real[3]\nv = [1, 2, 3]\nd = exp(x) + log1p(v) - expm1(x) * sqrt(v) / abs(x) ^ 2\n"
    "e = lgamma(v) + logistic(x) + logit(0.3) + sin(x) + cos(x) + pow(v, 2)\n"
    "f = sum(x) + mean(x) + min(x) + max(x) + min(x, v) + max(v, x) + dot(x, v)\n"
    "density = normal(x; 0, 1) * exp(-sum(d ^ 2) / 100)\n",
    # indexing, matrices, matrix–vector products, lists of parameters
    "M = [[1, 2, 3], [4, 5, 6]]\ni = [2, 1]\nb : real[3]\nfit = matvec(M, b)\n"
    "row = M[2]\ncell = M[1, 3]\nsub = M[i, [1, 3]]\ncol = M[i, 2]\nst = [b[1], b[2] * 2, fit[i[1]]]\n"
    "density = normal(b; 0, 1) * normal(fit; 0, 10) * normal(st; 0, 5)\n",
    # the multivariate normal, broadcast means and powers of factors
    "C = [[2, 0.5, 0], [0.5, 1, 0.2], [0, 0.2, 3]]\nz : real[3]\nm : real\n"
    "density = mvnormal(z; m, C) * mvnormal(z; [1, 2, 3], C)^0.5 * normal(m; 0, 1)\n",
    # mixtures and quotients of factors, constants in factors, supports with expressions
    "x : real\nw = 0.3\ndensity = w * normal(x; -2, 1) + (1 - w) * normal(x; 2, 1) / 2\n",
    "lo = 2\na : above(lo * 2)\nb : below(-lo)\nc : between(lo, lo ^ 2)[2]\n"
    "density = exp(-(a - 5) ^ 2) * exp(-(b + 3) ^ 2) * normal(c; 3, 1) * 3\n",
    "n = 4\nb : real[n]\nlevel = b + [1, 2, 3, 4]\ndensity = normal(b; 0, 1) * normal(level; 0, 2)\n",
    # ranges, slices, running sums, differences, lengths, `for` forms, intermediates, `report`
    "y = [1.2, 0.4, -0.3, 0.8, 1.9, 1.1]\nn = length(y)\nphi : between(-1, 1)\ns : positive\n"
    "m = phi * y[1:n-1]\nreport last = m[n-1]\ndensity = normal(y[2:]; m, s) * normal(diff(y); 0, 5) * halfnormal(s; 1)\n",
    "y = [3, 1, 4, 1, 5, 2, 0, 1]\nn = 8\nS = cumsum(y)\na : positive\nb : positive\n"
    "density = gamma(a; 2, 1) * gamma(b; 2, 1) * mean(poisson(y[1:c]; a) * poisson(y[c+1:n]; b) for c in 1:n)\n",
    "y = [-1.5, 2.2, 1.9, -2.4]\nw : unit\nm : real[2]\n"
    "density = normal(m; 0, 5) * prod((1 - w) * normal(y[i]; m[1], 1) + w * normal(y[i]; m[2], 1) for i in 1:4)\n",
    "M = [[1, 2], [3, 4], [5, 6]]\nb : real[2]\nrows = [sum(r * b) for r in M]\nv = [logsumexp([x, 0]) for x in b]\n"
    "density = normal(b; 0, 1) * normal(rows; 0, 10) * exp(-sum(v[k] ^ 2 for k in 1:2)) * normal(M[:, 1][2:]; b[1], 4)\n",
    # near-misses: each fails in the checker with a diagnostic
    "mu : real\nsigma : positve\ndensity = normal(mu; 0, sigma)\n",
    "x = [1, 2]\ny = [1, 2, 3]\nm : real\ndensity = normal(x; m, 1) * normal(y; x, 1)\n",
    "M = [[1, 2], [3, 4]]\nm : real\ndensity = normal(m; M[3, 1], 1)\n",
    "m : real\ndensity = normal(m; 0, 1)\ndensity = normal(m; 1, 1)\n",
    "k = [0.5]\nl : positive\ndensity = poisson(k; l)\n",
    "a : real\nb = a\ndensity = normal(a; 0, 1) * normal(c; b, 1)\n",
    "y = [1, 2, 3]\nw : unit\ndensity = w * normal(y; 0, 1) + (1 - w) * normal(y; 2, 1)\n",
    "x : real\ny : real\ndensity = normal(x; 0, 1)\n",
    "y = [1, 2]\nm : real\ndensity = normal(y[3:]; m, 1) * sum(y[i:] for i in 1:2)\nfor i in 1:2 {\n}\n",
]

# θ blocks for the evaluate target: ordinary, hostile and mixed coordinates.
THETAS = [
    [],
    [0.3, -1.2, 2.5],
    [float("nan")],
    [float("inf"), float("-inf")],
    [1e308, -1e308, 5e-324],
    [745.2, -745.2, 709.8, -40.0],
]


def write(folder: pathlib.Path, data: bytes) -> None:
    folder.mkdir(parents=True, exist_ok=True)
    (folder / hashlib.sha1(data).hexdigest()).write_bytes(data)


def main() -> None:
    models = [p.read_text() for p in sorted(EXAMPLES.glob("*.mw"))] + VARIATIONS
    for name in ("parse_check_compile", "evaluate"):
        for old in (HERE / "seeds" / name).glob("*"):
            old.unlink()
    for text in models:
        write(HERE / "seeds" / "parse_check_compile", text.encode())
        for theta in THETAS:
            block = bytes([len(theta)]) + b"".join(struct.pack("<d", v) for v in theta)
            write(HERE / "seeds" / "evaluate", block + text.encode())


if __name__ == "__main__":
    main()
