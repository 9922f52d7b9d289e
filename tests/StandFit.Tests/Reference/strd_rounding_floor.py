"""How many digits of the StRD polynomial estimates survive one rounding of y (evidence, not a fixture).

For each file, in exact rational arithmetic: the least-squares solution b = X^+ y and, per
coefficient, the LRE an error of one unit roundoff u = 2^-53 in the data would leave:
componentwise -log10(u * sum_i |X^+_ki| |y_i| / |b_k|) and normwise
-log10(u * max|y| * sum_i |X^+_ki| / |b_k|). A backward-stable double-precision fit cannot be
expected to beat these by much. Python 3 standard library only (run with Python 3.11.7):

    python3 tests/StandFit.Tests/Reference/strd_rounding_floor.py
"""

import re
from fractions import Fraction
from math import log10
from pathlib import Path

FOLDER = Path(__file__).resolve().parents[3].parent / "shared" / "reference" / "nist-strd" / "linear"
U = Fraction(1, 2**53)


def load(name):
    lines = (FOLDER / name).read_text().split("\n")
    first, last = map(int, re.search(r"Data\s*\(lines\s+(\d+)\s+to\s+(\d+)\)", "\n".join(lines[:10])).groups())
    rows = [line.split() for line in lines[first - 1:last]]
    return [Fraction(r[0]) for r in rows], [Fraction(r[1]) for r in rows]


def inverse(a):
    n = len(a)
    m = [row[:] + [Fraction(int(i == j)) for j in range(n)] for i, row in enumerate(a)]
    for c in range(n):
        pivot = next(r for r in range(c, n) if m[r][c] != 0)
        m[c], m[pivot] = m[pivot], m[c]
        m[c] = [v / m[c][c] for v in m[c]]
        for r in range(n):
            if r != c and m[r][c] != 0:
                f = m[r][c]
                m[r] = [v - f * w for v, w in zip(m[r], m[c])]
    return [row[n:] for row in m]


for name, degree in [("Norris.dat", 1), ("Pontius.dat", 2)] + [(f"Wampler{i}.dat", 5) for i in range(1, 6)]:
    y, x = load(name)
    p, n = degree + 1, len(x)
    design = [[xi**k for k in range(p)] for xi in x]
    gram_inverse = inverse([[sum(design[i][a] * design[i][b] for i in range(n)) for b in range(p)] for a in range(p)])
    pinv = [[sum(gram_inverse[k][j] * design[i][j] for j in range(p)) for i in range(n)] for k in range(p)]
    b = [sum(pinv[k][i] * y[i] for i in range(n)) for k in range(p)]
    ymax = max(abs(v) for v in y)
    cells = []
    for k in range(p):
        componentwise = U * sum(abs(pinv[k][i]) * abs(y[i]) for i in range(n)) / abs(b[k])
        normwise = U * ymax * sum(abs(pinv[k][i]) for i in range(n)) / abs(b[k])
        cells.append(f"B{k} {-log10(componentwise):.2f}/{-log10(normwise):.2f}")
    print(name, " ".join(cells))
