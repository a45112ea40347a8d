#!/usr/bin/python3
"""Reference values for the diagnostics tests (tests/RateDeck.Tests/Diagnostics).

Run with Debian's Python and SciPy:  /usr/bin/python3 tests/reference/make_diagnostics_fixtures.py
Writes tests/reference/fixtures/diagnostics.json with the library versions inside.

Three small rate matrices (column convention of RateDeck: K[i, j] is the rate from j to i,
columns sum to minus the loss). For each: the eigenvalues (scipy.linalg.eigvals), the strongly
connected components and which of them are closed (scipy.sparse.csgraph), and the stationary
vector on every closed class, taken from scipy.linalg.null_space. For the reducible matrix also
the long-time limit exp(K t) P(0) by scipy.linalg.expm, independent of any projection formula.
"""

import json
import math
import pathlib
import platform

import numpy as np
import scipy
import scipy.linalg
import scipy.sparse
import scipy.sparse.csgraph


def generator(rates):
    """Fill the diagonal so that every column sums to zero (no losses here)."""
    k = np.array(rates, dtype=float)
    np.fill_diagonal(k, 0.0)
    np.fill_diagonal(k, -k.sum(axis=0))
    return k


def log_normalise(log_values):
    log_values = np.asarray(log_values, dtype=float)
    top = log_values.max()
    return log_values - (top + math.log(np.exp(log_values - top).sum()))


def closed_classes(k):
    """Closed strongly connected components of the graph j -> i when K[i, j] > 0."""
    n = k.shape[0]
    adjacency = np.zeros((n, n))
    for i in range(n):
        for j in range(n):
            if i != j and k[i, j] > 0:
                adjacency[j, i] = 1.0  # csgraph edges run row -> column
    count, labels = scipy.sparse.csgraph.connected_components(
        scipy.sparse.csr_matrix(adjacency), directed=True, connection="strong")
    classes = []
    for c in range(count):
        members = [s for s in range(n) if labels[s] == c]
        leaves = any(adjacency[s, t] > 0 and labels[t] != c for s in members for t in range(n))
        if not leaves:
            classes.append(members)
    classes.sort(key=lambda m: m[0])
    return classes


def class_null_vectors(k, classes):
    """On each closed class, the null vectors of K are all proportional: take the dominant
    left singular vector of the null basis restricted to the class, normalised to sum 1."""
    basis = scipy.linalg.null_space(k)
    vectors = []
    for members in classes:
        u, _, _ = np.linalg.svd(basis[members, :], full_matrices=False)
        v = u[:, 0]
        vectors.append((v / v.sum()).tolist())
    return basis.shape[1], vectors


def case(name, labels, k, log_equilibrium, origin, extra=None):
    values = scipy.linalg.eigvals(k)
    order = np.lexsort((values.imag, values.real))
    values = values[order]
    classes = closed_classes(k)
    null_dimension, vectors = class_null_vectors(k, classes)
    entry = {
        "name": name,
        "labels": labels,
        "origin": origin,
        "generator": k.tolist(),
        "log_equilibrium": list(map(float, log_equilibrium)),
        "eigenvalues_real": values.real.tolist(),
        "eigenvalues_imag": values.imag.tolist(),
        "null_dimension": int(null_dimension),
        "closed_classes": [[labels[s] for s in members] for members in classes],
        "class_null_vectors": vectors,
    }
    if extra:
        entry.update(extra)
    return entry


def cyclic3():
    # Circulant: rate a one way round the ring 0 -> 1 -> 2 -> 0, b the other way; a != b breaks
    # detailed balance (the cycle products a^3 and b^3 differ) and gives complex eigenvalues.
    a, b = 2.0, 0.5
    rates = [[0, b, a], [a, 0, b], [b, a, 0]]
    k = generator(rates)
    return case("cyclic3", ["c0", "c1", "c2"], k, log_normalise([0.0] * 3), "TakenAsGiven")


def reducible5():
    # Classes {r0, r1} and {r2, r3}; r4 is transient and feeds r0 (rate 1) and r2 (rate 3).
    rates = np.zeros((5, 5))
    rates[1, 0], rates[0, 1] = 2.0, 1.0
    rates[3, 2], rates[2, 3] = 0.5, 1.5
    rates[0, 4], rates[2, 4] = 1.0, 3.0
    k = generator(rates)
    initial = np.array([0.1, 0.2, 0.3, 0.15, 0.25])
    t = 200.0  # slowest decay rate is 2 (r4 leaves at 4, the classes relax at 3 and 2): e^-400 is negligible
    limit = scipy.linalg.expm(k * t) @ initial
    return case("reducible5", ["r0", "r1", "r2", "r3", "r4"], k, log_normalise([0.0] * 5), "TakenAsGiven",
                {"initial": initial.tolist(), "limit_time": t, "limit_populations": limit.tolist()})


def balanced4():
    # Detailed balance by construction: upper triangle (transfer toward lower index) given,
    # lower completed as K_ji = K_ij pi_j / pi_i with pi_i ~ g_i exp(-E_i / kT), in log space.
    energies = [0.0, 0.7, 1.3, 2.1]
    log_weights = [0.0, math.log(3.0), math.log(5.0), math.log(2.0)]
    kt = 0.8
    log_pi = log_normalise([lw - e / kt for lw, e in zip(log_weights, energies)])
    upper = {(0, 1): 1.2, (0, 2): 0.4, (0, 3): 0.3, (1, 2): 2.5, (1, 3): 0.6, (2, 3): 1.7}
    rates = np.zeros((4, 4))
    for (i, j), rate in upper.items():
        rates[i, j] = rate
        rates[j, i] = math.exp(math.log(rate) + log_pi[j] - log_pi[i])
    k = generator(rates)
    return case("balanced4", ["b0", "b1", "b2", "b3"], k, log_pi, "CompletedByDetailedBalance",
                {"energies": energies, "log_weights": log_weights, "kT": kt})


def main():
    # Real root of 1 + z/2 + z^2/6 + z^3/24 (R(z) = 1 on the negative real axis for classical RK4).
    roots = np.roots([1.0 / 24.0, 1.0 / 6.0, 0.5, 1.0])
    rk4_root = float(min(r.real for r in roots if abs(r.imag) < 1e-12))
    fixture = {
        "generated_by": "tests/reference/make_diagnostics_fixtures.py",
        "python": platform.python_version(),
        "numpy": np.__version__,
        "scipy": scipy.__version__,
        "rk4_real_axis_root": rk4_root,
        "cases": [cyclic3(), reducible5(), balanced4()],
    }
    path = pathlib.Path(__file__).parent / "fixtures" / "diagnostics.json"
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(json.dumps(fixture, indent=1) + "\n")
    print(f"wrote {path}")


if __name__ == "__main__":
    main()
