"""What the certified RSS of NIST StRD Lanczos1 becomes when its data are rounded to doubles (evidence, not a fixture).

Lanczos1's fit is nearly exact (residuals about 1e-13 on y of order 1), and its y values carry 13
digits. A fitter working in doubles sees each y rounded to the nearest double, an error of up to
2.2e-16, which is 0.2 % of a residual. This script solves the least-squares problem at 60 digits
(mpmath Gauss-Newton from the certified values, which it reaches in a few steps) twice: for the
decimal data as printed, and for the same data rounded to doubles first. It prints both RSS values
and the LRE of the second against the certified 1.4307867721E-25. No fit of the doubles can score
better than that LRE on the RSS, the residual SD or the standard deviations. With Python 3.11.7 and
mpmath 1.3.0:

    python3 tests/StandFit.Tests/Reference/lanczos1_double_data.py

prints an RSS of 1.43078677208e-25 for the decimal data, 1.42955161054e-25 for the doubles, and an
LRE of 3.06.
"""

import re
from pathlib import Path

from mpmath import exp, fabs, log10, matrix, mp, mpf, qr_solve

mp.dps = 60
FILE = Path(__file__).resolve().parents[3].parent / "shared" / "reference" / "nist-strd" / "nonlinear" / "Lanczos1.dat"
CERTIFIED_RSS = mpf("1.4307867721E-25")


def load():
    lines = FILE.read_text().split("\n")
    first, last = map(int, re.search(r"Data\s*\(lines\s+(\d+)\s+to\s+(\d+)\)", "\n".join(lines[:10])).groups())
    rows = [line.split() for line in lines[first - 1:last]]
    certified = [mpf(line.split()[4]) for line in lines if re.match(r"\s*b\d\s*=", line)]
    return rows, certified


def model(b, x):
    return b[0] * exp(-b[1] * x) + b[2] * exp(-b[3] * x) + b[4] * exp(-b[5] * x)


def least_squares(xs, ys, b):
    for _ in range(8):
        jacobian = matrix(len(xs), 6)
        residual = matrix(len(xs), 1)
        for i, (x, y) in enumerate(zip(xs, ys)):
            e = [exp(-b[1] * x), exp(-b[3] * x), exp(-b[5] * x)]
            residual[i] = y - model(b, x)
            for k in range(3):
                jacobian[i, 2 * k] = e[k]
                jacobian[i, 2 * k + 1] = -b[2 * k] * x * e[k]
        step, _ = qr_solve(jacobian, residual)
        b = [b[j] + step[j] for j in range(6)]
    return sum((y - model(b, x)) ** 2 for x, y in zip(xs, ys))


def main():
    rows, certified = load()
    decimal = least_squares([mpf(r[1]) for r in rows], [mpf(r[0]) for r in rows], certified)
    doubles = least_squares([mpf(float(r[1])) for r in rows], [mpf(float(r[0])) for r in rows], certified)
    print("RSS, decimal data:       ", mp.nstr(decimal, 12))
    print("RSS, data as doubles:    ", mp.nstr(doubles, 12))
    print("LRE of the latter vs certified:", mp.nstr(-log10(fabs(doubles - CERTIFIED_RSS) / CERTIFIED_RSS), 3))


if __name__ == "__main__":
    main()
