#!/usr/bin/env python3
"""Energy-unit conversion factors from SciPy's CODATA constants, for the deck tests.

SciPy's scipy.constants carries the CODATA 2018 adjustment (SciPy 1.4 and later); the script
checks that and records the versions in the fixture it writes:
tests/reference/fixtures/energy-units.json.

Run with Debian's SciPy: /usr/bin/python3 tests/reference/energy_units.py
"""
import json
import pathlib

import numpy
import scipy
import scipy.constants as sc

# CODATA 2018 made e, h, k_B, c and N_A exact; an older table would differ here.
assert sc.e == 1.602176634e-19 and sc.h == 6.62607015e-34 and sc.k == 1.380649e-23
assert sc.c == 299792458.0 and sc.N_A == 6.02214076e23

joules_per_unit = {
    "eV": sc.physical_constants["electron volt-joule relationship"][0],
    "K": sc.physical_constants["kelvin-joule relationship"][0],
    "cm-1": sc.physical_constants["inverse meter-joule relationship"][0] * 100.0,
    "J": 1.0,
    "kJ/mol": 1000.0 / sc.N_A,
}

fixture = {
    "source": "scipy.constants (CODATA 2018 adjustment)",
    "scipy_version": scipy.__version__,
    "numpy_version": numpy.__version__,
    "joules_per_unit": joules_per_unit,
    # Published relationships of the same table, for a second, independent path.
    "electron_volt_kelvin": sc.physical_constants["electron volt-kelvin relationship"][0],
    "electron_volt_inverse_meter": sc.physical_constants["electron volt-inverse meter relationship"][0],
    "second_radiation_constant_m_K": sc.physical_constants["second radiation constant"][0],
    "faraday_C_per_mol": sc.physical_constants["Faraday constant"][0],
    "planck_eV_s": sc.physical_constants["Planck constant in eV/Hz"][0],
}

out = pathlib.Path(__file__).resolve().parent / "fixtures" / "energy-units.json"
out.write_text(json.dumps(fixture, indent=2) + "\n", encoding="utf-8")
print(f"wrote {out}")
