#!/usr/bin/python3
"""Reference solutions of the regularised non-negative inverse Laplace
transform with scipy.optimize.nnls (Lawson-Hanson active set on the
augmented matrix), for the problems *.problem.json written by the Go tests of
package contin (go test ./contin -run TestReference -update).

Everything is rebuilt here from the problem's primitive inputs: the rate grid
(numpy.geomspace), trapezoid weights, kernel exp(-gamma*tau) (or, with channel
widths, its triangle-weighted average by scipy.integrate.quad), the
second-difference operator on x/w with two zero points beyond each end, the
weights 1/sigma^2 and alpha^2 = lambda*tr(G)/tr(R). The free baseline column is
split into two non-negative columns (+1 and -1), since nnls bounds every
variable.

usage: reference.py [--out DIR] [DIR]
DIR defaults to this script's directory; --out defaults to DIR. For each
NAME.problem.json it writes NAME.scipy.json.
"""

import argparse
import glob
import json
import math
import os
import sys

import numpy as np
import scipy
from scipy import integrate
from scipy.optimize import nnls


def grid(p):
    n = p["n_gamma"]
    gamma = np.geomspace(p["gamma_min_per_s"], p["gamma_max_per_s"], n)
    go = np.asarray(p["gamma_per_s"])
    if not np.allclose(gamma, go, rtol=1e-13, atol=0):
        raise SystemExit("%s: rate grid differs from numpy.geomspace" % p["name"])
    h = math.log(p["gamma_max_per_s"] / p["gamma_min_per_s"]) / (n - 1)
    w = np.full(n, h)
    w[0] = w[-1] = h / 2
    return gamma, w


def kernel(p, gamma):
    tau = np.asarray(p["tau_s"])
    widths = p.get("channel_width_s")
    if not widths:
        return np.exp(-np.outer(tau, gamma))
    # Average of exp(-G*t) over the triangular window of half-width d
    # centred on tau, by adaptive quadrature.
    a = np.empty((len(tau), len(gamma)))
    for i, (t, d) in enumerate(zip(tau, widths)):
        for j, g in enumerate(gamma):
            if d == 0:
                a[i, j] = math.exp(-g * t)
                continue
            f = lambda u: (1 - abs(u) / d) / d * math.exp(-g * (t + u))
            v1, _ = integrate.quad(f, -d, 0, epsabs=0, epsrel=1e-13, limit=200)
            v2, _ = integrate.quad(f, 0, d, epsabs=0, epsrel=1e-13, limit=200)
            a[i, j] = v1 + v2
    return a


def second_difference(n, w):
    L = np.zeros((n + 2, n))
    for r in range(n + 2):
        c = r - 1
        for col, coef in ((c - 1, 1.0), (c, -2.0), (c + 1, 1.0)):
            if 0 <= col < n:
                L[r, col] = coef
    return L / w[None, :]


def solve(p):
    gamma, w = grid(p)
    n = len(gamma)
    A = kernel(p, gamma)
    y = np.asarray(p["y"])
    m = len(y)
    sw = np.ones(m) if p["sigma"] is None else 1 / np.asarray(p["sigma"])
    Lx = second_difference(n, w)
    WA = sw[:, None] * A
    trG = np.trace(WA.T @ WA)
    R = Lx.T @ Lx
    trR = np.trace(R)
    base = p["baseline"]
    out = []
    for lam in p["lambdas"]:
        alpha = math.sqrt(lam * trG / trR)
        M = np.vstack([WA, alpha * Lx])
        if base:
            col = np.concatenate([sw, np.zeros(n + 2)])
            M = np.column_stack([M, col, -col])
        b = np.concatenate([sw * y, np.zeros(n + 2)])
        x, _ = nnls(M, b, maxiter=50 * M.shape[1])
        amp = x[:n]
        bl = x[n] - x[n + 1] if base else 0.0
        r = sw * (A @ amp + bl - y)
        chi2 = float(r @ r)
        nlx = float(np.linalg.norm(Lx @ amp))
        # Effective degrees of freedom on the passive set (baseline always
        # passive): tr[(G_PP + alpha^2 R_PP)^-1 G_PP] = ||Q_1||_F^2, where
        # [W^1/2 A_P; alpha L_P] = [Q_1; Q_2] R is a thin QR factorisation
        # (so W^1/2 A_P R^-1 = Q_1); stable even when G_PP + alpha^2 R_PP
        # is too ill-conditioned to solve with.
        P = np.flatnonzero(amp > 0)
        cols = np.vstack([WA[:, P], alpha * Lx[:, P]])
        if base:
            cols = np.column_stack([cols, np.concatenate([sw, np.zeros(n + 2)])])
        Q, _ = np.linalg.qr(cols)
        dof = float(np.sum(Q[:m, :] ** 2))
        out.append({
            "lambda": lam,
            "alpha": alpha,
            "amplitude": amp.tolist(),
            "baseline": float(bl),
            "chi2": chi2,
            "norm_lx": nlx,
            "objective": chi2 + alpha**2 * nlx**2,
            "dof": dof,
        })
    return out


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("dir", nargs="?", default=os.path.dirname(os.path.abspath(__file__)))
    ap.add_argument("--out", default=None)
    a = ap.parse_args()
    outdir = a.out or a.dir
    files = sorted(glob.glob(os.path.join(a.dir, "*.problem.json")))
    if not files:
        raise SystemExit("no *.problem.json in " + a.dir)
    for f in files:
        with open(f) as fh:
            p = json.load(fh)
        res = {
            "name": p["name"],
            "generator": "testdata/contin/reference.py",
            "scipy_version": scipy.__version__,
            "numpy_version": np.__version__,
            "solutions": solve(p),
        }
        name = os.path.basename(f)[: -len(".problem.json")]
        with open(os.path.join(outdir, name + ".scipy.json"), "w") as fh:
            json.dump(res, fh, indent=1)
            fh.write("\n")
    print("wrote %d reference files to %s" % (len(files), outdir), file=sys.stderr)


if __name__ == "__main__":
    main()
