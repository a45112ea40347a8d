#!/usr/bin/python3
"""Decimal texts and the doubles Python's float() gives them, for the rate-file number tests.

float() rounds correctly (to nearest, ties to even; CPython's dtoa.c after David Gay). The cases
are the hard ones for a fast parser: integers at and around the ties above 2^53, 17-digit
round-trip texts of seeded random doubles and the texts just below and above the half-way point
to the next double (17 to 19 significant digits, and the exact half-way point in full), the
largest and smallest normal doubles, subnormals, overflow to infinity, leading and trailing
zeros, and long digit strings. Writes tests/reference/fixtures/decimal-text.json with the
Python version; each case is [text, bits] with bits the IEEE 754 binary64 pattern in hex.

    /usr/bin/python3 tests/reference/decimal_text.py
"""
import decimal
import json
import math
import pathlib
import random
import struct
import sys


def bits(value):
    return "%016x" % struct.unpack("<Q", struct.pack("<d", value))[0]


def significant(text, digits):
    """The decimal `text` cut (not rounded) to `digits` significant digits, in e-notation."""
    value = decimal.Decimal(text)
    sign, numerals, exponent = value.as_tuple()
    kept = numerals[:digits]
    return "%se%d" % ("".join(map(str, kept)), exponent + len(numerals) - len(kept))


decimal.getcontext().prec = 1200
texts = [
    "0", "0.0", "000000.0000", "1", "0.1", "0.3", "2.5e3", "1e23", "1e22", "9.999999999999999e22",
    "9007199254740992", "9007199254740993", "9007199254740994", "9007199254740995",
    "18014398509481987", "18014398509481989", "123456789012345678", "1234567890123456789",
    "12345678901234567890", "1.7976931348623157e308", "1.7976931348623158e308", "1.8e308",
    "2.2250738585072014e-308", "2.2250738585072011e-308", "2.2250738585072009e-308",
    "4.9406564584124654e-324", "5e-324", "2e-324", "1e-400", "1e400", "8.98846567431158e307",
    "0.000000000000000000000000000001", "00001.5e000003", "1.5E+3", "1.5e-0003",
    "7.2057594037927933e16", "1.00000000000000011102230246251565404236316680908203125",
    "1.0000000000000001110223024625156540", "1.000000000000000111", "1.0000000000000002220446049250313",
    "0.1000000000000000055511151231257827021181583404541015625",
    "3.0517578125e-05", "1e-5", "1e-22", "1e-23", "4.35679e-310", "2.4703282292062327e-324",
]
generator = random.Random(20261202)
for _ in range(600):
    value = math.ldexp(generator.random() + 0.5, generator.randint(-1000, 1000))
    texts.append(repr(value))
    texts.append("%.16e" % value)
    half = (decimal.Decimal(value) + decimal.Decimal(math.nextafter(value, math.inf))) / 2
    texts.append(format(half, "f") if abs(half.adjusted()) < 40 else format(half, "e"))
    for digits in (17, 18, 19):
        below = significant(str(half), digits)
        texts.append(below)
        sign, numerals, exponent = decimal.Decimal(below).as_tuple()
        up = int("".join(map(str, numerals))) + 1
        texts.append("%de%d" % (up, exponent))
for exponent in range(-30, 31):
    for significand in (1, 5, 9007199254740993, 9999999999999999999):
        texts.append("%de%d" % (significand, exponent))

cases = [[text, bits(float(text))] for text in dict.fromkeys(texts)]
fixture = {
    "source": "CPython float() (correctly rounded, ties to even)",
    "python": sys.version.split()[0],
    "cases": cases,
}
out = pathlib.Path(__file__).parent / "fixtures" / "decimal-text.json"
lines = ",\n".join(json.dumps(case) for case in cases)
out.write_text('{"source": %s, "python": %s, "cases": [\n%s\n]}\n' % (json.dumps(fixture["source"]), json.dumps(fixture["python"]), lines))
print(f"wrote {len(cases)} cases to {out}")
