#!/usr/bin/env python3
"""Writes the invented data of decks/fit-ladder.toml (demo only).

The model is the deck's: six levels at E = 0, 0.5, ..., 2.5, unit weights, downward rates
z exp(-(x - y)/alpha) between every pair, upward rates by detailed balance, all population in e6
at t = 0. Populations come from scipy.linalg.expm; Gaussian noise of sd 0.005 (seeded) is added
and written with its standard deviation. Invented truth: z = 2, alpha = 0.7.
"""
import numpy as np
from scipy.linalg import expm

Z, ALPHA, SD = 2.0, 0.7, 0.005
energies = np.linspace(0.0, 2.5, 6)
times = 0.02 * 500.0 ** (np.arange(30) / 29.0)


def populations(kT):
    n = len(energies)
    k = np.zeros((n, n))
    for source in range(n):
        for target in range(source):
            rate = Z * np.exp(-(energies[source] - energies[target]) / ALPHA)
            k[target, source] = rate
            k[source, target] = rate * np.exp(-(energies[source] - energies[target]) / kT)
    k -= np.diag(k.sum(axis=0))
    p0 = np.zeros(n)
    p0[-1] = 1.0
    return np.array([expm(k * t) @ p0 for t in times])


rng = np.random.default_rng(2026)
for name, kT in (("cold", 0.4), ("hot", 1.5)):
    p = populations(kT)
    columns = {"e1": p[:, 0], "e3": p[:, 2], "upper_pair": p[:, 4] + p[:, 5]}
    with open(f"fit-ladder-{name}.csv", "w") as out:
        out.write(f"# Invented data for decks/fit-ladder.toml at kT = {kT} (demo only; make_fit_ladder_data.py)\n")
        out.write("t," + ",".join(f"{c},{c}_sd" for c in columns) + "\n")
        for row, t in enumerate(times):
            cells = [f"{t:.6g}"]
            for values in columns.values():
                cells += [f"{values[row] + SD * rng.standard_normal():.6f}", f"{SD}"]
            out.write(",".join(cells) + "\n")
