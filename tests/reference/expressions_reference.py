#!/usr/bin/python3
"""Reference values for the deck expression language (tests/RateDeck.Tests/Expressions).

Each case is a deck expression, the variable values, and the value of the same formula
evaluated with NumPy / SciPy (scipy.special.gamma and erf are the Cephes implementations).
Run with Debian's Python: /usr/bin/python3 tests/reference/expressions_reference.py
It writes tests/reference/fixtures/expressions.json and records the library versions there.
"""
import json
import os
import sys

import numpy as np
import scipy
from scipy import special

CASES = []


def case(expression, variables, value, rel_tol):
    CASES.append({
        "expression": expression,
        "variables": variables,
        "value": float(value),
        "relativeTolerance": rel_tol,
    })


# Gamma function on both sides of the poles, at half-integers and up to the overflow limit
# (171.62). The solver's Lanczos evaluation loses accuracy as |x| grows, hence the tolerances.
for x in [0.001, 0.1, 0.5, 1.0, 1.5, 2.5, 3.7, 5.0, 10.3]:
    case("gamma(x)", {"x": x}, special.gamma(x), 1e-14)
for x in [-0.5, -1.5, -2.7, -10.2]:
    case("gamma(x)", {"x": x}, special.gamma(x), 5e-14)
for x in [30.0, 100.5, 140.0, 169.0, 170.5, 171.0, 171.6, -30.5]:
    case("gamma(x)", {"x": x}, special.gamma(x), 2e-13)

# Error function: small arguments (series), the middle, and the tail towards 1.
for x in [-3.0, -1.0, -0.5, 0.0, 1e-10, 0.01, 0.1, 0.5, 1.0, 1.5, 2.0, 3.5, 6.0]:
    case("erf(x)", {"x": x}, special.erf(x), 1e-15)

# Kernels and weights of the kind model decks use, written once in deck syntax and once in NumPy.
for x, y, a, s in [(1.0, 2.0, 3.0, 0.5), (10.0, 9.5, 0.25, 2.0), (0.3, 0.1, 1.0, 0.05)]:
    v = {"x": x, "y": y, "a": a, "s": s}
    case("a*exp(-(x-y)^2/(2*s^2))/sqrt(2*pi*s^2)", v,
         a * np.exp(-(x - y) ** 2 / (2 * s ** 2)) / np.sqrt(2 * np.pi * s ** 2), 1e-14)
    case("a*(y/x)^(-5/3)*erf(abs(x-y)/s)", v,
         a * (y / x) ** (-5.0 / 3.0) * special.erf(abs(x - y) / s), 1e-14)
    case("log10(x)+atan2(y,x)-tanh(x/y)+cosh(s)*sinh(-s)", v,
         np.log10(x) + np.arctan2(y, x) - np.tanh(x / y) + np.cosh(s) * np.sinh(-s), 1e-14)
    case("max(x,y,a)-min(x,y,s)+pow(x,s)*tan(s)/cos(y)", v,
         max(x, y, a) - min(x, y, s) + np.power(x, s) * np.tan(s) / np.cos(y), 1e-14)

# Isotropic shell measure S_(d-1) x^(d-1) with S_(d-1) = 2 pi^(d/2) / Gamma(d/2) (SPEC 2).
for d in [1, 2, 3, 4, 7]:
    for x in [0.5, 2.0]:
        case("2*pi^(d/2)/gamma(d/2)*x^(d-1)", {"x": x, "d": float(d)},
             2 * np.pi ** (d / 2) / special.gamma(d / 2) * x ** (d - 1), 1e-14)

fixture = {
    "source": "tests/reference/expressions_reference.py",
    "python": sys.version.split()[0],
    "numpy": np.__version__,
    "scipy": scipy.__version__,
    "cases": CASES,
}
path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "fixtures", "expressions.json")
with open(path, "w", encoding="utf-8") as out:
    json.dump(fixture, out, indent=1)
    out.write("\n")
print(f"wrote {len(CASES)} cases to {path}")
