#!/usr/bin/env python3
"""Reference sensitivities dP_i(t)/d(theta) of the exact trajectory for two demo decks.

Builds the models of decks/cascade.toml and decks/pendulum-ladder.toml independently of RateDeck,
from the deck files' own numbers (read with tomllib, rates from the CSV), in NumPy/SciPy:
  - states, energies, weights (isotropic shell measure 4 pi x^2 dx; for the pendulum the period
    T(E) = 4 sqrt(len/g0) K(E / (2 m g0 len)) of the plane pendulum, scipy.special.ellipk, over h),
    ln pi = ln g - E/kT - ln Z, rates given one way (CSV or kernel within its band) completed by
    detailed balance, the diagonal from the columns and the losses, pumping and P(0);
  - P(t) = expm(A t) [P(0); 1] with the augmented generator A = [[K, s], [0, 0]];
  - dP/dtheta = Frechet derivative of expm at A t in the direction (dA/dtheta) t applied to
    [P(0); 1], plus expm(A t) [dP(0)/dtheta; 0] (scipy.linalg.expm_frechet), where dA/dtheta and
    dP(0)/dtheta come from the complex step (theta + i 1e-30: no subtraction, exact to rounding);
  - checked against the complex step taken through the whole trajectory (expm of the complex
    augmented matrix): the two agree to 1e-9 relative or the script stops.
Also, with mpmath at 50 digits: the divided differences exp[a, b] and exp[a, b, 0] at node pairs
from far apart to equal (the nearly equal case the program treats by series), and derivatives of
deck expressions (mpmath.diff) for the symbolic differentiation.
Writes tests/reference/fixtures/sensitivities.json: for each deck and free value, the output
times, the states reported and dP/dtheta there; the divided differences; the expression
derivatives; the library versions.
Run: /usr/bin/python3 tests/reference/make_sensitivity_fixtures.py
"""
import csv
import json
import os
import sys
import tomllib

import mpmath
import numpy as np
import scipy
import scipy.linalg
import scipy.special

ROOT = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
H = 1e-30  # complex step


def grid(states):
    n, lo, hi = states["count"], states["from"], states["to"]
    if states["spacing"] == "log":
        d = np.log(hi / lo) / (n - 1)
        x = lo * np.exp(np.arange(n) * d)
        x[-1] = hi
        return x, x * d
    x = lo + np.arange(n) * (hi - lo) / (n - 1)
    x[-1] = hi
    return x, np.full(n, (hi - lo) / (n - 1))


def output_times(run):
    n, end = run["outputs"], run["t_end"]
    first = run["t_first"]
    step = (np.log(end) - np.log(first)) / (n - 1)
    times = [0.0, first] + [float("%.12g" % np.exp(np.log(first) + (k - 1) * step)) for k in range(2, n)] + [end]
    return np.array(times)


def log_pi(log_g, energies, kT):
    u = log_g - energies / kT
    m = np.max(u.real)
    return u - (m + np.log(np.sum(np.exp(u - m))))


def complete(n, pairs, lpi):
    """pairs: (from, to, rate) given one way; K[to, from] = rate, K[from, to] = rate pi_from / pi_to."""
    K = np.zeros((n, n), dtype=complex)
    for f, t, r in pairs:
        K[t, f] = r
        K[f, t] = r * np.exp(lpi[f] - lpi[t])
    return K


def augmented(K, loss, pump):
    n = K.shape[0]
    K = K.copy()
    for j in range(n):
        K[j, j] = 0
        K[j, j] = -np.sum(K[:, j]) - loss[j]
    A = np.zeros((n + 1, n + 1), dtype=complex)
    A[:n, :n] = K
    A[:n, n] = pump
    return A


def load(name, values):
    """The deck file's values, its parameters (and kT) with `values` put in, the grid and the labels."""
    deck = tomllib.load(open(os.path.join(ROOT, "decks", name), "rb"))
    p = dict(deck["parameters"], kT=deck["temperature"]["kT"])
    p.update(values)
    x, dx = grid(deck["states"])
    labels = [f"{deck['states']['label_prefix']}{i + 1}" for i in range(len(x))]
    return deck, p, x, dx, len(x), labels


def cascade(values):
    deck, p, x, dx, n, labels = load("cascade.toml", values)
    log_g = np.log(4 * np.pi * x**2 * dx)
    energies = p["beta"] * x**2
    lpi = log_pi(log_g, energies, p["kT"])
    rows = [r for r in open(os.path.join(ROOT, "decks", "cascade-rates.csv")) if not r.startswith("#")]
    pairs = [(labels.index(r["from"]), labels.index(r["to"]), float(r["rate"])) for r in csv.DictReader(rows)]
    loss = np.zeros(n, dtype=complex)
    for label, rate in deck["losses"]["by_state"].items():
        loss[labels.index(label)] = p.get(f"loss.{label}", rate)
    pump = np.zeros(n, dtype=complex)
    for label, rate in deck["pumping"]["by_state"].items():
        pump[labels.index(label)] = p.get(f"pumping.{label}", rate)
    A = augmented(complete(n, pairs, lpi), loss, pump)
    p0 = np.zeros(n + 1, dtype=complex)
    p0[n] = 1
    return A, p0, labels, output_times(deck["run"]), deck["run"]["plot_states"]


def pendulum(values):
    deck, p, x, _, n, labels = load("pendulum-ladder.toml", values)
    energies = x
    m, length, g0 = p["m"], p["len"], p["g0"]
    period = 4 * np.sqrt(length / g0) * scipy.special.ellipk(energies / (2 * m * g0 * length))
    log_g = np.log(period / deck["mechanics"]["planck"])
    lpi = log_pi(log_g, energies, p["kT"])
    band = deck["transfer"]["band"]
    pairs = [(i, j, p["z"] * np.exp(-(x[i] - x[j]) / p["alpha"])) for i in range(n) for j in range(n) if abs(i - j) <= band and x[j] < x[i]]
    loss = p["k_esc"] * np.exp(-(2 * m * g0 * length - x) / p["de"])
    pump = p["p0"] * np.exp(-x / p["e_drive"])
    A = augmented(complete(n, pairs, lpi), loss.astype(complex), pump.astype(complex))
    p0 = np.append(np.exp(lpi), 1.0 + 0j)  # the equilibrium start
    return A, p0, labels, output_times(deck["run"]), deck["run"]["plot_states"]


def sensitivities(model, name, value):
    A, p0, labels, times, report = model({})
    Ah, p0h, *_ = model({name: value + 1j * H})
    dA = (Ah.imag / H)
    dp0 = (p0h.imag / H)
    A, p0 = A.real, p0.real
    states = [labels.index(s) for s in report]
    frechet, through = [], []
    for t in times:
        E, L = scipy.linalg.expm_frechet(A * t, dA * t)
        frechet.append((L @ p0 + E @ dp0)[states])
        through.append((scipy.linalg.expm(Ah * t) @ p0h).imag[states] / H)
    frechet, through = np.array(frechet), np.array(through)
    scale = np.max(np.abs(frechet))
    gap = np.max(np.abs(frechet - through)) / scale
    if gap > 1e-9:
        sys.exit(f"{name}: Frechet and complex step disagree by {gap:.2e} of the largest sensitivity")
    return {"times": times.tolist(), "states": report, "derivative": frechet.tolist(), "frechet_vs_complex_step": gap}


def divided_differences():
    mpmath.mp.dps = 50
    nodes = [(-3.0, -0.5), (-40.0, -39.0), (-2.0, -2.0 + 1e-9), (-1e-7, 0.0), (0.0, 0.0), (-700.0, -699.5),
             (-0.3, -0.3004), (-25.0, -25.01), (-5e-4, -1e-4), (-800.0, -1.0), (-1.5, -1.5)]
    rows = []
    for a, b in nodes:
        A, B = mpmath.mpf(a), mpmath.mpf(b)
        f = lambda z: mpmath.exp(z)
        phi = lambda z: mpmath.expm1(z) / z if z != 0 else mpmath.mpf(1)
        first = (f(A) - f(B)) / (A - B) if a != b else f(A)
        second = (phi(A) - phi(B)) / (A - B) if a != b else mpmath.diff(phi, A)
        rows.append([a, b, float(first), float(second)])
    return rows


# Deck expressions, their mpmath twins, the variable and the point (values of every name read).
EXPRESSIONS = [
    ("z*exp(-(x - y)/alpha)", lambda v: v["z"] * mpmath.exp(-(v["x"] - v["y"]) / v["alpha"]), "alpha", {"z": 0.8, "x": 1.2, "y": 0.7, "alpha": 0.15}),
    ("k_esc*exp(-(2*m*g0*len - x)/de)", lambda v: v["k_esc"] * mpmath.exp(-(2 * v["m"] * v["g0"] * v["len"] - v["x"]) / v["de"]), "de", {"k_esc": 5, "m": 1, "g0": 1, "len": 1, "x": 1.9, "de": 0.05}),
    ("sqrt(x)*atan2(y, x) + erf(x)^2 - log10(x)*tanh(y)", lambda v: mpmath.sqrt(v["x"]) * mpmath.atan2(v["y"], v["x"]) + mpmath.erf(v["x"]) ** 2 - mpmath.log10(v["x"]) * mpmath.tanh(v["y"]), "x", {"x": 0.7, "y": 1.3}),
    ("sqrt(x)*atan2(y, x) + erf(x)^2 - log10(x)*tanh(y)", lambda v: mpmath.sqrt(v["x"]) * mpmath.atan2(v["y"], v["x"]) + mpmath.erf(v["x"]) ** 2 - mpmath.log10(v["x"]) * mpmath.tanh(v["y"]), "y", {"x": 0.7, "y": 1.3}),
    ("pow(x, y) + abs(x - 3) + x^2.5", lambda v: v["x"] ** v["y"] + abs(v["x"] - 3) + v["x"] ** 2.5, "x", {"x": 1.7, "y": 0.4}),
    ("pow(x, y) + abs(x - 3) + x^2.5", lambda v: v["x"] ** v["y"] + abs(v["x"] - 3) + v["x"] ** 2.5, "y", {"x": 1.7, "y": 0.4}),
    ("sin(x)/cos(y) + sinh(x)*cosh(y) - tan(x) + atan(x*y) - log(y)/x", lambda v: mpmath.sin(v["x"]) / mpmath.cos(v["y"]) + mpmath.sinh(v["x"]) * mpmath.cosh(v["y"]) - mpmath.tan(v["x"]) + mpmath.atan(v["x"] * v["y"]) - mpmath.log(v["y"]) / v["x"], "y", {"x": 0.9, "y": 0.35}),
    ("-beta*x^2/kT + 1/(x*kT)^3", lambda v: -v["beta"] * v["x"] ** 2 / v["kT"] + 1 / (v["x"] * v["kT"]) ** 3, "kT", {"beta": 2e-6, "x": 40, "kT": 1.3}),
]


def expression_derivatives():
    mpmath.mp.dps = 50
    rows = []
    for text, function, variable, point in EXPRESSIONS:
        values = {k: mpmath.mpf(v) for k, v in point.items()}
        derivative = mpmath.diff(lambda u: function({**values, variable: u}), values[variable])
        rows.append({"expression": text, "variable": variable, "point": point, "derivative": float(derivative)})
    return rows


def main():
    cases = {
        "cascade.toml": (cascade, {"kT": 1.0, "beta": 2.0e-6, "loss.k48": 50.0, "pumping.k24": 1.0}),
        "pendulum-ladder.toml": (pendulum, {"kT": 0.4, "z": 0.8, "alpha": 0.15, "k_esc": 5.0, "p0": 0.02}),
    }
    result = {
        "source": "tests/reference/make_sensitivity_fixtures.py: models rebuilt from the deck files in NumPy; scipy.linalg.expm_frechet with complex-step dA; cross-checked by the complex step through scipy.linalg.expm",
        "numpy": np.__version__,
        "scipy": scipy.__version__,
        "python": sys.version.split()[0],
        "mpmath": mpmath.__version__,
        "decks": {},
        "divided_differences": divided_differences(),
        "expression_derivatives": expression_derivatives(),
    }
    for deck, (model, free) in cases.items():
        result["decks"][deck] = {name: sensitivities(model, name, value) for name, value in free.items()}
        for name, entry in result["decks"][deck].items():
            print(f"{deck} {name}: Frechet vs complex step {entry['frechet_vs_complex_step']:.1e}")
    path = os.path.join(ROOT, "tests", "reference", "fixtures", "sensitivities.json")
    with open(path, "w") as out:
        json.dump(result, out, indent=1)
    print("wrote", path)


if __name__ == "__main__":
    main()
