#!/usr/bin/env python3
"""Profile-likelihood intervals of NIST StRD Misra1a, y = b1 (1 - exp(-b2 x)), computed with SciPy.

The data are tests/reference/fixtures/nist/misra1a.csv (NIST's Misra1a.dat, public domain). The
least-squares fit starts at NIST's certified values (scipy.optimize.least_squares, Levenberg-Marquardt, tolerances at
rounding). With no standard deviations given, an interval at level L holds the values v of one
parameter whose profile RSS (the RSS minimised over the other parameter with this one fixed at v)
stays below RSS_min (1 + F(L; 1, n - p) / (n - p)), F the F distribution's quantile
(scipy.stats.f.ppf). The profile over b1 with b2 fixed is linear least squares (closed form); over
b2 with b1 fixed a bounded scalar minimisation (scipy.optimize.minimize_scalar, xatol at rounding).
Each end is the root of profile RSS - threshold (scipy.optimize.brentq, xtol 1e-14 relative).
Writes tests/reference/fixtures/profile-misra1a.json with the library versions.
Run: /usr/bin/python3 tests/reference/make_profile_fixtures.py
"""
import json
import os
import sys

import numpy as np
import scipy
import scipy.optimize
import scipy.stats

ROOT = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
FIXTURE = os.path.join(ROOT, "tests", "reference", "fixtures", "profile-misra1a.json")
LEVELS = [0.95, 0.6827]


def main():
    rows = [r for r in open(os.path.join(ROOT, "tests", "reference", "fixtures", "nist", "misra1a.csv")) if r[0].isdigit()]
    x, y = np.array([[float(v) for v in r.split(",")] for r in rows]).T
    model = lambda b1, b2: b1 * (1 - np.exp(-b2 * x))
    residuals = lambda b: model(b[0], b[1]) - y
    fit = scipy.optimize.least_squares(residuals, [2.3894212918e02, 5.5015643181e-04], method="lm", xtol=1e-15, ftol=1e-15, gtol=1e-15, x_scale=[100, 1e-4])
    b = fit.x
    rss = float(np.sum(residuals(b) ** 2))
    n, p = len(y), 2
    dof = n - p
    jac = fit.jac
    cov = rss / dof * np.linalg.inv(jac.T @ jac)
    se = np.sqrt(np.diag(cov))

    def profile_rss(j, v):
        if j == 0:  # b1 fixed: minimise over b2
            f = lambda b2: np.sum((model(v, b2) - y) ** 2)
            r = scipy.optimize.minimize_scalar(f, bounds=(b[1] * 0.2, b[1] * 5), method="bounded", options={"xatol": 1e-16})
            return r.fun
        f = 1 - np.exp(-v * x)  # b2 fixed: b1 by linear least squares
        b1 = np.dot(f, y) / np.dot(f, f)
        return np.sum((b1 * f - y) ** 2)

    result = {
        "source": "tests/reference/make_profile_fixtures.py (SciPy least_squares, minimize_scalar, brentq, stats.f.ppf)",
        "numpy": np.__version__,
        "scipy": scipy.__version__,
        "python": sys.version.split()[0],
        "estimates": {"scale": b[0], "rate": b[1]},
        "std_errors": {"scale": se[0], "rate": se[1]},
        "rss": rss,
        "levels": {},
    }
    for level in LEVELS:
        threshold = rss * (1 + scipy.stats.f.ppf(level, 1, dof) / dof)
        ends = {}
        for j, name in enumerate(["scale", "rate"]):
            g = lambda v: profile_rss(j, v) - threshold
            lower = scipy.optimize.brentq(g, b[j] - 10 * se[j], b[j], xtol=1e-14 * abs(b[j]), rtol=1e-15)
            upper = scipy.optimize.brentq(g, b[j], b[j] + 10 * se[j], xtol=1e-14 * abs(b[j]), rtol=1e-15)
            ends[name] = [lower, upper]
            print(f"level {level}: {name} {b[j]:.10g} in [{lower:.10g}, {upper:.10g}] (covariance +- t se: +-{scipy.stats.t.ppf((1 + level) / 2, dof) * se[j]:.4g})")
        result["levels"][str(level)] = {"rss_threshold": threshold, "intervals": ends}
    json.dump(result, open(FIXTURE, "w"), indent=1)
    print("wrote", FIXTURE)


if __name__ == "__main__":
    main()
