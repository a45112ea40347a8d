#!/usr/bin/python3
"""Reference values of the complete elliptic integrals K(m) and E(m) for the pendulum tests
(tests/RateDeck.Tests/Mechanics/PendulumTests.cs), computed with Debian's SciPy.

m = k^2 = sin^2(theta0 / 2) for the amplitudes theta0 used by the tests, plus the parameters of the
handbook values the tests quote. Run from the repository root:

    /usr/bin/python3 tests/reference/mechanics_elliptic.py

It writes tests/reference/fixtures/mechanics/elliptic-integrals.json with the library versions.
"""
import json
import math
import pathlib
import platform

import numpy
import scipy
from scipy.special import ellipe, ellipk

AMPLITUDES_DEGREES = [1, 10, 30, 60, 90, 120, 150, 170, 179, 179.9]
HANDBOOK_PARAMETERS = [0.1, 0.5, 0.9, 0.99]


def case(m, amplitude=None):
    entry = {"m": m, "K": float(ellipk(m)), "E": float(ellipe(m))}
    if amplitude is not None:
        entry = {"amplitude_degrees": amplitude, **entry}
    return entry


def main():
    cases = [case(math.sin(math.radians(a) / 2) ** 2, a) for a in AMPLITUDES_DEGREES]
    cases += [case(m) for m in HANDBOOK_PARAMETERS]
    fixture = {
        "description": "complete elliptic integrals K(m), E(m), parameter m = k^2 (scipy.special.ellipk, ellipe)",
        "generator": "tests/reference/mechanics_elliptic.py",
        "python": platform.python_version(),
        "scipy": scipy.__version__,
        "numpy": numpy.__version__,
        "cases": cases,
    }
    out = pathlib.Path(__file__).parent / "fixtures" / "mechanics" / "elliptic-integrals.json"
    out.parent.mkdir(parents=True, exist_ok=True)
    out.write_text(json.dumps(fixture, indent=2) + "\n", encoding="utf-8")
    print(f"wrote {out}")


if __name__ == "__main__":
    main()
