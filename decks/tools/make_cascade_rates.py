#!/usr/bin/env python3
"""Writes decks/cascade-rates.csv, the invented downscale coefficients of decks/cascade.toml.

The numbers are invented for the demo: they imitate coefficients estimated from one snapshot of
a turbulent field, transfer from shell k_n to the next two smaller-scale shells k_(n+1) and
k_(n+2) at a rate that grows like the eddy frequency k^(2/3), with a few per cent of fixed
pseudo-random scatter standing in for measurement noise. The seed is fixed, so the file is the
same on every run (Python's random module keeps its Mersenne Twister sequence stable across
versions for random.random()).

Usage: python3 decks/tools/make_cascade_rates.py   (from the repository root, or anywhere)
"""
import math
import pathlib
import random

# The grid of decks/cascade.toml: 48 logarithmic shells from k = 1 to k = 1000.
COUNT = 48
K_FROM = 1.0
K_TO = 1000.0
# Invented coefficients (per large-eddy time t0): nearest and next-nearest downscale transfer.
NEAREST = 0.5
NEXT_NEAREST = 0.15
SCATTER = 0.05
SEED = 48


def shells():
    d_log = math.log(K_TO / K_FROM) / (COUNT - 1)
    return [K_TO if n == COUNT - 1 else K_FROM * math.exp(n * d_log) for n in range(COUNT)]


def main():
    rng = random.Random(SEED)
    k = shells()
    rows = []
    for n in range(COUNT):
        eddy_rate = k[n] ** (2.0 / 3.0)
        for step, strength in ((1, NEAREST), (2, NEXT_NEAREST)):
            if n + step < COUNT:
                noise = 1.0 + SCATTER * (2.0 * rng.random() - 1.0)
                rows.append((n + 1, n + 1 + step, strength * eddy_rate * noise))

    out = pathlib.Path(__file__).resolve().parent.parent / "cascade-rates.csv"
    with out.open("w", encoding="utf-8", newline="\n") as f:
        f.write("# Invented downscale transfer coefficients for decks/cascade.toml (demo only).\n")
        f.write("# Written by decks/tools/make_cascade_rates.py; edit the script, not this file.\n")
        f.write("from,to,rate\n")
        for src, dst, rate in rows:
            f.write(f"k{src},k{dst},{rate:.6g}\n")
    print(f"wrote {len(rows)} rates to {out}")


if __name__ == "__main__":
    main()
