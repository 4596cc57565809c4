package batch

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"

	"dlsbatch/cumulants"
	"dlsbatch/dls"
)

// TestFitErrorsCrossTheBoundary breaks the worked-example correlogram
// (monoMeasurement, data rows from file line 9) in known ways. The error of
// the cumulant step must match both the domain sentinel and the library's
// (one value, errors.Is against either), and an error about a point must be
// a *dls.PosError at that point's file line, which is also where Analyze's
// message puts it ("file:line: reason", the dls.PosError format).
func TestFitErrorsCrossTheBoundary(t *testing.T) {
	withLines := func(edit func(m *dls.Measurement)) *dls.Measurement {
		m := monoMeasurement(workedMeta())
		m.Lines = make([]int, len(m.TauS))
		for i := range m.Lines {
			m.Lines[i] = 9 + i
		}
		edit(m)
		return m
	}
	n := len(monoMeasurement(workedMeta()).TauS)
	defaults := DefaultSettings()
	minTau := defaults.Cumulants
	minTau.MinTauS = 100 // beyond the last lag (≈ 34 s)
	cases := []struct {
		name     string
		m        *dls.Measurement
		s        *cumulants.Settings
		domain   error
		library  error
		point    int // index of the point the error is about; -1: none (header line)
		contains string
	}{
		{"no decay", withLines(func(m *dls.Measurement) {
			// Γ = 0.01 1/s: g1 is still 0.71 at the last lag, far above the
			// half amplitude the fit asks the far channels to fall below.
			for i, tau := range m.TauS {
				m.Corr[i] = 1 + 0.9*math.Exp(-2*0.01*tau)
			}
		}), nil, dls.ErrNoDecay, cumulants.ErrNoDecay, n - 1, "within the lag window"},
		{"flat at the baseline", withLines(func(m *dls.Measurement) {
			for i := range m.Corr {
				m.Corr[i] = 1 + 1e-4*math.Sin(float64(7*i)) // deterministic noise, no decay
			}
		}), nil, dls.ErrNoSignal, cumulants.ErrNoSignal, 0, "first channels"},
		{"NaN", withLines(func(m *dls.Measurement) { m.Corr[17] = math.NaN() }), nil,
			dls.ErrNonFinite, cumulants.ErrNonFinite, 17, "value is"},
		{"repeated lag", withLines(func(m *dls.Measurement) { m.TauS[30] = m.TauS[29] }), nil,
			dls.ErrBadLag, cumulants.ErrBadLag, 30, "increasing"},
		{"no lag above the minimum", withLines(func(*dls.Measurement) {}), &minTau,
			dls.ErrTooFewPoints, cumulants.ErrTooFewPoints, -1, "minimum lag"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s := defaults.Cumulants
			if c.s != nil {
				s = *c.s
			}
			_, err := fitCumulants(c.m, &s, cumulants.Acquisition{})
			if !errors.Is(err, c.domain) || !errors.Is(err, c.library) {
				t.Fatalf("error %v: want errors.Is %q (dls) and %q (cumulants)", err, c.domain, c.library)
			}
			line := c.m.HeaderLine
			var pe *dls.PosError
			if c.point >= 0 {
				line = c.m.Lines[c.point]
				if !errors.As(err, &pe) || pe.File != c.m.File || pe.Line != line {
					t.Errorf("error %v: want a *dls.PosError at %s:%d", err, c.m.File, line)
				}
			} else if errors.As(err, &pe) {
				t.Errorf("error %v is positioned, want it left to Analyze", err)
			}
			set := defaults
			set.Cumulants = s
			r := Analyze(c.m, &set)
			prefix := fmt.Sprintf("%s:%d: ", c.m.File, line)
			if r.Status != dls.StatusError || !strings.HasPrefix(r.Message, prefix) ||
				!strings.Contains(r.Message, c.domain.Error()) || !strings.Contains(r.Message, c.contains) {
				t.Errorf("Analyze: status %s, message %q; want an error starting %q and naming %q and %q", r.Status, r.Message, prefix, c.domain, c.contains)
			}
			if r.Message != err.Error() && c.point >= 0 {
				t.Errorf("Analyze's message %q differs from the fit step's error %q", r.Message, err)
			}
		})
	}
}

// TestFitUnknownKind: a measurement whose kind is none of the three fails
// with an error naming it; the fit's panic for a kind it does not know must
// not be reached from a measurement.
func TestFitUnknownKind(t *testing.T) {
	m := monoMeasurement(workedMeta())
	m.Kind = 0
	s := DefaultSettings()
	r := Analyze(m, &s)
	if r.Status != dls.StatusError || !strings.Contains(r.Message, "correlation kind") {
		t.Errorf("status %s, message %q; want an error about the correlation kind", r.Status, r.Message)
	}
}
