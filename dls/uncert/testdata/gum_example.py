#!/usr/bin/python3
"""Worked GUM (JCGM 100:2008) budget for one z-average, for the tests of
dls/uncert. Analytic sensitivity coefficients throughout, including the
temperature coefficient of an Andrade-type viscosity
eta(T) = eta25 * exp(B * (1/T - 1/T25)), for which eta'/eta = -B/T^2.

    /usr/bin/python3 dls/uncert/testdata/gum_example.py
"""
from math import pi, sin, tan, sqrt, radians

kB = 1.380649e-23            # J/K, exact
T, uT = 298.15, 0.1          # K
eta25, B, ueta_rel = 0.890022e-3, 2000.0, 0.01
n, un = 1.33162, 1e-4
theta, utheta = radians(173.0), radians(0.1)
lam, ulam = 632.8e-9, 0.1e-9
G, uG, nuG = 3418.78, 10.0, 100.0

eta = eta25                  # at T = T25
q = 4 * pi * n * sin(theta / 2) / lam
d = kB * T * q * q / (3 * pi * eta * G) * 1e9   # nm

rows = [
    ("decay_rate", G, uG, -d / G, nuG),
    ("temperature", T, uT, d * (1 / T + B / T**2), 0),
    ("viscosity", eta, ueta_rel * eta, -d / eta, 0),
    ("refractive_index", n, un, 2 * d / n, 0),
    ("angle", theta, utheta, d / tan(theta / 2), 0),
    ("wavelength", lam, ulam, -2 * d / lam, 0),
]
uc2 = sum((c * u) ** 2 for _, _, u, c, _ in rows)
ws = sum((c * u) ** 4 / nu for _, _, u, c, nu in rows if nu > 0)
print(f"q  = {q:.10e} 1/m")
print(f"d  = {d:.10f} nm")
for name, v, u, c, nu in rows:
    print(f"{name:17s} value {v:.10g} u {u:.6g} c {c:.10e} c*u {c*u:+.10f} share {100*(c*u)**2/uc2:.6f} %")
print(f"u_c   = {sqrt(uc2):.10f} nm  ({100*sqrt(uc2)/d:.6f} %)")
print(f"U(k=2) = {2*sqrt(uc2):.10f} nm")
print(f"nu_eff = {uc2**2/ws:.6f}")
