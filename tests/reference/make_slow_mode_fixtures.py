#!/usr/bin/python3
"""Reference slow decay rates for RateDeck's slow-mode computation (docs/stiff-decks.md).

Run with Debian's interpreter from the repository root (a few minutes, pure-Python mpmath):

    /usr/bin/python3 tests/reference/make_slow_mode_fixtures.py

It writes tests/reference/fixtures/slow_modes.json with the mpmath version. Every rate is a short
decimal (digit times a power of ten), so the tests write the very same numbers into their decks
and both sides start from the same matrix up to the rounding of a decimal into a double.

- "stiff-chain-200" and "stiff-chain-1500": birth-death chains as their decks state them:
  energies E_i (kT = 1, unit weights), measured downward rates between neighbours, the upward
  rates completed by detailed balance, up_i = down_i exp(-(E_(i+1) - E_i)). The decay rates are
  the eigenvalues of the symmetric tridiagonal -S, S = D^-1/2 K D^1/2 (diagonal: the outflow of
  each state; off-diagonal: sqrt(up_i down_i)), found by Sturm-sequence bisection (the count of
  negative pivots of the LDL^T factorization of -S - x I is the number of eigenvalues below x;
  Wilkinson, The Algebraic Eigenvalue Problem, sec. 5.37-5.39, from memory) at 60 digits,
  bisected until the bracket is below 1e-45 of its upper end.
- "full-leaking-200": a full measured matrix (every rate from full_rate below, which the test
  repeats to write its rate file) without detailed balance (four clusters of 50
  states, fast inside, 1e-12 to 1e-9 between clusters, one loss of 1e-9). -K is a non-singular
  M-matrix, so its slowest decay rate is its Perron root 1 / rho((-K)^-1) (Perron-Frobenius,
  Berman and Plemmons, Nonnegative Matrices in the Mathematical Sciences, ch. 6, from memory).
  It is found by power iteration on the inverse formed by mpmath at 60 digits, stopped when the
  Collatz-Wielandt bounds min_i (B x)_i / x_i <= rho(B) <= max_i (B x)_i / x_i (x > 0) agree to
  1e-40, which certifies the value.
"""
import json
import math
import pathlib

import mpmath

mpmath.mp.dps = 60


def chain_energies(n):
    return [f"{2 * math.sin(i / 9):.3f}" for i in range(1, n + 1)]


def chain_down_rates(n):
    """Rate from state i + 1 down to state i, i = 1 .. n - 1: a digit times 10^-6 .. 10^6."""
    return [f"{1 + (i * 11) % 9}e{(i * 37) % 13 - 6}" for i in range(1, n)]


def chain_slow_rates(energies, down, count):
    n = len(energies)
    e = [mpmath.mpf(x) for x in energies]
    d = [mpmath.mpf(x) for x in down]
    up = [d[i] * mpmath.exp(-(e[i + 1] - e[i])) for i in range(n - 1)]
    diagonal = [(up[i] if i < n - 1 else 0) + (d[i - 1] if i > 0 else 0) for i in range(n)]
    off_squared = [up[i] * d[i] for i in range(n - 1)]

    def below(x):
        negatives = 0
        pivot = diagonal[0] - x
        for i in range(n):
            if i > 0:
                pivot = diagonal[i] - x - off_squared[i - 1] / pivot
            if pivot == 0:
                pivot = mpmath.mpf(10) ** (-mpmath.mp.dps * 2)
            if pivot < 0:
                negatives += 1
        return negatives

    top = max(diagonal) * 4
    rates = []
    # Eigenvalue 0 is the null mode; the k-th non-zero one is the (k + 1)-th smallest.
    for k in range(1, count + 1):
        lo, hi = mpmath.mpf(0), top
        while hi - lo > mpmath.mpf("1e-45") * hi:
            # Down from the top by factors of 1024 until the eigenvalue is bracketed, then
            # geometric bisection to a factor 2, then plain bisection.
            mid = hi / 1024 if lo == 0 else mpmath.sqrt(lo * hi) if hi > 2 * lo else (lo + hi) / 2
            if below(mid) > k:
                hi = mid
            else:
                lo = mid
        rates.append(mpmath.nstr((lo + hi) / 2, 30))
    return rates


def full_rate(i, j, clusters):
    """Rate from state j to state i (1-based), i != j."""
    if (i - 1) // clusters == (j - 1) // clusters:
        return f"{1 + (7 * i + 13 * j) % 9}e{(3 * i + 5 * j) % 7 - 1}"
    return f"{1 + (5 * i + 3 * j) % 9}e-{9 + (i + 2 * j) % 4}"


def full_case(n, clusters, loss_state, loss):
    rows = []
    a = mpmath.zeros(n, n)
    for j in range(1, n + 1):
        for i in range(1, n + 1):
            if i != j:
                rate = full_rate(i, j, clusters)
                rows.append((j, i, rate))
                a[i - 1, j - 1] = -mpmath.mpf(rate)
    for j in range(n):
        a[j, j] = -sum(a[i, j] for i in range(n) if i != j)
    a[loss_state - 1, loss_state - 1] += mpmath.mpf(loss)
    b = mpmath.inverse(a)
    x = [mpmath.mpf(1)] * n
    for iteration in range(2000):
        y = [mpmath.fsum(b[i, j] * x[j] for j in range(n)) for i in range(n)]
        ratios = [y[i] / x[i] for i in range(n)]
        low, high = min(ratios), max(ratios)
        top = max(y)
        x = [v / top for v in y]
        if high - low <= mpmath.mpf("1e-40") * high:
            break
    else:
        raise SystemExit("full-leaking: power iteration did not converge")
    rho = (low + high) / 2
    return rows, [mpmath.nstr(1 / rho, 30)], iteration + 1


def main():
    out = {"library": "mpmath", "mpmath": mpmath.__version__, "digits": mpmath.mp.dps, "cases": []}
    for n in (200, 1500):
        energies = chain_energies(n)
        down = chain_down_rates(n)
        out["cases"].append({
            "name": f"stiff-chain-{n}",
            "energies": energies,
            "down": down,
            "slow_rates": chain_slow_rates(energies, down, 6),
        })
        print(f"stiff-chain-{n}: {out['cases'][-1]['slow_rates'][:3]}")
    rows, slow, iterations = full_case(200, 50, 1, "1e-9")
    out["cases"].append({
        "name": "full-leaking-200",
        "clusters": 50,
        "loss_state": 1,
        "loss": "1e-9",
        "slow_rates": slow,
    })
    print(f"full-leaking-200: {slow} after {iterations} power iterations")
    path = pathlib.Path(__file__).parent / "fixtures" / "slow_modes.json"
    path.write_text(json.dumps(out, indent=None, separators=(",", ":")) + "\n")
    print(f"wrote {path} (mpmath {mpmath.__version__})")


if __name__ == "__main__":
    main()
