#!/usr/bin/python3
"""Viscosity of liquid water at 0.101325 MPa from the IAPWS 2008 formulation
(IAPWS R12-08; M. L. Huber et al., New international formulation for the
viscosity of H2O, J. Phys. Chem. Ref. Data 38, 101 (2009)), written
independently of the Go code as a source of check values.

The density comes from M. Tanaka, G. Girard, R. Davis, A. Peuto,
N. Bignell, Recommended table for the density of water between 0 C and
40 C based on recent experimental reports, Metrologia 38, 301 (2001)
(air-free water at 101.325 kPa), not from the Patek et al. (2009)
correlation the Go code uses, so that the two paths share nothing but the
viscosity formula itself. The critical enhancement is 1 (the release allows
it outside the critical region).

The script first reproduces the release's check value (Table 4: 298.15 K,
998 kg/m3 -> 889.735100 uPa s) and then prints eta in mPa s at the
temperatures given (in degrees Celsius, 0-40, the range of the density
table), default 25 and 27.

usage: iapws_viscosity.py [T_C ...]
"""

import math
import sys

T_STAR, RHO_STAR = 647.096, 322.0  # K, kg/m3; mu* = 1e-6 Pa s

H0 = [1.67752, 2.20462, 0.6366564, -0.241605]
# H1[i][j]: i = temperature index 0..5, j = density index 0..6.
H1 = [
    [5.20094e-1, 2.22531e-1, -2.81378e-1, 1.61913e-1, -3.25372e-2, 0, 0],
    [8.50895e-2, 9.99115e-1, -9.06851e-1, 2.57399e-1, 0, 0, 0],
    [-1.08374, 1.88797, -7.72479e-1, 0, 0, 0, 0],
    [-2.89555e-1, 1.26613, -4.89837e-1, 0, 6.98452e-2, 0, -4.35673e-3],
    [0, 0, -2.57040e-1, 0, 0, 8.72102e-3, 0],
    [0, 1.20573e-1, 0, 0, 0, 0, -5.93264e-4],
]


def mu_upas(t_k, rho):
    """IAPWS 2008 viscosity in uPa s at t_k kelvin and density rho kg/m3."""
    tb, rb = t_k / T_STAR, rho / RHO_STAR
    mu0 = 100 * math.sqrt(tb) / sum(h / tb**i for i, h in enumerate(H0))
    s = 0.0
    for i in range(6):
        inner = sum(H1[i][j] * (rb - 1) ** j for j in range(7))
        s += (1 / tb - 1) ** i * inner
    mu1 = math.exp(rb * s)
    return mu0 * mu1


def tanaka_density(t_c):
    """Tanaka et al. 2001, kg/m3, 0-40 C at 101.325 kPa."""
    a1, a2, a3, a4, a5 = -3.983035, 301.797, 522528.9, 69.34881, 999.974950
    return a5 * (1 - (t_c + a1) ** 2 * (t_c + a2) / (a3 * (t_c + a4)))


def main():
    check = mu_upas(298.15, 998.0)
    if abs(check / 889.735100 - 1) > 1e-8:
        sys.exit("release check value not reproduced: %.6f uPa s" % check)
    print("IAPWS R12-08 Table 4: 298.15 K, 998 kg/m3 -> %.6f uPa s (release 889.735100)" % check)
    temps = [float(a) for a in sys.argv[1:]] or [25.0, 27.0]
    for t_c in temps:
        if not 0 <= t_c <= 40:
            sys.exit("%g C is outside the density table's 0-40 C" % t_c)
        rho = tanaka_density(t_c)
        print("t = %6.2f C  rho = %.4f kg/m3  eta = %.6f mPa s" % (t_c, rho, mu_upas(t_c + 273.15, rho) / 1000))


if __name__ == "__main__":
    main()
