#!/usr/bin/env python3
"""Independent reference values for mixwell's convergence diagnostics (crate/src/diag).

Written from the description of the method in
    A. Vehtari, A. Gelman, D. Simpson, B. Carpenter, P.-C. Buerkner (2021), "Rank-normalization,
    folding, and localization: an improved R-hat for assessing convergence of MCMC",
    Bayesian Analysis 16(2), 667-718,
with Geyer's (1992) initial positive / monotone sequence truncation, as laid out step by step in
/work/shared/references/REFERENCES.md sections 3.1 and 4. It deliberately takes a different route
from the Rust code wherever one exists: ranks from scipy.stats.rankdata, normal quantiles from
scipy.special.ndtri, autocovariances by the direct O(N^2) sum (np.correlate, no FFT), Beta quantiles
from scipy.stats.beta.ppf.

Conventions (the same choices mixwell documents in crate/src/diag/mod.rs):
  * split: halves x[:N//2] and x[N - N//2:]; for odd N the middle draw is dropped;
  * pooled point statistics (median for folding, quantiles for the tail indicators, the sorted draws
    of the quantile MCSE, mean and sd) use every draw, including a dropped middle one;
  * rank normalisation pools the split draws only;
  * the chain combination uses s_m^2 rho_{t,m} = c_{t,m} N/(N-1) (the paper's form);
  * P_0 = rho_0 + rho_1 is always kept; the paired sums stop at the first P_k <= 0 or when lag
    2k+1 would reach N; tau >= 1/log10(M N) (M, N of the split chains);
  * sd uses ddof = 1; quantiles use numpy's default "linear" rule (R type 7).

Rerun from the repository root (writes crate/tests/reference/diagnostics_fixture.json):
    python3 crate/tests/reference/diagnostics.py
Generated with Python 3.11.7, numpy 2.4.6, scipy 1.17.1.
"""

import json
import math
import os

import numpy as np
import scipy
from scipy import special, stats

HERE = os.path.dirname(os.path.abspath(__file__))


# ---------------------------------------------------------------------------------------------
# The method, step by step (REFERENCES.md section 3.1)
# ---------------------------------------------------------------------------------------------


def split(chains):
    """Step 1: every chain becomes two halves; an odd chain loses its middle draw."""
    n = chains.shape[1]
    h = n // 2
    return np.vstack([chains[:, :h], chains[:, n - h :]])


def rank_normalise(chains):
    """Step 2: pooled average ranks, Blom's (r - 3/8) / (S + 1/4), then the normal quantile."""
    s = chains.size
    ranks = stats.rankdata(chains.ravel(), method="average").reshape(chains.shape)
    return special.ndtri((ranks - 0.375) / (s + 0.25))


def rhat_classic(chains):
    """Step 3 (Gelman & Rubin 1992, BDA3 section 11.4)."""
    m, n = chains.shape
    means = chains.mean(axis=1)
    b = n * means.var(ddof=1)
    w = chains.var(axis=1, ddof=1).mean()
    var_plus = (n - 1) / n * w + b / n
    return math.sqrt(var_plus / w)


def autocovariance_direct(x):
    """c_t = (1/N) sum_{n} (x_n - mean)(x_{n+t} - mean), t = 0..N-1, by the direct sum."""
    n = len(x)
    d = x - x.mean()
    full = np.correlate(d, d, mode="full")
    return full[n - 1 :] / n


def combined_autocorrelation(chains):
    """Step 6b: rho_t = 1 - (W - mean_m s_m^2 rho_{t,m}) / var+."""
    m, n = chains.shape
    cov = np.array([autocovariance_direct(c) for c in chains])
    s2_rho = cov * n / (n - 1)
    means = chains.mean(axis=1)
    w = chains.var(axis=1, ddof=1).mean()
    b = n * means.var(ddof=1) if m > 1 else 0.0
    var_plus = (n - 1) / n * w + b / n
    return 1.0 - (w - s2_rho.mean(axis=0)) / var_plus


def ess(chains):
    """Step 6: Geyer's initial positive then monotone sequence on the combined autocorrelation."""
    m, n = chains.shape
    rho = combined_autocorrelation(chains)
    pairs = []
    k = 0
    while 2 * k + 1 <= n - 1:
        p = rho[2 * k] + rho[2 * k + 1]
        if k > 0 and p <= 0:
            break
        pairs.append(p)
        k += 1
    for k in range(1, len(pairs)):
        pairs[k] = min(pairs[k], pairs[k - 1])
    tau = -1.0 + 2.0 * sum(pairs)
    s = m * n
    tau = max(tau, 1.0 / math.log10(s))
    return s / tau


def rhat_bulk(chains):
    return rhat_classic(rank_normalise(split(chains)))


def rhat_folded(chains):
    folded = np.abs(chains - np.median(chains))
    return rhat_classic(rank_normalise(split(folded)))


def rhat(chains):
    return max(rhat_bulk(chains), rhat_folded(chains))


def bulk_ess(chains):
    return ess(rank_normalise(split(chains)))


def ess_quantile(chains, p):
    q = np.quantile(chains, p)  # numpy default: "linear" (R type 7)
    return ess(split((chains <= q).astype(float)))


def tail_ess(chains):
    return min(ess_quantile(chains, 0.05), ess_quantile(chains, 0.95))


def mean_ess(chains):
    return ess(split(chains))


def mcse_mean(chains):
    return chains.std(ddof=1) / math.sqrt(mean_ess(chains))


def mcse_quantile(chains, p):
    """REFERENCES.md section 4: the Beta-interval approach."""
    s_eff = ess_quantile(chains, p)
    beta = stats.beta(s_eff * p + 1, s_eff * (1 - p) + 1)
    a_lo = beta.ppf(special.ndtr(-1.0))
    a_hi = beta.ppf(special.ndtr(1.0))
    draws = np.sort(chains.ravel())
    s = len(draws)
    lo = draws[max(math.floor(a_lo * s), 1) - 1]
    hi = draws[min(math.ceil(a_hi * s), s) - 1]
    return (hi - lo) / 2.0


def autocorrelation_unsplit(chains, max_lag):
    """The chain-combined autocorrelation of the chains as given (no split), lags 0..max_lag."""
    return combined_autocorrelation(chains)[: max_lag + 1]


def everything(chains):
    all_draws = chains.ravel()
    return {
        "mean": float(all_draws.mean()),
        "sd": float(all_draws.std(ddof=1)),
        "q5": float(np.quantile(all_draws, 0.05)),
        "q50": float(np.quantile(all_draws, 0.5)),
        "q95": float(np.quantile(all_draws, 0.95)),
        "rhat_bulk": rhat_bulk(chains),
        "rhat_folded": rhat_folded(chains),
        "rhat": rhat(chains),
        "mean_ess": mean_ess(chains),
        "bulk_ess": bulk_ess(chains),
        "ess_q05": ess_quantile(chains, 0.05),
        "ess_q95": ess_quantile(chains, 0.95),
        "tail_ess": tail_ess(chains),
        "mcse_mean": mcse_mean(chains),
        "mcse_q05": mcse_quantile(chains, 0.05),
        "mcse_q50": mcse_quantile(chains, 0.5),
        "mcse_q95": mcse_quantile(chains, 0.95),
        "autocorrelation": [float(r) for r in autocorrelation_unsplit(chains, min(20, chains.shape[1] - 1))],
    }


# ---------------------------------------------------------------------------------------------
# Chain sets (invented test data)
# ---------------------------------------------------------------------------------------------


def ar1(rng, m, n, rho, shifts=None, scales=None):
    out = np.empty((m, n))
    for j in range(m):
        x = rng.standard_normal()
        for t in range(n):
            if t > 0:
                x = rho * x + math.sqrt(1 - rho * rho) * rng.standard_normal()
            out[j, t] = x
    if shifts is not None:
        out += np.asarray(shifts)[:, None]
    if scales is not None:
        out *= np.asarray(scales)[:, None]
    return out


def chain_sets():
    rng = np.random.default_rng(20210601)
    sets = {}
    sets["odd_length_4x101"] = ar1(rng, 4, 101, 0.6)
    sets["ties_4x150"] = np.round(ar1(rng, 4, 150, 0.5) * 2.0) / 2.0
    sets["one_chain_1x301"] = ar1(rng, 1, 301, 0.8)
    sets["eight_chains_8x60"] = ar1(rng, 8, 60, 0.3, shifts=[0, 0, 0, 0, 0, 0, 0.3, -0.2])
    sets["heavy_tailed_4x250"] = rng.standard_t(1.5, size=(4, 250))
    sets["scale_differs_4x200"] = ar1(rng, 4, 200, 0.4, scales=[1, 1, 1, 2.5])
    sets["antithetic_4x200"] = ar1(rng, 4, 200, -0.7)
    sets["shortest_4x6"] = ar1(rng, 4, 6, 0.2)
    return sets


def read_fixed(name):
    return np.loadtxt(os.path.join(HERE, name), delimiter=",", comments="#").T


# REFERENCES.md section 3.3, set A and set B: printed as a cross-check of this script.
TABLE_3_3 = {
    "A": {"rhat_bulk": 1.0171332701117752, "rhat_folded": 0.9988790498383022, "mean_ess": 123.26348776429424,
          "bulk_ess": 125.31631070329695, "ess_q05": 319.1577106176441, "ess_q95": 481.45742915350985,
          "mcse_mean": 0.08400030639653522, "mcse_q05": 0.11180061133806274, "mcse_q50": 0.08522539142205962},
    "B": {"rhat_bulk": 1.0519084796267724, "rhat_folded": 0.9987280249253517, "mean_ess": 74.58091127347073,
          "bulk_ess": 74.90849714241386, "ess_q05": 233.7997176370342, "ess_q95": 467.01182856880354,
          "mcse_mean": 0.11121803692158708, "mcse_q05": 0.12466323792857903, "mcse_q50": 0.11303364923154266},
}


def exact(value):
    """Inputs are written as shortest round-trip decimal strings: a reader's float parser that is
    only best-effort (serde_json's default) could otherwise be one ulp off, which breaks ties in
    the chains and moves p = 1 - 1e-15 noticeably. Expected outputs stay JSON numbers."""
    if isinstance(value, list):
        return [exact(v) for v in value]
    return repr(float(value))


def special_values():
    ps = [1e-300, 1e-20, 1e-10, 1e-5, 0.001, 0.02, 0.074, 0.075, 0.076, 0.2, 0.3, 0.5, 0.6, 0.8413447460685429,
          0.924, 0.925, 0.95, 0.975, 0.999, 1 - 1e-9, 1 - 1e-15]
    ndtri = [[exact(p), float(special.ndtri(p))] for p in ps]
    inc = [(2.5, 3.5, 0.3), (1.0, 1.0, 0.42), (0.5, 0.5, 0.9), (41.0, 761.0, 0.05), (5.0, 2.0, 0.99),
           (100.0, 300.0, 0.26), (1e4, 3e4, 0.2512), (0.1, 10.0, 0.001), (30.0, 30.0, 0.5), (400.5, 1.5, 0.997)]
    betainc = [exact([a, b, x]) + [float(special.betainc(a, b, x))] for a, b, x in inc]
    qs = [(41.0, 761.0, float(special.ndtr(-1.0))), (41.0, 761.0, float(special.ndtr(1.0))),
          (16.957885530882205, 304.19997005794189, 0.15865525393145707), (1.0, 1.0, 0.3), (2.0, 5.0, 0.5),
          (0.5, 0.5, 0.01), (63.6, 63.6, 0.84134474606854293), (2501.0, 47501.0, 0.1586552539314571),
          (475001.0, 25001.0, 0.8413447460685429), (1.2, 80.0, 0.999), (1.0, 1.0000001, 1e-12)]
    beta_ppf = [exact([a, b, q]) + [float(stats.beta.ppf(q, a, b))] for a, b, q in qs]
    return {"ndtri": ndtri, "betainc": betainc, "beta_ppf": beta_ppf}


def main():
    for label, fname in [("A", "fixed_chains_A.csv"), ("B", "fixed_chains_B.csv")]:
        got = everything(read_fixed(fname))
        worst = max(abs(got[k] / v - 1) for k, v in TABLE_3_3[label].items())
        print(f"set {label}: largest relative difference from REFERENCES.md 3.3 = {worst:.2e}")
    fixture = {
        "generator": "crate/tests/reference/diagnostics.py",
        "versions": {"numpy": np.__version__, "scipy": scipy.__version__},
        "chain_sets": [],
        "special": special_values(),
    }
    for name, chains in chain_sets().items():
        fixture["chain_sets"].append({"name": name, "chains": exact(chains.tolist()), "expected": everything(chains)})
    with open(os.path.join(HERE, "diagnostics_fixture.json"), "w") as f:
        json.dump(fixture, f, indent=1)
        f.write("\n")
    for entry in fixture["chain_sets"]:
        e = entry["expected"]
        print(f"{entry['name']:>22}: rhat {e['rhat']:.5f} bulk {e['bulk_ess']:.2f} tail {e['tail_ess']:.2f} "
              f"basic {e['mean_ess']:.2f}")


if __name__ == "__main__":
    main()
