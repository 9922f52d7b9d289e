"""Reference values for DoubleDoubleMathTests: each function at a few double arguments, at 50 digits.

Each argument is a double (written as the shortest decimal that round-trips); mpmath takes its exact
binary value. Each result is printed as a double-double pair hi, lo with hi = the nearest double
and lo = the nearest double to the remainder, as the C# InlineData rows hold them. With Python
3.11.7 and mpmath 1.3.0:

    python3 tests/StandFit.Tests/Fitting/double_double_reference.py
"""

from mpmath import atan, cos, exp, log, log10, mp, mpf, sin, sqrt, tan

mp.dps = 50

CASES = [
    ("exp", exp, [0.5, -20.25, 1e-8, 3.75, 700.0, -300.0]),
    ("ln", log, [0.001, 2.0, 1.5, 123456.789, 1e-300]),
    ("log10", log10, [7.0, 0.3]),
    ("sqrt", sqrt, [2.0, 1e-10, 12345.678]),
    ("sin", sin, [0.5, 3.0, -7.25, 88.0, 1000.0]),
    ("cos", cos, [0.5, 1.5707963267948966, -7.25, 88.0]),
    ("tan", tan, [0.7, -1.2]),
    ("atan", atan, [0.5, -3.0, 1e6, 1e-5]),
]


def split(value):
    hi = float(value)
    lo = float(value - mpf(hi))
    return hi, lo


for name, function, arguments in CASES:
    for x in arguments:
        hi, lo = split(function(mpf(x)))
        print(f'[InlineData("{name}", {x!r}, {hi!r}, {lo!r})]')
for base, exponent in [(1.7, 2.5), (0.3, -1.25), (2.0, 0.5), (-1.5, 3.0), (1.0001, 10000.0)]:
    hi, lo = split(mpf(base) ** mpf(exponent))
    print(f'[InlineData({base!r}, {exponent!r}, {hi!r}, {lo!r})]')
