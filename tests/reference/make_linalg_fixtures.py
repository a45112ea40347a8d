#!/usr/bin/python3
"""Reference eigenvalues for the linear-algebra provider tests, computed once with Debian's SciPy.

Writes tests/reference/fixtures/linalg.json. Run with /usr/bin/python3 (SciPy 1.10.1, NumPy 1.24.2
from Debian packages); the versions used are recorded in the fixture.

Matrices:
- hilbert4, hilbert6: the Hilbert matrix H_ij = 1 / (i + j - 1) (scipy.linalg.hilbert), symmetric,
  eigenvalues by scipy.linalg.eigvalsh, ascending.
- grcar6: a Grcar-type Toeplitz matrix (-1 on the subdiagonal, 1 on the diagonal and the first three
  superdiagonals; the form is from memory, the entries are stored here so the form does not matter),
  non-symmetric with complex conjugate eigenvalues, by scipy.linalg.eigvals, sorted by ascending real
  part and then ascending imaginary part (the providers' order).
"""
import json
import pathlib
import platform

import numpy
import scipy
import scipy.linalg


def grcar(n, superdiagonals=3):
    a = numpy.eye(n) - numpy.eye(n, k=-1)
    for k in range(1, superdiagonals + 1):
        a += numpy.eye(n, k=k)
    return a


def symmetric_case(matrix):
    return {
        "matrix": matrix.tolist(),
        "eigenvalues": sorted(scipy.linalg.eigvalsh(matrix).tolist()),
    }


def general_case(matrix):
    values = sorted(scipy.linalg.eigvals(matrix).tolist(), key=lambda z: (z.real, z.imag))
    return {
        "matrix": matrix.tolist(),
        "eigenvalues_real": [z.real for z in values],
        "eigenvalues_imag": [z.imag for z in values],
    }


def main():
    fixture = {
        "source": "tests/reference/make_linalg_fixtures.py",
        "versions": {
            "python": platform.python_version(),
            "numpy": numpy.__version__,
            "scipy": scipy.__version__,
        },
        "symmetric": {
            "hilbert4": symmetric_case(scipy.linalg.hilbert(4)),
            "hilbert6": symmetric_case(scipy.linalg.hilbert(6)),
        },
        "general": {
            "grcar6": general_case(grcar(6)),
        },
    }
    out = pathlib.Path(__file__).resolve().parent / "fixtures" / "linalg.json"
    out.write_text(json.dumps(fixture, indent=2) + "\n", encoding="utf-8")
    print(f"wrote {out}")


if __name__ == "__main__":
    main()
