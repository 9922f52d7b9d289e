"""Straight line y = B0 + B1*x on the NIST StRD Pontius data, in exact rational arithmetic.

Produces the reference values in PontiusHandbookTests.cs. Python 3 standard library only
(run with Python 3.11.7). Usage, from the repository root:

    python3 tests/StandFit.Tests/Reference/pontius_straight_line_exact.py

Output (Python 3.11.7):

    n 40 df 38
    B0 0.0061496842105263159
    sd(B0) 0.00071320516746561241
    B1 7.2210258145363409e-07
    sd(B1) 3.9691478040442475e-10
    residual SD 0.0021712725960567505
"""

import math
import re
from fractions import Fraction
from pathlib import Path

path = Path(__file__).resolve().parents[3].parent / "shared" / "reference" / "nist-strd" / "linear" / "Pontius.dat"
lines = path.read_text().split("\n")
first, last = map(int, re.search(r"Data\s*\(lines\s+(\d+)\s+to\s+(\d+)\)", "\n".join(lines[:10])).groups())
rows = [line.split() for line in lines[first - 1:last]]
y = [Fraction(r[0]) for r in rows]
x = [Fraction(r[1]) for r in rows]

n = len(x)
sx, sy = sum(x), sum(y)
sxx = sum(v * v for v in x)
sxy = sum(a * b for a, b in zip(x, y))
d = n * sxx - sx * sx
b1 = (n * sxy - sx * sy) / d
b0 = (sy - b1 * sx) / n
rss = sum((yi - b0 - b1 * xi) ** 2 for xi, yi in zip(x, y))
s2 = rss / (n - 2)


def sqrt17(q):
    """Square root of a positive Fraction, to far more than the 17 digits printed."""
    scale = 10 ** 40
    return math.isqrt(q.numerator * scale * scale // q.denominator) / scale


print("n", n, "df", n - 2)
print("B0", f"{float(b0):.17g}")
print("sd(B0)", f"{sqrt17(s2 * sxx / d):.17g}")
print("B1", f"{float(b1):.17g}")
print("sd(B1)", f"{sqrt17(s2 * n / d):.17g}")
print("residual SD", f"{sqrt17(s2):.17g}")
