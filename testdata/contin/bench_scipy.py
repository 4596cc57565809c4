#!/usr/bin/python3
"""Time scipy on the work that contin.Invert does per correlogram, for the
benchmark correlograms bench_m*.json written by the Go tests
(go test ./contin -run TestBenchProblems -update):

  for every strength lambda of the full scan (smallest first; what
  contin.Invert does with Settings.FullScan, the audit setting; by default
  it solves the smallest and typically 3-6 others, found by a search):
    alpha^2 = lambda*tr(G)/tr(R); scipy.optimize.nnls on the augmented
    matrix [W^1/2 A, W^1/2 1, -W^1/2 1; alpha L, 0, 0]; chi^2, ||Lx||,
    N_DF on the passive set (thin QR), GCV;
  F-test probability to reject (scipy.stats.f.cdf) against the smallest
  lambda, L-curve Menger curvature, then the bisection steps in log lambda
  towards P_reject = 0.5, each with its own nnls.

The kernel, rate grid and second-difference operator are built once outside
the timed loop (the Go benchmark shares its Grid the same way); the weights,
tr(G) and everything after are per correlogram. Prints the median time per
correlogram over the repeats, and the chosen lambda next to the one Go chose.

usage: OPENBLAS_NUM_THREADS=1 bench_scipy.py [-n REPEATS] [FILE ...]
(one BLAS thread, to compare with GOMAXPROCS=1 go test -bench Invert)
"""

import argparse
import glob
import json
import math
import os
import platform
import statistics
import time

import numpy as np
import scipy
from scipy.optimize import nnls
from scipy.stats import f as fdist


def setup(p):
    n = p["n_gamma"]
    gamma = np.geomspace(p["gamma_min_per_s"], p["gamma_max_per_s"], n)
    h = math.log(p["gamma_max_per_s"] / p["gamma_min_per_s"]) / (n - 1)
    w = np.full(n, h)
    w[0] = w[-1] = h / 2
    tau = np.asarray(p["tau_s"])
    A = np.exp(-np.outer(tau, gamma))
    L = np.zeros((n + 2, n))
    for r in range(n + 2):
        c = r - 1
        for col, coef in ((c - 1, 1.0), (c, -2.0), (c + 1, 1.0)):
            if 0 <= col < n:
                L[r, col] = coef
    Lx = L / w[None, :]
    trR = float(np.trace(Lx.T @ Lx))
    return gamma, A, Lx, trR


def invert(p, A, Lx, trR):
    y = np.asarray(p["y"])
    sw = 1 / np.asarray(p["sigma"])
    m, n = A.shape
    WA = sw[:, None] * A
    trG = float(np.sum(WA * WA))
    col = np.concatenate([sw, np.zeros(n + 2)])
    top = np.column_stack([WA, sw, -sw])
    bottom = np.column_stack([Lx, np.zeros(n + 2), np.zeros(n + 2)])
    b = np.concatenate([sw * y, np.zeros(n + 2)])
    ny = m

    def solve(lam):
        alpha = math.sqrt(lam * trG / trR)
        M = np.vstack([top, alpha * bottom])
        x, _ = nnls(M, b, maxiter=3 * M.shape[1])
        amp = x[:n]
        bl = x[n] - x[n + 1]
        r = WA @ amp + sw * bl - sw * y
        chi2 = float(r @ r)
        nlx = float(np.linalg.norm(Lx @ amp))
        P = np.flatnonzero(amp > 0)
        cols = np.column_stack([np.vstack([WA[:, P], alpha * Lx[:, P]]), col])
        Q, _ = np.linalg.qr(cols)
        dof = float(np.sum(Q[:m, :] ** 2))
        den = max(ny - dof, 0.5)
        return {"lambda": lam, "chi2": chi2, "nlx": nlx, "dof": dof, "gcv": ny * chi2 / den**2, "x": x}

    rows = [solve(lam) for lam in p["lambdas"]]
    ref = rows[0]
    v0 = ref["chi2"]
    d1 = max(ref["dof"], 1.0)
    d2 = max(ny - ref["dof"], 1.0)

    def prob(row):
        F = (row["chi2"] - v0) / v0 * d2 / d1
        return float(fdist.cdf(F, d1, d2)) if F > 0 else 0.0

    for row in rows:
        row["p"] = prob(row)
    # L-curve curvature on the base scan (scaled axes), as in Go.
    pts = np.array([[0.5 * math.log10(r["chi2"]), math.log10(max(r["nlx"], 1e-300))] for r in rows])
    span = np.ptp(pts, axis=0)
    span[span <= 0] = 1
    pts = (pts - pts.min(axis=0)) / span
    kept = [0]
    for k in range(1, len(pts)):
        if np.hypot(*(pts[k] - pts[kept[-1]])) >= 0.02 * math.sqrt(2):
            kept.append(k)
    for i in range(1, len(kept) - 1):
        a, bb, c = pts[kept[i - 1]], pts[kept[i]], pts[kept[i + 1]]
        ab, ac, bc = bb - a, c - a, c - bb
        d = np.hypot(*ab) * np.hypot(*ac) * np.hypot(*bc)
        rows[kept[i]]["curv"] = 2 * (ab[0] * ac[1] - ab[1] * ac[0]) / d if d > 0 else 0.0
    # Bisection towards the target probability.
    t = p["target_prob_reject"]
    hi = next((i for i in range(1, len(rows)) if rows[i]["p"] >= t), None)
    if hi is not None:
        lo_row, hi_row = rows[hi - 1], rows[hi]
        for _ in range(p["refine"]):
            lam = math.sqrt(lo_row["lambda"] * hi_row["lambda"])
            row = solve(lam)
            row["p"] = prob(row)
            rows.append(row)
            if row["p"] >= t:
                hi_row = row
            else:
                lo_row = row
    best = min(rows, key=lambda r: abs(r["p"] - t))
    return best["lambda"]


def cpu_model():
    try:
        with open("/proc/cpuinfo") as fh:
            for line in fh:
                if line.startswith("model name"):
                    return line.split(":", 1)[1].strip()
    except OSError:
        pass
    return platform.processor()


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("-n", type=int, default=30, help="timed repeats per file")
    ap.add_argument("files", nargs="*")
    a = ap.parse_args()
    files = a.files or sorted(glob.glob(os.path.join(os.path.dirname(os.path.abspath(__file__)), "bench_m*.json")))
    print("cpu: %s; python %s; numpy %s; scipy %s" % (cpu_model(), platform.python_version(), np.__version__, scipy.__version__))
    for fn in files:
        with open(fn) as fh:
            p = json.load(fh)
        gamma, A, Lx, trR = setup(p)
        invert(p, A, Lx, trR)  # warm up
        times = []
        lam = None
        for _ in range(a.n):
            t0 = time.perf_counter()
            lam = invert(p, A, Lx, trR)
            times.append(time.perf_counter() - t0)
        print("%s: m=%d n=%d, %d strengths + %d bisection steps: median %.2f ms per correlogram (min %.2f ms); chosen lambda %.4g (Go %.4g)" % (
            p["name"], A.shape[0], A.shape[1], len(p["lambdas"]), p["refine"],
            1e3 * statistics.median(times), 1e3 * min(times), lam, p["go_chosen_lambda"]))


if __name__ == "__main__":
    main()
