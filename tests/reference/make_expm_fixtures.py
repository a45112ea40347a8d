#!/usr/bin/python3
"""Reference matrix exponentials for the RateDeck propagation tests.

Run with Debian's interpreter from the repository root:

    /usr/bin/python3 tests/reference/make_expm_fixtures.py

It writes tests/reference/fixtures/expm.json. Every case is a small generator K of
dP/dt = K P + s without detailed balance (K[i][j] is the rate from state j to state i,
columns sum to minus the loss). For each output time t the fixture holds
scipy.linalg.expm(K t) and the populations P(t), the latter taken from the exponential of
the augmented matrix [[K, s], [0, 0]] applied to [P(0); 1] (Van Loan 1978), so the
pumping term comes from SciPy as well. numpy.linalg.eig gives the 1-norm condition number
of the unit-column eigenvector matrix, which the tests use to check the path choice.

Beside SciPy the fixture holds a second, independent reference computed with Python's
standard decimal module at 60 significant digits: the Taylor series of exp(A / 2^s) with
||A / 2^s||_1 <= 1/2, summed to 1e-58, then squared s times (the double-precision inputs are
converted exactly). Its rounding is far below double precision, so it shows how close
scipy.linalg.expm itself is (for the nearly defective case SciPy 1.10.1 is off by ~3e-11).
"""
import decimal
import json
import pathlib
import platform

import numpy as np
import scipy
import scipy.linalg


def generator(off_diagonal, loss=None):
    """K from off-diagonal rates (j -> i at [i][j]) and per-state losses."""
    k = np.array(off_diagonal, dtype=float)
    np.fill_diagonal(k, 0.0)
    loss = np.zeros(len(k)) if loss is None else np.asarray(loss, dtype=float)
    k -= np.diag(k.sum(axis=0) + loss)
    return k


def expm_decimal(a):
    """exp(a) at 60 digits by scaled Taylor series and squaring, as Decimals; a is a float matrix."""
    with decimal.localcontext() as context:
        context.prec = 60
        n = len(a)
        x = [[decimal.Decimal(float(v)) for v in row] for row in a]
        norm = max(sum(abs(x[i][j]) for i in range(n)) for j in range(n))
        squarings = 0
        while norm > decimal.Decimal("0.5"):
            norm /= 2
            squarings += 1
        x = [[v / (2 ** squarings) for v in row] for row in x]
        result = [[decimal.Decimal(int(i == j)) for j in range(n)] for i in range(n)]
        term = [row[:] for row in result]
        order = 0
        while True:
            order += 1
            term = [[sum(term[i][k] * x[k][j] for k in range(n)) / order for j in range(n)] for i in range(n)]
            result = [[result[i][j] + term[i][j] for j in range(n)] for i in range(n)]
            if max(abs(v) for row in term for v in row) < decimal.Decimal("1e-58"):
                break
        for _ in range(squarings):
            result = [[sum(result[i][k] * result[k][j] for k in range(n)) for j in range(n)] for i in range(n)]
        return result


def populations_from(exponential, start, n):
    """The first n entries of exponential @ start, summed at 60 digits."""
    with decimal.localcontext() as context:
        context.prec = 60
        return [float(sum(exponential[i][j] * decimal.Decimal(float(start[j]))
                          for j in range(n + 1))) for i in range(n)]


def case(name, description, k, initial, times, pumping=None):
    n = len(k)
    s = np.zeros(n) if pumping is None else np.asarray(pumping, dtype=float)
    p0 = np.asarray(initial, dtype=float)
    augmented = np.zeros((n + 1, n + 1))
    augmented[:n, :n] = k
    augmented[:n, n] = s
    exponentials, populations, exponentials_decimal, populations_decimal = [], [], [], []
    start = np.append(p0, 1.0)
    for t in times:
        exponentials.append(scipy.linalg.expm(k * t).tolist())
        populations.append((scipy.linalg.expm(augmented * t) @ start)[:n].tolist())
        exponentials_decimal.append([[float(v) for v in row] for row in expm_decimal(k * t)])
        populations_decimal.append(populations_from(expm_decimal(augmented * t), start, n))
    _, vectors = np.linalg.eig(k)
    with np.errstate(all="ignore"):
        try:
            condition = float(np.real(np.linalg.cond(vectors, 1)))
        except np.linalg.LinAlgError:
            condition = float("inf")
    return {
        "name": name,
        "description": description,
        "generator": k.tolist(),
        "pumping": s.tolist(),
        "initial": p0.tolist(),
        "times": list(times),
        "exponentials": exponentials,
        "populations": populations,
        "exponentials_decimal60": exponentials_decimal,
        "populations_decimal60": populations_decimal,
        "numpy_eigenvector_condition_1norm": condition if np.isfinite(condition) else "inf",
    }


def main():
    rng = np.random.default_rng(20240517)
    random_rates = rng.uniform(0.1, 2.0, size=(5, 5))
    stiff_rates = 10.0 ** rng.uniform(-3.0, 3.0, size=(4, 4))
    eps = 1e-7
    cases = [
        case("cycle3", "one-way cycle 0->1->2->0 with rates 1, 2, 3: complex eigenvalues",
             generator([[0, 0, 3], [1, 0, 0], [0, 2, 0]]), [1, 0, 0], [0.1, 0.5, 1.0, 2.0, 5.0]),
        case("jordan3", "decay chain 0->1->2 with equal rates 1 and loss 1 from state 2: one 3x3 Jordan block",
             generator([[0, 0, 0], [1, 0, 0], [0, 1, 0]], loss=[0, 0, 1]), [1, 0, 0], [0.5, 1.0, 3.0]),
        case("nearly_defective3", "decay chain with rates 1, 1+1e-7 and loss 1+2e-7: three eigenvalues within 2e-7",
             generator([[0, 0, 0], [1, 0, 0], [0, 1 + eps, 0]], loss=[0, 0, 1 + 2 * eps]), [1, 0, 0], [0.5, 1.0, 3.0]),
        case("random5_driven", "5 states, rates uniform in [0.1, 2] (seeded), loss from state 4, pumping into state 0",
             generator(random_rates, loss=[0, 0, 0, 0, 0.7]), [0.2, 0.2, 0.2, 0.2, 0.2], [0.25, 1.0, 4.0, 20.0],
             pumping=[1.5, 0, 0, 0, 0]),
        case("stiff4", "4 states, rates log-uniform in [1e-3, 1e3] (seeded): ||K t|| up to about 1e6",
             generator(stiff_rates), [0, 0, 0, 1], [1e-3, 1.0, 1e3]),
    ]
    fixture = {
        "generator_script": "tests/reference/make_expm_fixtures.py",
        "reference_function": "scipy.linalg.expm",
        "second_reference": "Python decimal module, 60 digits, scaled Taylor series and squaring",
        "python": platform.python_version(),
        "scipy": scipy.__version__,
        "numpy": np.__version__,
        "layout": "matrices row-major: generator[i][j] is the rate from state j to state i",
        "cases": cases,
    }
    out = pathlib.Path(__file__).resolve().parent / "fixtures" / "expm.json"
    out.write_text(json.dumps(fixture, indent=1) + "\n")
    print(f"wrote {out} ({len(cases)} cases, SciPy {scipy.__version__}, NumPy {np.__version__})")


if __name__ == "__main__":
    main()
