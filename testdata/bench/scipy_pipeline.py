#!/usr/bin/python3
"""A plain scipy pipeline of the kind a laboratory script runs, timed by
vs_scipy.sh beside 'dlsbatch run' on the same files. Per correlogram file
(the CSV format dlsbatch reads: '# key: value' lines, a header, lag in s and
g2 columns):

  - a second-order cumulant fit of g2 = B + beta*exp(-2*G*tau)*(1 + mu2*tau^2/2)^2
    (scipy.optimize.curve_fit) over the channels before g1 falls below 0.1,
    the baseline started at the mean of the last tenth of the channels;
  - g1 = sqrt((g2 - B)/beta) (negative values set to 0);
  - for 20 strengths lambda from 1e-10 to 1, scipy.optimize.nnls of the
    Tikhonov-augmented problem [K; alpha*L] x = [g1; 0] on 100 log-spaced
    decay rates from 0.2/tau_max to 1/tau_min, alpha^2 = lambda*tr(K'K)/tr(L'L),
    L the second differences;
  - the largest lambda whose residual sum of squares is within 5 % of the
    smallest, its mean decay rate, and the z-average by Stokes-Einstein
    (water at 25 C unless the file says otherwise).

It does less than dlsbatch (no weights, no second pass, no Mie weights, no
uncertainty budget, no QC, no report) and writes one CSV line per file.

usage: OPENBLAS_NUM_THREADS=1 scipy_pipeline.py OUT.csv FILE...
"""

import math
import sys
import warnings

import numpy as np
from scipy.optimize import OptimizeWarning, curve_fit, nnls

warnings.simplefilter("ignore", OptimizeWarning)

KB = 1.380649e-23


def read(path):
    meta = {}
    rows = []
    with open(path) as f:
        header = None
        for line in f:
            line = line.strip()
            if not line:
                continue
            if line.startswith("#"):
                k, _, v = line[1:].partition(":")
                meta[k.strip()] = v.strip()
                continue
            if header is None:
                header = line
                continue
            a, b = line.split(",")[:2]
            rows.append((float(a), float(b)))
    d = np.array(rows)
    return meta, d[:, 0], d[:, 1]


def model(t, b, beta, g, mu2):
    return b + beta * np.exp(-2 * g * t) * (1 + mu2 * t * t / 2) ** 2


def analyse(path, grids):
    meta, tau, g2 = read(path)
    m = len(tau)
    far = np.mean(g2[-max(5, m // 10):])
    beta0 = np.mean(g2[:3]) - far
    g1 = np.sqrt(np.clip((g2 - far) / beta0, 0, None))
    end = int(np.argmax(g1 < 0.1)) or m
    end = max(end, 8)
    g0 = 1 / tau[int(np.argmin(np.abs(g1[:end] - 1 / math.e)))]
    p, _ = curve_fit(model, tau[:end], g2[:end], p0=[far, beta0, g0, 0.0], maxfev=2000)
    b, beta, gamma, mu2 = p
    g1 = np.sqrt(np.clip((g2 - b) / beta, 0, None))

    key = (m, tau[0], tau[-1])
    if key not in grids:
        n = 100
        rates = np.geomspace(0.2 / tau[-1], 1 / tau[0], n)
        K = np.exp(-np.outer(tau, rates))
        L = np.zeros((n + 2, n))
        for r in range(n + 2):
            for col, c in ((r - 2, 1.0), (r - 1, -2.0), (r, 1.0)):
                if 0 <= col < n:
                    L[r, col] = c
        grids[key] = (rates, K, L, np.trace(K.T @ K) / np.trace(L.T @ L))
    rates, K, L, ratio = grids[key]
    rhs = np.concatenate([g1, np.zeros(L.shape[0])])
    sols = []
    for lam in np.logspace(-10, 0, 20):
        x, rnorm = nnls(np.vstack([K, math.sqrt(lam * ratio) * L]), rhs, maxiter=30 * len(rates))
        rss = float(np.sum((K @ x - g1) ** 2))
        sols.append((lam, rss, x))
    best = min(s[1] for s in sols)
    lam, rss, x = [s for s in sols if s[1] <= 1.05 * best][-1]
    mean_rate = float(x @ rates / x.sum()) if x.sum() > 0 else 0.0

    t_k = float(meta.get("temperature_c", "25")) + 273.15
    lam0 = float(meta.get("wavelength_nm", "633")) * 1e-9
    theta = math.radians(float(meta.get("angle_deg", "173")))
    n_med, eta = 1.33162, 0.890022e-3  # water at 25 C
    q = 4 * math.pi * n_med / lam0 * math.sin(theta / 2)
    z = KB * t_k * q * q / (3 * math.pi * eta * gamma) * 1e9
    return f"{path},{z:.6g},{mu2 / gamma ** 2:.6g},{lam:.3g},{mean_rate:.6g}"


def main():
    out, files = sys.argv[1], sys.argv[2:]
    grids = {}
    with open(out, "w") as f:
        f.write("file,z_avg_nm,pdi,lambda,mean_rate_per_s\n")
        for path in files:
            try:
                f.write(analyse(path, grids) + "\n")
            except Exception as e:  # a failed fit is a row, as in dlsbatch
                f.write(f"{path},error: {e},,,\n")


if __name__ == "__main__":
    main()
