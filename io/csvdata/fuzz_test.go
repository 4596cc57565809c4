package csvdata_test

import (
	"bytes"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"dlsbatch/dls"
	"dlsbatch/io/csvdata"
)

// FuzzRead: no input panics; every failure is a *dls.PosError with Line >=
// 0; every measurement meets the documented invariants; and whatever reads
// can be written with Write and read again to the same values within the
// precision of Write's formats.
func FuzzRead(f *testing.F) {
	for _, dir := range []string{goodDir, badDir} {
		paths, _ := filepath.Glob(filepath.Join(dir, "*.csv"))
		for _, p := range paths {
			data, err := os.ReadFile(p)
			if err != nil {
				f.Fatal(err)
			}
			f.Add(data)
		}
	}
	f.Add([]byte("lag;a;g2_b;x\n1;0,9;0,8;t\n2;0,8;0,7;u\n3;0,7;0,6;v\n4;0,6;0,5;w\n5;0,5;0,4;x\n6;0,4;0,3;y\n7;0,3;0,2;z\n8;0,2;0,1;-\n"))
	f.Add([]byte("tau_s,g2\n1e-6,1.5\n2e-6,1.4\n3e-6,1.3\n4e-6,1.2\n5e-6,1.1\n6e-6,1.05\n7e-6,1.02\n8e-6,1.01\n"))
	// The number syntax: signs, bare points and exponents that read, and
	// hexadecimal, digit separators, spelt-out infinities and underflows
	// that do not.
	f.Add([]byte("# temperature_c: +25.\n# angle_deg: 1.73E+2\ntau_s,g2\n+1e-6,.5\n2e-6,5.\n3E-6,+1.3\n4e-6,1.2e0\n5e-6,1.1\n6e-6,1.05\n7e-6,1.02\n8e-6,-1.01\n"))
	f.Add([]byte("# duration_s: 1_0\ntau_s,g2\n0x1p-20,1.5\n2e-6,1_4\n3e-6,infinity\n4e-6,1e-400\n5e-6,1 .1\n6e-6,1.05\n7e-6,1.02\n8e-6,1.01\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		// A foreign reading of the same bytes must also fail cleanly.
		for _, e := range csvdata.Read(bytes.NewReader(data), "f.csv", foreignOptions) {
			checkEntry(t, e)
		}

		entries := csvdata.Read(bytes.NewReader(data), "f.csv", nil)
		if len(entries) == 0 {
			t.Fatal("no entries")
		}
		var ok []*dls.Measurement
		for _, e := range entries {
			if checkEntry(t, e) {
				ok = append(ok, e.M)
			}
		}
		if len(ok) == 0 {
			return
		}

		// Write what was read and read it again.
		first := ok[0]
		var meta []dls.Param
		for _, p := range first.Meta.Params() {
			if p.Key != dls.KeyRun {
				meta = append(meta, p)
			}
		}
		cols := make([]csvdata.Column, len(ok))
		for i, m := range ok {
			cols[i] = csvdata.Column{Label: m.Run, Values: m.Corr, Sigma: m.Sigma}
		}
		var b bytes.Buffer
		if err := csvdata.Write(&b, meta, first.TauS, first.TauUnit, first.Kind, cols); err != nil {
			// Labels the reader accepts but the writer cannot express, and
			// lags closer than its seven significant digits, are refused
			// by design; anything else is a bug.
			if s := err.Error(); strings.Contains(s, "run label") || strings.Contains(s, "does not increase") {
				return
			}
			t.Fatalf("write: %v", err)
		}
		again := csvdata.Read(&b, "g.csv", nil)
		if len(again) != len(ok) {
			t.Fatalf("re-read %d entries, want %d\n%s", len(again), len(ok), b.String())
		}
		for i, e := range again {
			if e.Err != nil {
				t.Fatalf("re-read run %d: %v\n%s", i, e.Err, b.String())
			}
			m, w := e.M, ok[i]
			if m.Run != w.Run || m.Kind != w.Kind || m.TauUnit != w.TauUnit || len(m.TauS) != len(w.TauS) || (m.Sigma == nil) != (w.Sigma == nil) {
				t.Fatalf("re-read run %d: run %q kind %v unit %s n %d, want %q %v %s %d",
					i, m.Run, m.Kind, m.TauUnit, len(m.TauS), w.Run, w.Kind, w.TauUnit, len(w.TauS))
			}
			for _, p := range meta {
				if got := m.Meta.String(p.Key); got != p.Value {
					t.Fatalf("re-read meta %s = %q, want %q", p.Key, got, p.Value)
				}
			}
			for k := range w.TauS {
				// %.6e: 7 significant digits, rel <= 5e-7, with slack for the
				// unit conversions and an absolute floor for subnormals.
				if !approx(m.TauS[k], w.TauS[k], 5.1e-7, 1e-300) {
					t.Fatalf("lag %d: %g, want %g", k, m.TauS[k], w.TauS[k])
				}
				// %.7f: abs <= 5e-8, plus one rounding of a large value.
				if d := math.Abs(m.Corr[k] - w.Corr[k]); d > 5e-8+math.Abs(w.Corr[k])*0x1p-52 {
					t.Fatalf("value %d: %g, want %g", k, m.Corr[k], w.Corr[k])
				}
				if w.Sigma != nil && !approx(m.Sigma[k], w.Sigma[k], 5.1e-7, 1e-300) {
					t.Fatalf("sigma %d: %g, want %g", k, m.Sigma[k], w.Sigma[k])
				}
			}
		}
	})
}

// foreignOptions name columns the way a user of a foreign export would.
var foreignOptions = &csvdata.Options{TauColumn: "lag", TauUnit: "ms", CorrColumns: []string{"a", "g2_b"},
	CorrKind: dls.KindG1, Comma: ';'}

// checkEntry asserts the invariants of an Entry and reports whether it holds
// a measurement.
func checkEntry(t *testing.T, e csvdata.Entry) bool {
	t.Helper()
	if (e.Err == nil) == (e.M == nil) {
		t.Fatalf("entry with error %v and measurement %v", e.Err, e.M != nil)
	}
	if e.Err != nil {
		var pe *dls.PosError
		if !errors.As(e.Err, &pe) || pe.Line < 0 || pe.Column < 0 || pe.File != "f.csv" {
			t.Fatalf("error %v (%T) is not a positioned error", e.Err, e.Err)
		}
		return false
	}
	checkMeasurement(t, e.M)
	return true
}

func approx(a, b, rel, abs float64) bool {
	return math.Abs(a-b) <= rel*math.Abs(b)+abs
}

// checkMeasurement asserts the invariants Read documents.
func checkMeasurement(t *testing.T, m *dls.Measurement) {
	t.Helper()
	for _, p := range m.Meta.Params() {
		if dls.IsNumericKey(p.Key) {
			if _, err := dls.ParseNumber(p.Value); err != nil {
				t.Fatalf("metadata %s = %q was accepted but is no number: %v", p.Key, p.Value, err)
			}
		}
		if p.Key == dls.KeyParticleRI {
			if _, err := dls.ParseComplexNumber(p.Value); err != nil && !(p.Value[0] >= 'A' && p.Value[0] <= 'Z' || p.Value[0] >= 'a' && p.Value[0] <= 'z') {
				t.Fatalf("particle_ri %q was accepted but is neither a number nor a name: %v", p.Value, err)
			}
		}
	}
	n := len(m.TauS)
	if n < csvdata.MinPoints || len(m.Corr) != n || len(m.Lines) != n || (m.Sigma != nil && len(m.Sigma) != n) {
		t.Fatalf("lengths: %d lags, %d values, %d lines, %d sigma", n, len(m.Corr), len(m.Lines), len(m.Sigma))
	}
	for k := 0; k < n; k++ {
		if !(m.TauS[k] > 0) || math.IsInf(m.TauS[k], 0) || k > 0 && !(m.TauS[k] > m.TauS[k-1]) {
			t.Fatalf("lag %d = %g after %v", k, m.TauS[k], m.TauS[:k])
		}
		if math.IsNaN(m.Corr[k]) || math.IsInf(m.Corr[k], 0) {
			t.Fatalf("value %d = %g", k, m.Corr[k])
		}
		if m.Sigma != nil && (!(m.Sigma[k] > 0) || math.IsInf(m.Sigma[k], 0)) {
			t.Fatalf("sigma %d = %g", k, m.Sigma[k])
		}
		if m.Lines[k] <= m.HeaderLine || k > 0 && m.Lines[k] <= m.Lines[k-1] {
			t.Fatalf("line %d = %d (header %d)", k, m.Lines[k], m.HeaderLine)
		}
	}
	switch m.Kind {
	case dls.KindG2, dls.KindG2m1, dls.KindG1:
	default:
		t.Fatalf("kind %v", m.Kind)
	}
}
