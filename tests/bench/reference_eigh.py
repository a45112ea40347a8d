#!/usr/bin/python3
"""Reference timings of a dense symmetric eigen-decomposition (values and vectors) with Debian's
NumPy/SciPy, on the same matrices as the C# bench (RateDeck.Bench `eigen`), so that figures are
ratios on one machine.

    /usr/bin/python3 tests/bench/reference_eigh.py [--sizes 500,1000,2000] [--runs 3]

Matrix rule (repeated from tests/bench/RateDeck.Bench/BenchMatrices.cs, bit for bit): entry (i, j),
0-based, i >= j, is 2 u - 1 with u = (splitmix64(seed + (i n + j + 1) * 0x9E3779B97F4A7C15) >> 11) * 2^-53,
mirrored above the diagonal; seed 1. The extreme eigenvalues are printed to check the match.
Timing: one warm-up run of each method, then timed runs round-robin over the methods (wall clock,
time.perf_counter); median, min and max are printed.
"""
import argparse
import os
import statistics
import time

import numpy
import scipy
import scipy.linalg

GOLDEN = numpy.uint64(0x9E3779B97F4A7C15)


def random_symmetric(n, seed=1):
    i, j = numpy.tril_indices(n)
    key = i.astype(numpy.uint64) * numpy.uint64(n) + j.astype(numpy.uint64)
    with numpy.errstate(over="ignore"):
        z = numpy.uint64(seed) + (key + numpy.uint64(1)) * GOLDEN
        z = (z ^ (z >> numpy.uint64(30))) * numpy.uint64(0xBF58476D1CE4E5B9)
        z = (z ^ (z >> numpy.uint64(27))) * numpy.uint64(0x94D049BB133111EB)
        z = z ^ (z >> numpy.uint64(31))
    u = (z >> numpy.uint64(11)).astype(numpy.float64) * (1.0 / 2.0**53)
    a = numpy.zeros((n, n))
    a[i, j] = 2.0 * u - 1.0
    a[j, i] = 2.0 * u - 1.0
    return a


METHODS = {
    "numpy eigh": lambda a: numpy.linalg.eigh(a),
    "scipy evd": lambda a: scipy.linalg.eigh(a, driver="evd"),
    "scipy evr": lambda a: scipy.linalg.eigh(a, driver="evr"),
}


def measure(contenders, runs):
    """One warm-up each, then timed runs round-robin over the contenders (as the C# bench does)."""
    results = [work() for work in contenders]
    seconds = [[] for _ in contenders]
    for _ in range(runs):
        for k, work in enumerate(contenders):
            start = time.perf_counter()
            results[k] = work()
            seconds[k].append(time.perf_counter() - start)
    return seconds, results


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--sizes", default="500,1000,2000")
    parser.add_argument("--runs", type=int, default=3)
    args = parser.parse_args()

    print(f"numpy {numpy.__version__}, scipy {scipy.__version__}; "
          f"OPENBLAS_NUM_THREADS={os.environ.get('OPENBLAS_NUM_THREADS', '(unset)')}; {os.cpu_count()} logical processors")
    print(f"timing: 1 warm-up each, then {args.runs} runs round-robin over the methods; seconds")
    print()
    print(f"{'N':>6}  {'method':<15}  {'median s':>10}  {'min s':>10}  {'max s':>10}  {'lambda_min':>18}  {'lambda_max':>18}")
    for n in (int(s) for s in args.sizes.split(",")):
        a = random_symmetric(n)
        seconds, results = measure([lambda m=m: m(a) for m in METHODS.values()], args.runs)
        for name, times, (values, _) in zip(METHODS, seconds, results):
            print(f"{n:>6}  {name:<15}  {statistics.median(times):>10.3f}  {min(times):>10.3f}  {max(times):>10.3f}  "
                  f"{values[0]!r:>18}  {values[-1]!r:>18}")


if __name__ == "__main__":
    main()
