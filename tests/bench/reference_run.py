#!/usr/bin/python3
"""Reference for the whole-process `run` bench: the same work as
`ratedeck run deck.toml --exact-only --no-plots` on the dense deck that RateDeck.Bench writes
(tests/bench/RateDeck.Bench/BenchDecks.cs), done with Debian's Python 3.11.2, NumPy 1.24.2 and SciPy 1.10.1 (the run bench prints the versions it ran with):
load the rate CSV, complete the reverse rates by detailed balance in log space, build the
diagonal, symmetrize S = D^-1/2 K D^1/2, eigh(S), propagate to the 101 output times as
P(t) = D^1/2 V exp(L t) V^T D^-1/2 P(0) (one matrix product for all times), write a CSV.

    /usr/bin/python3 tests/bench/reference_run.py FOLDER     # FOLDER holds rates.csv and problem.json
"""
import json
import os
import sys

import numpy
import scipy.linalg


def main(folder):
    with open(os.path.join(folder, "problem.json")) as handle:
        problem = json.load(handle)
    n = problem["n"]
    x = numpy.arange(1, n + 1, dtype=float)
    log_w = -problem["energy_slope"] * x / problem["kT"]
    top = log_w.max()
    log_pi = log_w - (top + numpy.log(numpy.exp(log_w - top).sum()))

    data = numpy.loadtxt(os.path.join(folder, "rates.csv"), delimiter=",", skiprows=1)
    source = data[:, 0].astype(int) - 1
    target = data[:, 1].astype(int) - 1
    rate = data[:, 2]
    k = numpy.zeros((n, n))
    k[target, source] = rate
    k[source, target] = numpy.exp(numpy.log(rate) + log_pi[source] - log_pi[target])
    numpy.fill_diagonal(k, 0.0)
    numpy.fill_diagonal(k, -k.sum(axis=0))

    half = 0.5 * log_pi
    s = k * numpy.exp(half[None, :] - half[:, None])
    s = 0.5 * (s + s.T)
    values, vectors = scipy.linalg.eigh(s, overwrite_a=True, check_finite=False)

    times = numpy.linspace(0.0, problem["t_end"], problem["outputs"] + 1)
    p0 = numpy.zeros(n)
    p0[problem["initial_state"] - 1] = 1.0
    coefficients = vectors.T @ (p0 * numpy.exp(-half))
    modes = numpy.exp(numpy.outer(values, times)) * coefficients[:, None]
    populations = (vectors @ modes) * numpy.exp(half)[:, None]
    table = numpy.column_stack([times, populations.T])
    numpy.savetxt(os.path.join(folder, "reference-populations.csv"), table, delimiter=",", fmt="%.17g",
                  header="t," + ",".join(f"s{i + 1}" for i in range(n)), comments="")


if __name__ == "__main__":
    main(sys.argv[1])
