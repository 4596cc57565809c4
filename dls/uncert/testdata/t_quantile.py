#!/usr/bin/python3
"""t_0.975(nu) for even nu from the closed form of Student's t distribution
(Abramowitz & Stegun 1964, 26.7.4): P(T <= t) = (1 + A)/2 with
A(t|nu) = sin(th)*[1 + cos^2/2 + 1*3/(2*4) cos^4 + ...
                   + 1*3*...*(nu-3)/(2*4*...*(nu-2)) cos^(nu-2)],
sin(th) = t/sqrt(nu+t^2), cos^2(th) = nu/(nu+t^2), solved for A = 0.95 by
bisection in 45-digit decimal arithmetic (no floating point anywhere); and
the normal quantile z_0.975 (nu = inf) from the series of erf (A&S 7.1.5)
with pi from Machin's formula, solved the same way. The reference values of
tquantile_test.go come from

  python3 t_quantile.py 4 10 30 100 200 500 1000 2000 10000 100000 inf
"""
from decimal import Decimal as D, getcontext
import sys
getcontext().prec = 45
def A(t, nu):
    c2 = D(nu) / (D(nu) + t * t)
    s = t / (D(nu) + t * t).sqrt()
    term = D(1); tot = D(1)
    for k in range(1, nu // 2):
        term = term * c2 * D(2 * k - 1) / D(2 * k)
        tot += term
        if term < D(10) ** -44:
            break
    return s * tot
def q(nu):
    lo, hi = D("1.9"), D("13")
    for _ in range(150):
        mid = (lo + hi) / 2
        if A(mid, nu) < D("0.95"):
            lo = mid
        else:
            hi = mid
    return (lo + hi) / 2
def atan_inv(n):  # atan(1/n)
    x = D(1) / n; x2 = x * x; s = x; term = x; k = 1
    while True:
        term *= -x2; k += 2; t = term / k
        if abs(t) < D(10) ** -44:
            return s
        s += t
def erf(x):
    pi = 4 * (4 * atan_inv(5) - atan_inv(239))
    s = D(0); term = x; n = 0
    while True:
        t = term / (2 * n + 1)
        if abs(t) < D(10) ** -44:
            return 2 / pi.sqrt() * s
        s += t; n += 1; term *= -x * x / n
def z975():
    lo, hi = D("1.9"), D("2.0")
    for _ in range(150):
        mid = (lo + hi) / 2
        if (1 + erf(mid / D(2).sqrt())) / 2 < D("0.975"):
            lo = mid
        else:
            hi = mid
    return (lo + hi) / 2
for a in sys.argv[1:]:
    print(a, format(z975() if a == "inf" else q(int(a)), ".25f"))
