#!/usr/bin/python3
"""Reference populations and slow eigenvalues for RateDeck's stiff decks (docs/stiff-decks.md).

Run with Debian's interpreter from the repository root:

    /usr/bin/python3 tests/reference/make_stiff_fixtures.py

It writes tests/reference/fixtures/stiff.json with the mpmath version. Each case is a birth-death
chain as its deck states it: energies E_i, kT, unit weights, measured downward rates between
neighbours, the upward rates completed by detailed balance as k_up = k_down exp(-(E_hi - E_lo)/kT).
The generator K (K[i][j] is the rate from state j to state i) is built in mpmath at 90 significant
digits from the decimal rates, and P(t) = expm(K t) P(0) is taken from mpmath.expm (scaling and
squaring at that precision; ||K t|| reaches 1e20, so the 90 digits leave more than 60). A second
route, the eigen-decomposition of the symmetrized S = D^-1/2 K D^1/2 by mpmath.eigsy at the same
precision, must agree to 1e-40 relative on every population above 1e-30, or the script stops.
The eigenvalues come from that decomposition, sorted by decay rate.
"""
import json
import pathlib

import mpmath

mpmath.mp.dps = 90

CASES = [
    {
        "name": "stiff-three",
        "energies": [0, 1, 2],
        "kT": 1,
        "down": ["1", "1e15"],  # b -> a, c -> b (bottom pair first)
        "initial": 2,
        "times": [1e-3, 1.0, 10.0],
    },
    {
        "name": "stiff-six",
        "energies": [0, 1, 2, 3, 4, 5],
        "kT": 1,
        "down": ["1e-6", "1e12", "1e-2", "1e9", "1"],
        "initial": 5,
        "times": [10.0 ** (-9 + 3.4 * k) for k in range(6)],
    },
]


def generator(case):
    n = len(case["energies"])
    k = mpmath.zeros(n, n)
    for lower, rate in enumerate(case["down"]):
        upper = lower + 1
        down = mpmath.mpf(rate)
        gap = mpmath.mpf(case["energies"][upper]) - mpmath.mpf(case["energies"][lower])
        k[lower, upper] = down
        k[upper, lower] = down * mpmath.exp(-gap / mpmath.mpf(case["kT"]))
    for j in range(n):
        k[j, j] = -sum(k[i, j] for i in range(n) if i != j)
    return k


def main():
    out = {"library": "mpmath", "mpmath": mpmath.__version__, "digits": mpmath.mp.dps, "cases": []}
    for case in CASES:
        k = generator(case)
        n = k.rows
        p0 = mpmath.zeros(n, 1)
        p0[case["initial"]] = 1
        pi = [mpmath.exp(-mpmath.mpf(e) / case["kT"]) for e in case["energies"]]
        d = [mpmath.sqrt(x) for x in pi]
        s = mpmath.matrix(n, n)
        for i in range(n):
            for j in range(n):
                s[i, j] = k[i, j] * d[j] / d[i]
        values, vectors = mpmath.eigsy(s)
        populations = []
        for t in case["times"]:
            p = mpmath.expm(k * mpmath.mpf(t)) * p0
            coefficients = vectors.T * mpmath.matrix([p0[i] / d[i] for i in range(n)])
            q = vectors * mpmath.matrix([mpmath.exp(values[m] * t) * coefficients[m] for m in range(n)])
            for i in range(n):
                second = q[i] * d[i]
                if abs(p[i]) > mpmath.mpf("1e-30") and abs(second - p[i]) > mpmath.mpf("1e-40") * abs(p[i]):
                    raise SystemExit(f"{case['name']}: expm and eigsy disagree at t = {t}, state {i}")
            populations.append([mpmath.nstr(p[i], 30) for i in range(n)])
        rates = sorted(-v for v in values)
        out["cases"].append({
            "name": case["name"],
            "times": case["times"],
            "populations": populations,
            "decay_rates": [mpmath.nstr(r, 30) for r in rates],
        })
    path = pathlib.Path(__file__).parent / "fixtures" / "stiff.json"
    path.write_text(json.dumps(out, indent=1) + "\n")
    print(f"wrote {path} (mpmath {mpmath.__version__})")


if __name__ == "__main__":
    main()
