// Package resultdiff compares two result sets measurement by measurement,
// for a CI job that must say "nothing moved" after an upgrade or a change
// of settings. Measurements are matched by the SHA-256 of their input file
// (from each set's manifest) and their run label, so a renamed or moved
// input still matches; samples by name, lot and temperatures. Numeric
// cells are compared with a tolerance per column, text cells exactly.
package resultdiff

import (
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
)

// Tol is the tolerance of one column: |a − b| ≤ Abs + Rel·max(|a|, |b|).
// Exact compares the cells as text.
type Tol struct {
	Abs, Rel float64
	Exact    bool
}

// DefaultTol is the tolerance of a column without one given: sizes
// (columns in nm) 0.1 % relative, PDI 0.005 absolute, other numbers 0.1 %
// relative, text (status, flags, verdicts, messages) exact.
func DefaultTol(column string) Tol {
	switch {
	case strings.HasSuffix(column, "_nm"):
		return Tol{Rel: 1e-3}
	case column == "pdi" || column == "pdi_mean" || column == "linear_pdi" || column == "pdi_sd":
		return Tol{Abs: 0.005}
	}
	return Tol{Rel: 1e-3}
}

// ParseTol reads "column=value": a value ending in % is relative, "exact"
// ParseTols reads every --tol of a command line (ParseTol) into a map by
// column; a later one for a column wins.
func ParseTols(list []string) (map[string]Tol, error) {
	tol := map[string]Tol{}
	for _, s := range list {
		col, t, err := ParseTol(s)
		if err != nil {
			return nil, err
		}
		tol[col] = t
	}
	return tol, nil
}

// compares text, anything else is absolute.
func ParseTol(s string) (string, Tol, error) {
	col, v, ok := strings.Cut(s, "=")
	if !ok || col == "" {
		return "", Tol{}, fmt.Errorf("--tol %q: want column=value, e.g. z_avg_nm=0.5%% or pdi=0.01", s)
	}
	if v == "exact" {
		return col, Tol{Exact: true}, nil
	}
	rel := strings.HasSuffix(v, "%")
	x, err := strconv.ParseFloat(strings.TrimSuffix(v, "%"), 64)
	if err != nil || x < 0 || math.IsInf(x, 0) || math.IsNaN(x) {
		return "", Tol{}, fmt.Errorf("--tol %q: %q is not a tolerance (a number, a percentage, or exact)", s, v)
	}
	if rel {
		return col, Tol{Rel: x / 100}, nil
	}
	return col, Tol{Abs: x}, nil
}

// Difference is one cell out of tolerance.
type Difference struct {
	Table, Key, Column string
	Old, New           string
	// Excess is |a − b| over the allowed difference (∞ for text).
	Excess float64
}

// Report is the outcome of a comparison.
type Report struct {
	Matched            int // measurements and samples found in both
	OnlyOld, OnlyNew   []string
	Differences        []Difference // worst first
	ColumnsOnlyOld     []string     // columns one set has and the other lacks
	ColumnsOnlyNew     []string
	DriftedMeasurement int
}

// Drift reports whether anything moved beyond tolerance.
func (r *Report) Drift() bool {
	return len(r.OnlyOld)+len(r.OnlyNew)+len(r.Differences)+len(r.ColumnsOnlyOld)+len(r.ColumnsOnlyNew) > 0
}

// Compare compares the result sets in the folders old and new. tol gives
// tolerances by column (others take DefaultTol).
func Compare(old, new string, tol map[string]Tol) (*Report, error) {
	rep := &Report{}
	for _, t := range []struct {
		file string
		key  func(row map[string]string, hashes map[string]string) string
	}{
		{"results.csv", func(row, h map[string]string) string {
			id := row["file"]
			if s, ok := h[row["file"]]; ok {
				id = "sha256:" + s[:12]
			}
			return id + "[" + row["run"] + "] " + row["file"]
		}},
		{"samples.csv", func(row, _ map[string]string) string {
			return row["sample"] + " / " + row["lot"] + " @ " + row["temperature_c"] + " °C"
		}},
	} {
		a, ca, err := readTable(old, t.file, t.key)
		if err != nil {
			return nil, err
		}
		b, cb, err := readTable(new, t.file, t.key)
		if err != nil {
			return nil, err
		}
		rep.ColumnsOnlyOld = append(rep.ColumnsOnlyOld, minus(ca, cb)...)
		rep.ColumnsOnlyNew = append(rep.ColumnsOnlyNew, minus(cb, ca)...)
		keys := make([]string, 0, len(a))
		for k := range a {
			keys = append(keys, k)
		}
		sort.Strings(keys)
		for _, k := range keys {
			rb, ok := b[k]
			if !ok {
				rep.OnlyOld = append(rep.OnlyOld, t.file+": "+k)
				continue
			}
			rep.Matched++
			drifted := false
			for _, c := range ca {
				if _, both := rb[c]; !both || c == "file" {
					continue // the file name may change; the input hash matched
				}
				if d, out := compareCell(c, a[k][c], rb[c], tol); out {
					d.Table, d.Key = t.file, k
					rep.Differences = append(rep.Differences, d)
					drifted = true
				}
			}
			if drifted && t.file == "results.csv" {
				rep.DriftedMeasurement++
			}
		}
		var onlyNew []string
		for k := range b {
			if _, ok := a[k]; !ok {
				onlyNew = append(onlyNew, t.file+": "+k)
			}
		}
		sort.Strings(onlyNew)
		rep.OnlyNew = append(rep.OnlyNew, onlyNew...)
	}
	sort.SliceStable(rep.Differences, func(i, j int) bool { return rep.Differences[i].Excess > rep.Differences[j].Excess })
	return rep, nil
}

func compareCell(col, a, b string, tol map[string]Tol) (Difference, bool) {
	d := Difference{Column: col, Old: a, New: b}
	if a == b {
		return d, false
	}
	t, ok := tol[col]
	if !ok {
		t = DefaultTol(col)
	}
	x, errA := strconv.ParseFloat(a, 64)
	y, errB := strconv.ParseFloat(b, 64)
	if t.Exact || errA != nil || errB != nil {
		d.Excess = math.Inf(1)
		return d, true
	}
	allowed := t.Abs + t.Rel*math.Max(math.Abs(x), math.Abs(y))
	diff := math.Abs(x - y)
	if diff <= allowed {
		return d, false
	}
	d.Excess = math.Inf(1)
	if allowed > 0 {
		d.Excess = diff / allowed
	}
	return d, true
}

// readTable reads a CSV table of a result set into rows by key.
func readTable(dir, name string, key func(row, hashes map[string]string) string) (map[string]map[string]string, []string, error) {
	hashes, err := inputHashes(dir)
	if err != nil {
		return nil, nil, err
	}
	f, err := os.Open(filepath.Join(dir, name))
	if err != nil {
		return nil, nil, err
	}
	defer f.Close()
	r := csv.NewReader(f)
	head, err := r.Read()
	if err != nil {
		return nil, nil, fmt.Errorf("%s: %w", filepath.Join(dir, name), err)
	}
	rows := map[string]map[string]string{}
	for {
		rec, err := r.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return nil, nil, fmt.Errorf("%s: %w", filepath.Join(dir, name), err)
		}
		row := make(map[string]string, len(head))
		for i, h := range head {
			if i < len(rec) {
				row[h] = rec[i]
			}
		}
		k := key(row, hashes)
		for n := 2; rows[k] != nil; n++ { // the same input twice: keep both
			k = fmt.Sprintf("%s #%d", key(row, hashes), n)
		}
		rows[k] = row
	}
	return rows, head, nil
}

// inputHashes maps each input of a set (path as recorded) to its SHA-256.
func inputHashes(dir string) (map[string]string, error) {
	b, err := os.ReadFile(filepath.Join(dir, "manifest.json"))
	if err != nil {
		return nil, fmt.Errorf("%s: not a result set: %w", dir, err)
	}
	var m struct {
		Inputs []struct {
			Path, SHA256 string
		} `json:"inputs"`
	}
	if err := json.Unmarshal(b, &m); err != nil {
		return nil, fmt.Errorf("%s: %w", filepath.Join(dir, "manifest.json"), err)
	}
	out := map[string]string{}
	for _, in := range m.Inputs {
		if len(in.SHA256) >= 12 {
			out[in.Path] = in.SHA256
		}
	}
	return out, nil
}

func minus(a, b []string) []string {
	in := map[string]bool{}
	for _, x := range b {
		in[x] = true
	}
	var out []string
	for _, x := range a {
		if !in[x] {
			out = append(out, x)
		}
	}
	return out
}

// Write prints the report for a CI log: counts, then the worst
// differences (at most max), as plain text or, with markdown, as a table.
func (r *Report) Write(w io.Writer, max int, markdown bool) {
	state := "within tolerance"
	if r.Drift() {
		state = "DRIFT"
	}
	fmt.Fprintf(w, "%s: %d rows matched, %d measurements drifted, %d cells out of tolerance, %d only in old, %d only in new\n",
		state, r.Matched, r.DriftedMeasurement, len(r.Differences), len(r.OnlyOld), len(r.OnlyNew))
	for _, c := range r.ColumnsOnlyOld {
		fmt.Fprintf(w, "column only in old: %s\n", c)
	}
	for _, c := range r.ColumnsOnlyNew {
		fmt.Fprintf(w, "column only in new: %s\n", c)
	}
	for _, k := range r.OnlyOld {
		fmt.Fprintf(w, "only in old: %s\n", k)
	}
	for _, k := range r.OnlyNew {
		fmt.Fprintf(w, "only in new: %s\n", k)
	}
	if len(r.Differences) == 0 {
		return
	}
	n := min(max, len(r.Differences))
	if markdown {
		fmt.Fprintf(w, "\n| table | row | column | old | new | × tolerance |\n|---|---|---|---|---|---|\n")
	} else {
		fmt.Fprintf(w, "worst %d:\n", n)
	}
	for _, d := range r.Differences[:n] {
		ex := "text"
		if !math.IsInf(d.Excess, 1) {
			ex = strconv.FormatFloat(d.Excess, 'f', 1, 64)
		}
		if markdown {
			fmt.Fprintf(w, "| %s | %s | %s | %s | %s | %s |\n", d.Table, md(d.Key), d.Column, md(d.Old), md(d.New), ex)
		} else {
			fmt.Fprintf(w, "  %s %s %s: %q → %q (%s)\n", d.Table, d.Key, d.Column, d.Old, d.New, ex)
		}
	}
}

func md(s string) string { return strings.ReplaceAll(strings.ReplaceAll(s, "|", `\|`), "\n", " ") }
