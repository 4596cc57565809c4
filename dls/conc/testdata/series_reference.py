#!/usr/bin/python3
"""Reference values for the dilution-series regression test (dls/conc).

Weighted straight-line fit D = a + b*c with weights 1/u(D)^2 by numpy.polyfit
(w = 1/u, cov='unscaled': the covariance for known uncertainties), the
reduced chi-square, the Birge-scaled covariance and k_D = b/a with its
first-order (delta-method) uncertainty. Run with Debian's python3-numpy:

    /usr/bin/python3 dls/conc/testdata/series_reference.py
"""
import numpy as np
from scipy import stats

c = np.array([0.5, 1.0, 2.0, 4.0, 8.0])           # mg/mL
d = np.array([4.93e-12, 4.97e-12, 5.02e-12, 5.16e-12, 5.37e-12])  # m^2/s
u = np.array([0.02e-12, 0.02e-12, 0.025e-12, 0.03e-12, 0.04e-12])


def report(c, d, u):
    p, cov = np.polyfit(c, d, 1, w=1 / u, cov="unscaled")
    b, a = p
    var_b, var_a, cov_ab = cov[0, 0], cov[1, 1], cov[0, 1]
    r = d - (a + b * c)
    chi2 = float(np.sum((r / u) ** 2))
    nu = len(c) - 2
    red = chi2 / nu
    s = max(1.0, red)
    kd = b / a
    ga, gb = -b / a**2, 1 / a
    var_kd = ga**2 * var_a + gb**2 * var_b + 2 * ga * gb * cov_ab
    print(f"a      = {a:.10e}")
    print(f"b      = {b:.10e}")
    print(f"u(a)   = {np.sqrt(var_a):.10e}   (Birge {np.sqrt(var_a * s):.10e})")
    print(f"u(b)   = {np.sqrt(var_b):.10e}   (Birge {np.sqrt(var_b * s):.10e})")
    print(f"cov    = {cov_ab:.10e}")
    print(f"chi2   = {chi2:.10f}  reduced {red:.10f}  p = {stats.chi2.sf(chi2, nu):.10f}")
    print(f"k_D    = {kd:.10f}  u = {np.sqrt(var_kd):.10f}   (Birge {np.sqrt(var_kd * s):.10f})")


print("set 1: scatter within the stated uncertainties")
report(c, d, u)
print("set 2: same concentrations, more scatter, u = 0.01e-12 (Birge scaling active)")
report(c, np.array([4.93e-12, 4.99e-12, 5.00e-12, 5.18e-12, 5.36e-12]), np.full(5, 0.01e-12))
