#!/usr/bin/env python3
"""Bands for the ESS of the mean that `mixwell diagnose` reports on AR(1) chains (tests/cli/diagnose.rs).

For a stationary AR(1), x_t = rho x_{t-1} + sqrt(1 - rho^2) e_t, the autocorrelation at lag k is rho^k,
so the integrated autocorrelation time is tau = (1 + rho)/(1 - rho) and the ESS of the mean of S draws
is S (1 - rho)/(1 + rho) (Geyer 1992, "Practical Markov chain Monte Carlo", Statistical Science 7(4),
section 3). An estimate from finite chains scatters around it; this script measures how far, by
simulation, with the independent reference implementation of the estimator in
crate/tests/reference/diagnostics.py (split chains, Geyer's initial monotone sequence; REFERENCES.md
section 3.1, step 9: the "basic" ESS of the raw draws, the one behind MCSE(mean)). The report gives the
estimate as (sd / mcse_mean)^2.

For 4 chains x 2500 draws and each rho, 2000 replicates give the ratio estimate/theory: its mean and sd,
and its 0.05% and 99.95% quantiles (a one-in-a-thousand band for a single run). The band for an average
of 20 independent runs is mean +- 4 sd / sqrt(20).

Rerun from the repository root (writes tests/cli/reference/ar1_mean_ess.json, about a minute):
    python3 tests/cli/reference/ar1_mean_ess.py
Generated with Python 3.11, numpy 2.4.6, scipy 1.17.1 (crate/tests/reference/requirements.txt).
"""

import json
import math
import os
import sys

import numpy as np
from scipy import signal

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.join(HERE, "..", "..", "..", "crate", "tests", "reference"))
from diagnostics import mean_ess  # noqa: E402

CHAINS, DRAWS, REPLICATES, AVERAGED = 4, 2500, 2000, 20


def ar1(rng, rho):
    """CHAINS stationary AR(1) chains of DRAWS draws (x_0 ~ N(0, 1))."""
    e = rng.standard_normal((CHAINS, DRAWS))
    e[:, 1:] *= math.sqrt(1 - rho * rho)
    return signal.lfilter([1.0], [1.0, -rho], e, axis=1)


def main():
    rng = np.random.default_rng(19920401)
    bands = []
    for rho in [0.0, 0.5, 0.9]:
        theory = CHAINS * DRAWS * (1 - rho) / (1 + rho)
        ratios = np.array([mean_ess(ar1(rng, rho)) / theory for _ in range(REPLICATES)])
        mean, sd = float(ratios.mean()), float(ratios.std(ddof=1))
        lo, hi = (float(q) for q in np.quantile(ratios, [0.0005, 0.9995]))
        half = 4 * sd / math.sqrt(AVERAGED)
        bands.append({"rho": rho, "theory": theory, "mean": mean, "sd": sd, "single": [lo, hi],
                      "average_of_20": [mean - half, mean + half]})
        print(f"rho {rho}: ESS/theory mean {mean:.4f} sd {sd:.4f}, single run [{lo:.3f}, {hi:.3f}], "
              f"20-run average [{mean - half:.3f}, {mean + half:.3f}]")
    out = {"source": "tests/cli/reference/ar1_mean_ess.py", "chains": CHAINS, "draws": DRAWS,
           "replicates": REPLICATES, "bands": bands}
    with open(os.path.join(HERE, "ar1_mean_ess.json"), "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
