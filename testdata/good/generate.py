#!/usr/bin/env python3
"""Writes the correlogram fixtures of testdata/good and testdata/bad.

Every correlation value is a closed form of invented parameters, so tests can
check what the reader returns against the formula instead of against its own
output:

    g2(tau)   = 1 + beta * exp(-2 * Gamma * tau)     (tau in seconds)
    g2m1(tau) = beta * exp(-2 * Gamma * tau)
    g1(tau)   = exp(-Gamma * tau)
    sigma_k   = s0 * (1 + k / 10)                    (k = 0-based row)

Lags are tau_k = tau0 * r**k, written in the file's unit with seven
significant digits; the correlation is computed from the written (rounded)
lag and written with 7 decimals, sigma with seven significant digits. The
parameters of each file are in the table FILES below and in README.md.

Run from the repository root:  python3 testdata/good/generate.py
"""
import math
import os

HERE = os.path.dirname(os.path.abspath(__file__))
BAD = os.path.join(os.path.dirname(HERE), "bad")
SCALE = {"s": 1.0, "ms": 1e3, "us": 1e6}


def lags(unit, tau0_s, ratio, n):
    out = []
    for k in range(n):
        text = "%.6e" % (tau0_s * ratio ** k * SCALE[unit])
        out.append((text, float(text) / SCALE[unit]))
    return out


def corr(kind, beta, gamma, tau_s):
    if kind == "g2":
        return 1 + beta * math.exp(-2 * gamma * tau_s)
    if kind == "g2m1":
        return beta * math.exp(-2 * gamma * tau_s)
    return math.exp(-gamma * tau_s)


def table(unit, kind, runs, n=24, tau0=1e-6, ratio=1.4, sep=",", dec=".", names=None):
    """runs: list of (label, beta, gamma, s0 or None)."""
    head = ["tau_" + unit]
    for label, _, _, s0 in runs:
        head.append(kind + ("_" + label if label else ""))
        if s0 is not None:
            head.append("sigma" + ("_" + label if label else ""))
    if names:
        head = names
    rows = [sep.join(head)]
    for k, (text, tau_s) in enumerate(lags(unit, tau0, ratio, n)):
        cells = [text]
        for _, beta, gamma, s0 in runs:
            cells.append("%.7f" % corr(kind, beta, gamma, tau_s))
            if s0 is not None:
                cells.append("%.6e" % (s0 * (1 + k / 10)))
        if dec != ".":
            cells = [c.replace(".", dec) for c in cells]
        rows.append(sep.join(cells))
    return rows


def write(path, lines, eol="\n", bom=False):
    data = eol.join(lines) + eol
    with open(path, "wb") as f:
        if bom:
            f.write(b"\xef\xbb\xbf")
        f.write(data.encode("utf-8"))


META = [
    "# sample: demo-lot-A1",
    "# temperature_c: 25.0",
    "# wavelength_nm: 633",
    "# angle_deg: 173",
    "# solvent: water",
    "# particle_ri: 1.59+0.0i",
    "# count_rate_kcps: 312.5",
    "# duration_s: 10",
]


def good():
    g = lambda name: os.path.join(HERE, name)
    # Single run, lags in s, g2, full metadata.
    write(g("single_g2_s.csv"), META + table("s", "g2", [("", 0.9, 2000.0, None)]))
    # Three runs in microseconds with sigma for two of them; a run key that
    # the column labels replace; a comment and a blank line.
    write(g("multirun_us.csv"),
          ["# sample: demo-lot-A2", "# run: whole-set", "# temperature_c: 25.0", "# a plain comment line", ""]
          + table("us", "g2", [("r1", 0.85, 1500.0, 2e-4), ("r2", 0.85, 2000.0, 2e-4), ("r3", 0.85, 2500.0, None)]))
    # g2 - 1 with lags in ms and a sigma column.
    write(g("g2m1_ms.csv"), ["# sample: demo-lot-B1", "# temperature_c: 20.0"]
          + table("ms", "g2m1", [("", 0.8, 500.0, 1e-4)], tau0=1e-5))
    # g1 with lags in us.
    write(g("g1_us.csv"), ["# sample: demo-lot-C1"] + table("us", "g1", [("", 1.0, 3000.0, None)]))
    # Semicolon-delimited export with decimal commas, CRLF line ends and a
    # UTF-8 byte order mark, lags in ms.
    write(g("semicolon_ms.csv"), ["# sample: demo-lot-D1", "# temperature_c: 20.0"]
          + table("ms", "g2", [("", 0.75, 1200.0, None)], sep=";", dec=","), eol="\r\n", bom=True)
    # Tab-delimited, lags in s.
    write(g("tabs_s.csv"), table("s", "g2", [("", 0.9, 800.0, None)], sep="\t"))
    # A foreign export: its own column names, a leading index column, a text
    # column and no metadata. Columns: Index, Lag time (ms), Correlation,
    # Std dev, Flag.
    rows = table("ms", "g2", [("", 0.7, 1000.0, 3e-4)])
    out = ["# correlogram export of a generic instrument", "Index,Lag time (ms),Correlation,Std dev,Flag"]
    for k, r in enumerate(rows[1:]):
        out.append("%d,%s,%s" % (k + 1, r, "ok" if k % 5 else "check"))
    write(g("foreign_ms.csv"), out)


def bad():
    b = lambda name: os.path.join(BAD, name)
    os.makedirs(BAD, exist_ok=True)
    base = table("s", "g2", [("", 0.9, 2000.0, None)], n=12)
    meta = ["# sample: demo-bad"]

    def edit(rows, row, col, value):
        """Replaces cell col of data row `row` (0-based)."""
        rows = list(rows)
        cells = rows[1 + row].split(",")
        cells[col] = value
        rows[1 + row] = ",".join(cells)
        return rows

    write(b("missing_header.csv"), meta + base[1:])                      # numbers where the header belongs
    write(b("unknown_header_no_lag.csv"), meta + ["time,g2"] + base[1:])
    write(b("unknown_header_no_corr.csv"), meta + ["tau_s,intensity"] + base[1:])
    write(b("non_numeric.csv"), meta + edit(base, 4, 1, "1.9x2"))        # line 7, cell 2
    write(b("nan_value.csv"), meta + edit(base, 5, 1, "NaN"))            # line 8, cell 2
    write(b("inf_value.csv"), meta + edit(base, 6, 1, "+Inf"))           # line 9, cell 2
    # Numbers Go's strconv.ParseFloat reads (as 1.875, 19 and 0) but dlsbatch does not.
    write(b("hex_value.csv"), meta + edit(base, 4, 1, "0x1.ep0"))        # line 7, cell 2
    write(b("digit_separator.csv"), meta + edit(base, 5, 1, "1_9"))      # line 8, cell 2
    write(b("underflow_value.csv"), meta + edit(base, 6, 1, "1e-400"))   # line 9, cell 2
    write(b("negative_lag.csv"), meta + edit(base, 0, 0, "-1.000000e-06"))  # line 3
    write(b("zero_lag.csv"), meta + edit(base, 0, 0, "0"))               # line 3
    rows = list(base)
    rows[1 + 3], rows[1 + 4] = rows[1 + 4], rows[1 + 3]
    write(b("non_increasing_lag.csv"), meta + rows)                      # line 7 smaller than line 6
    write(b("too_few_points.csv"), meta + base[:1 + MIN - 1])            # MIN - 1 rows
    write(b("empty.csv"), [], eol="")
    with open(b("empty.csv"), "wb"):
        pass
    with open(b("not_text_nul.csv"), "wb") as f:                         # NUL bytes on line 2
        f.write(b"tau_s,g2\n\x00\x00\x01\x02\x03binary\n")
    with open(b("not_text_utf8.csv"), "wb") as f:                        # invalid UTF-8 and Windows-1252 on line 3
        f.write(b"# sample: demo-bad\ntau_s,g2\n1.0e-06,1.9\x81\xfe\n")
    rows = list(base)
    rows[1 + 2] += ",1.5"
    write(b("wrong_cell_count.csv"), meta + rows)                        # line 5 has 3 cells
    write(b("duplicate_column.csv"), meta + ["tau_s,g2,G2"] + [r + ",1.0" for r in base[1:]])  # cell 3
    write(b("bad_metadata.csv"), ["# sample: demo-bad", "# temperature_c: warm"] + base)  # line 2
    multi = table("s", "g2", [("a", 0.9, 2000.0, None), ("b", 0.9, 1000.0, None), ("c", 0.9, 500.0, None)], n=12)
    write(b("multirun_bad_value.csv"), meta + edit(multi, 3, 2, "n/a"))  # run b, line 6, cell 3
    write(b("multirun_bad_lag.csv"), meta + edit(multi, 3, 0, "abc"))    # every run, line 6, cell 1
    write(b("orphan_sigma.csv"), meta + ["tau_s,g2_a,sigma_b"] + [r + ",1e-3" for r in table("s", "g2", [("a", 0.9, 2000.0, None)], n=12)[1:]])
    write(b("mixed_kinds.csv"), meta + ["tau_s,g2_a,g1_b"] + [r + ",0.5" for r in base[1:]])
    write(b("negative_sigma.csv"), meta + edit(table("s", "g2", [("", 0.9, 2000.0, 1e-3)], n=12), 2, 2, "-1.0e-03"))
    with open(b("utf16.csv"), "wb") as f:
        f.write("tau_s,g2\n1e-6,1.9\n".encode("utf-16"))


MIN = 8

if __name__ == "__main__":
    good()
    bad()
