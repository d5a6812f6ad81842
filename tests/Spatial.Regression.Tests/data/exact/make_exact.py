"""Hard polynomial least-squares cases with exact reference values (Python standard library only).

Run once: /usr/bin/python3 make_exact.py  (writes *.csv and *.certified.txt beside this script).
The design columns are the IEEE doubles x, x*x, x*x*x, ... computed by repeated multiplication (the
C# test forms them the same way, so both sides see identical double data). The least-squares solution of
those exact binary numbers is computed in exact rational arithmetic (fractions.Fraction, Gauss-Jordan on
the normal equations -- exact, so conditioning does not matter), then the standard errors, residual SD
and R^2 are rounded to 30 digits with the decimal module. Printed with 17 significant digits.
"""
import random
from fractions import Fraction
from decimal import Decimal, getcontext

getcontext().prec = 40


def powers(x, degree):
    cols = []
    r = 1.0
    for _ in range(degree):
        r = r * x
        cols.append(r)
    return cols


def exact_fit(rows, y, intercept):
    n = len(rows)
    X = [([Fraction(1)] if intercept else []) + [v if isinstance(v, Fraction) else Fraction(v) for v in r] for r in rows]
    Y = [v if isinstance(v, Fraction) else Fraction(v) for v in y]
    p = len(X[0])
    A = [[sum(X[i][a] * X[i][b] for i in range(n)) for b in range(p)] for a in range(p)]
    c = [sum(X[i][a] * Y[i] for i in range(n)) for a in range(p)]
    # Gauss-Jordan: invert A exactly.
    M = [A[a][:] + [Fraction(int(a == b)) for b in range(p)] for a in range(p)]
    for k in range(p):
        piv = next(i for i in range(k, p) if M[i][k] != 0)
        M[k], M[piv] = M[piv], M[k]
        f = M[k][k]
        M[k] = [v / f for v in M[k]]
        for i in range(p):
            if i != k and M[i][k] != 0:
                g = M[i][k]
                M[i] = [vi - g * vk for vi, vk in zip(M[i], M[k])]
    G = [row[p:] for row in M]
    b = [sum(G[a][k] * c[k] for k in range(p)) for a in range(p)]
    res = [Y[i] - sum(X[i][a] * b[a] for a in range(p)) for i in range(n)]
    rss = sum(r * r for r in res)
    s2 = rss / (n - p)
    if intercept:
        ybar = sum(Y) / n
        tss = sum((v - ybar) ** 2 for v in Y)
    else:
        tss = sum(v * v for v in Y)
    r2 = 1 - rss / tss
    dec = lambda f: Decimal(f.numerator) / Decimal(f.denominator)
    se = [(dec(s2 * G[a][a])).sqrt() for a in range(p)]
    return [dec(v) for v in b], se, dec(s2).sqrt(), dec(r2)


def write(name, xs, ys, degree, intercept, note, decimal_text=False):
    if decimal_text:
        # The decimal values printed in the CSV (repr), with exact powers: what NIST certifies for its files.
        dx = [Fraction(Decimal(repr(x))) for x in xs]
        rows = [[d ** k for k in range(1, degree + 1)] for d in dx]
        ys_used = [Fraction(Decimal(repr(v))) for v in ys]
        name_out = name + ".decimal"
    else:
        rows = [powers(x, degree) for x in xs]
        ys_used = ys
        name_out = name
    b, se, sigma, r2 = exact_fit(rows, ys_used, intercept)
    with open(name + ".csv", "w") as f:
        f.write("y,x\n")
        for x, y in zip(xs, ys):
            f.write(repr(y) + "," + repr(x) + "\n")
    with open(name_out + ".certified.txt", "w") as f:
        f.write("# " + note + "\n")
        f.write("# degree %d, intercept %s, n %d; exact rational least squares on the %s\n" % (degree, intercept, len(xs), "decimal text with exact powers" if decimal_text else "double design"))
        f.write("degree %d\nintercept %d\n" % (degree, 1 if intercept else 0))
        for j, (bj, sj) in enumerate(zip(b, se)):
            f.write("B%d %s %s\n" % (j if intercept else j + 1, format(bj, ".17e"), format(sj, ".17e")))
        f.write("residual_sd %s\n" % format(sigma, ".17e"))
        f.write("r_squared %s\n" % format(r2, ".17e"))


rng = random.Random(20261201)
# Degree-10 polynomial on x in [-8.8, -3.1] with 82 rows and 10-digit x values, the shape of NIST's Filip
# (not Filip's data: its values are not available here).
xs = [round(-3.1 - 5.7 * rng.random(), 9) for _ in range(82)]
ys = [round(0.85 + 0.02 * (x + 6) - 0.004 * (x + 6) ** 2 + 0.0009 * (x + 6) ** 3 + rng.gauss(0, 0.003), 4) for x in xs]
write("filip_like", xs, ys, 10, True, "Filip-like: degree 10 polynomial, x in [-8.8,-3.1], seeded random.Random(20261201)")
write("filip_like", xs, ys, 10, True, "Filip-like, reference for the decimal text of the CSV with exact powers", decimal_text=True)

# Degree-5 polynomial on x = 0..20 with very large residuals (the shape of NIST's Wampler5).
xs = [float(i) for i in range(21)]
ys = [float(round(1 + x + x**2 + x**3 + x**4 + x**5 + rng.gauss(0, 5e6))) for x in xs]
write("wampler_like", xs, ys, 5, True, "Wampler5-like: degree 5 on 0..20 with noise sd 5e6, seeded")

# No-intercept straight line through three points (the shape of NIST's NoInt2).
xs = [4.0, 5.0, 6.0, 7.5]
ys = [3.0, 4.1, 4.0, 5.3]
write("noint_like", xs, ys, 1, False, "NoInt2-like: y = B1*x, 4 rows, uncentred R^2")
