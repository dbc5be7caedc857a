"""Reference log densities of the example models, written independently with scipy.stats.

Each example in examples/ is re-expressed here by hand with scipy's distributions, evaluated at a
fixed point, and written to example_densities.json for tests/cli/commands.rs, which compares
`mixwell density --json` with these values to 1e-10 relative.

Rerun (from the repository root):  python3 tests/cli/reference/example_densities.py
Needs numpy and scipy (versions are recorded in the output).
"""

import json
import pathlib

import numpy as np
import scipy
from scipy import stats
from scipy.special import expit

HERE = pathlib.Path(__file__).resolve().parent


def bakery():
    rise = np.array([212, 198, 225, 240, 205, 219, 231, 201, 214, 227, 209, 236], float)
    mu, sigma = 215.0, 12.0
    lp = stats.norm.logpdf(mu, 200, 50) + stats.halfnorm.logpdf(sigma, scale=30)
    lp += stats.norm.logpdf(rise, mu, sigma).sum()
    return {"mu": [mu], "sigma": [sigma]}, lp, np.log(sigma)


def cycling_club():
    finished = np.array([1, 1, 0, 1, 0, 1, 1, 0, 1, 1, 0, 0, 1, 1, 1, 0, 1, 0, 1, 1])
    rider = np.array([[2.0, -1.1, 1], [1.5, 0.3, 1], [-2.0, 1.2, 0], [0.5, -0.4, 1],
                      [-3.0, 0.8, 0], [3.5, -0.9, 1], [0.0, 0.1, 1], [-1.5, 1.5, 0],
                      [1.0, -0.2, 0], [2.5, 0.6, 1], [-2.5, -0.3, 0], [-0.5, 2.0, 1],
                      [4.0, 0.4, 1], [0.5, -1.3, 0], [1.5, 0.9, 1], [-1.0, 0.2, 0],
                      [3.0, -0.6, 0], [-3.5, -1.0, 1], [0.5, 0.5, 1], [2.0, 1.1, 1]])
    intercept, effect = 0.3, np.array([0.8, -0.5, 1.1])
    eta = intercept + rider @ effect
    lp = stats.norm.logpdf(intercept, 0, 2.5) + stats.norm.logpdf(effect, 0, 1).sum()
    lp += stats.bernoulli.logpmf(finished, expit(eta)).sum()
    return {"intercept": [intercept], "effect": effect.tolist()}, lp, 0.0


def river_gauge():
    peak = np.array([148, 131, 162, 120, 139, 171], float)
    stderr = np.array([12, 9, 15, 10, 14, 18], float)
    level, spread = 140.0, 10.0
    offset = np.array([0.4, -0.9, 1.2, -1.6, 0.1, 2.0])
    station = level + spread * offset
    lp = stats.norm.logpdf(level, 140, 40) + stats.halfcauchy.logpdf(spread, scale=15)
    lp += stats.norm.logpdf(offset, 0, 1).sum() + stats.norm.logpdf(peak, station, stderr).sum()
    return {"level": [level], "spread": [spread], "offset": offset.tolist()}, lp, np.log(spread)


def beehives():
    swarms = np.array([0, 2, 1, 0, 4, 1, 0, 3, 1, 0, 0, 6, 2, 1])
    rate, dispersion = 1.6, 2.5
    lp = stats.gamma.logpdf(rate, a=2, scale=1 / 1) + stats.expon.logpdf(dispersion, scale=1 / 0.2)
    lp += stats.nbinom.logpmf(swarms, n=dispersion, p=dispersion / (rate + dispersion)).sum()
    return {"rate": [rate], "dispersion": [dispersion]}, lp, np.log(rate) + np.log(dispersion)


def orchard():
    cov = np.array([[4.0, 2.4], [2.4, 9.0]])
    effect, boost = np.array([0.5, 2.5]), 0.3
    lp = stats.multivariate_normal.logpdf(effect, [1, 2], cov) + stats.beta.logpdf(boost, 2, 5)
    lp += -0.5 * ((effect[0] + effect[1]) * boost - 1.5) ** 2
    return {"effect": effect.tolist(), "boost": [boost]}, lp, np.log(boost) + np.log1p(-boost)


def main():
    cases = []
    for name, fn in [("bakery", bakery), ("cycling_club", cycling_club), ("river_gauge", river_gauge),
                     ("beehives", beehives), ("orchard", orchard)]:
        at, lp, log_jacobian = fn()
        cases.append({"example": f"{name}.mw", "at": at, "log_density": float(lp),
                      "log_density_unconstrained": float(lp + log_jacobian)})
    out = {"generator": "tests/cli/reference/example_densities.py",
           "numpy": np.__version__, "scipy": scipy.__version__, "cases": cases}
    (HERE / "example_densities.json").write_text(json.dumps(out, indent=1) + "\n")


if __name__ == "__main__":
    main()
