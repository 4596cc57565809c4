package batch

import (
	"errors"
	"math"
	"strconv"
	"strings"
	"testing"

	"dlsbatch/dls"
	"dlsbatch/dls/mie"
)

// documentedRanges are the plausible ranges as DEVELOPERS.md and the
// io/csvdata package comment document them: key (and part), minimum,
// maximum. The angle stops at 179° because 180° is refused outright by
// dls.Optics.Validate (a detector in the incident beam).
var documentedRanges = []struct {
	key, part string
	min, max  float64
}{
	{dls.KeyTemperatureC, "", -20, 150},
	{dls.KeyWavelengthNm, "", 200, 2000},
	{dls.KeyAngleDeg, "", 5, 179},
	{dls.KeyViscosityMPaS, "", 0.1, 1e4},
	{dls.KeyRefractiveIndex, "", 1, 2.5},
	{dls.KeyParticleRI, "real", 0.01, 6},
	{dls.KeyParticleRI, "imaginary", 0, 10},
	{dls.KeyConcentration, "", 0, 1000},
	{dls.KeyParticleDensity, "", 0.1, 22.6},
	{dls.KeyVolumeFraction, "", 0, 0.64},
	{dls.KeyCountRateKcps, "", 0, 1e7},
	{dls.KeyDurationS, "", 0, 1e5},
	{dls.KeyMediumVolumeFraction, "", 0, 0.6},
	{dls.KeyMediumRelViscosity, "", 1, 1e4},
	{dls.KeyKD, "", -100, 1000},
	{dls.KeyUViscosityMPaS, "", 0, 1e4},
	{dls.KeyURefractiveIndex, "", 0, 0.1},
	{dls.KeyUKD, "", 0, 1000},
	{dls.KeyUVolumeFraction, "", 0, 0.64},
	{dls.KeyUMediumVolumeFraction, "", 0, 0.6},
	{dls.KeyUMediumRelViscosity, "", 0, 1e4},
}

// TestPlausibleRangesAsDocumented: the table is the documented one, and
// PlausibleRanges hands out a copy.
func TestPlausibleRangesAsDocumented(t *testing.T) {
	got := dls.PlausibleRanges()
	if len(got) != len(documentedRanges) {
		t.Fatalf("%d ranges, %d documented", len(got), len(documentedRanges))
	}
	for i, d := range documentedRanges {
		if g := got[i]; g.Key != d.key || g.Part != d.part || g.Min != d.min || g.Max != d.max || g.Basis == "" {
			t.Errorf("range %d: %+v, documented %s %s %g … %g with a basis", i, g, d.key, d.part, d.min, d.max)
		}
	}
	got[0].Min = -1e9
	if r, _ := dls.PlausibleRange(dls.KeyTemperatureC, ""); r.Min != -20 {
		t.Errorf("changing the copy changed the table: %+v", r)
	}
}

// rangeCase is one value at an edge of a documented range: the metadata to
// set, whether it lies inside, and whether it also breaks a physical limit
// that no setting lifts (a medium index below 1, a negative medium volume
// fraction, a medium less viscous than its solvent).
type rangeCase struct {
	name     string
	key      string
	value    string
	inside   bool
	absolute bool
}

// edgeCases puts a value on each bound (bounds are inclusive) and one just
// beyond it, by a relative step of 1e-6 (at least 1e-6 absolute), far
// above float64 rounding (1e-16) and far below any bound's meaning.
func edgeCases() []rangeCase {
	f := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	var out []rangeCase
	for _, d := range documentedRanges {
		step := func(v float64) float64 { return math.Max(math.Abs(v), 1) * 1e-6 }
		for _, e := range []struct {
			what   string
			v      float64
			inside bool
		}{
			{"at min", d.min, true}, {"below min", d.min - step(d.min), false},
			{"at max", d.max, true}, {"above max", d.max + step(d.max), false},
		} {
			text := f(e.v)
			switch d.part {
			case "real":
				text += "+0i"
			case "imaginary":
				if e.v < 0 {
					text = "1.59" + text + "i"
				} else {
					text = "1.59+" + text + "i"
				}
			}
			name := d.key + " " + d.part + " " + e.what
			// Physical impossibilities that no setting lifts: a medium
			// index below 1, a negative medium volume fraction, a medium
			// less viscous than its solvent.
			absolute := (d.key == dls.KeyRefractiveIndex && e.v < 1) || (d.key == dls.KeyMediumVolumeFraction && e.v < 0) ||
				(d.key == dls.KeyMediumRelViscosity && e.v < 1)
			out = append(out, rangeCase{name: name, key: d.key, value: text, inside: e.inside, absolute: absolute})
		}
	}
	return out
}

// edgeMeta is the worked example (viscosity and index given) with key set
// to value; a kd needs the particles' volume fraction to apply.
func edgeMeta(key, value string) map[string]string {
	meta := workedMeta()
	if key == dls.KeyKD {
		meta[dls.KeyVolumeFraction] = "0.001"
	}
	meta[key] = value
	return meta
}

// TestPlausibilityEdges: on each bound a value passes, just beyond it the
// measurement fails with ErrImplausible and a message naming key, value,
// range and source, and with AllowImplausible it is analysed with a warning
// that names the same.
func TestPlausibilityEdges(t *testing.T) {
	for _, tc := range edgeCases() {
		t.Run(tc.name, func(t *testing.T) {
			m := monoMeasurement(edgeMeta(tc.key, tc.value))
			p, _ := m.Meta.Get(tc.key)
			s := DefaultSettings()
			r := Analyze(m, &s)
			if tc.inside {
				if r.Status == dls.StatusError || strings.Contains(r.Message, "plausible") {
					t.Fatalf("%s = %s: status %s: %s", tc.key, tc.value, r.Status, r.Message)
				}
				return
			}
			if r.Status != dls.StatusError || r.HasCumulants || r.ZAvgNm != 0 {
				t.Fatalf("%s = %s: status %s, z %g nm (%s); want error and no size", tc.key, tc.value, r.Status, r.ZAvgNm, r.Message)
			}
			for _, want := range []string{tc.key + " = " + tc.value, "plausible range", p.Where, "--allow-implausible"} {
				if !strings.Contains(r.Message, want) {
					t.Errorf("message %q lacks %q", r.Message, want)
				}
			}
			// The value came from the file: the error is at its line.
			if !strings.HasPrefix(r.Message, p.Where+": ") {
				t.Errorf("message %q does not start at %s", r.Message, p.Where)
			}

			s.AllowImplausible = true
			r = Analyze(monoMeasurement(edgeMeta(tc.key, tc.value)), &s)
			if tc.absolute {
				if r.Status != dls.StatusError || strings.Contains(r.Message, "plausible") {
					t.Errorf("allowed: status %s (%s); want the physical limit's error", r.Status, r.Message)
				}
				return
			}
			if r.Status != dls.StatusWarn || !r.HasCumulants {
				t.Fatalf("allowed: status %s, cumulants %v (%s); want warn with a size", r.Status, r.HasCumulants, r.Message)
			}
			for _, want := range []string{tc.key + " = " + tc.value, "plausible range", p.Where, "allowed"} {
				if !strings.Contains(strings.Join(r.Warnings, "\n"), want) {
					t.Errorf("allowed: warnings %q lack %q", r.Warnings, want)
				}
			}
		})
	}
}

// TestAbsurdConditionsFail: the conditions that used to give absurd sizes
// with status warn (e.g. 3.8e8 nm at 1e9 °C) now fail the measurement
// with no size. Each value is beyond its documented range by orders of
// magnitude.
func TestAbsurdConditionsFail(t *testing.T) {
	tests := []struct{ key, value string }{
		{dls.KeyTemperatureC, "1e9"},
		{dls.KeyTemperatureC, "-273"},
		{dls.KeyAngleDeg, "1e-9"},
		{dls.KeyWavelengthNm, "1e9"},
		{dls.KeyViscosityMPaS, "1e30"},
		{dls.KeyRefractiveIndex, "1e6"},
		{dls.KeyCountRateKcps, "-5"},
		{dls.KeyDurationS, "-10"},
		{dls.KeyParticleRI, "159+0i"},
		{dls.KeyParticleRI, "1.59-0.1i"},
	}
	for _, tc := range tests {
		t.Run(tc.key+"="+tc.value, func(t *testing.T) {
			m := monoMeasurement(edgeMeta(tc.key, tc.value))
			s := DefaultSettings()
			r := Analyze(m, &s)
			if r.Status != dls.StatusError || r.HasCumulants || r.HasDistribution || r.ZAvgNm != 0 || r.ZAvgUcNm != 0 {
				t.Fatalf("status %s, z %g nm, cumulants %v (%s); want error and no size", r.Status, r.ZAvgNm, r.HasCumulants, r.Message)
			}
			if !strings.Contains(r.Message, tc.key+" = "+tc.value) {
				t.Errorf("message %q does not name %s = %s", r.Message, tc.key, tc.value)
			}
		})
	}
}

// TestImplausibleFromFlagAndSheet: the message names where the value came
// from when it is not the file: the --set assignment, the sheet cell.
func TestImplausibleFromFlagAndSheet(t *testing.T) {
	for _, p := range []dls.Param{
		{Key: dls.KeyTemperatureC, Value: "1e9", Origin: dls.OriginFlag, Where: "--set temperature_c=1e9"},
		{Key: dls.KeyTemperatureC, Value: "1e9", Origin: dls.OriginSheet, Where: "sheet.csv:4:3"},
	} {
		m := monoMeasurement(workedMeta())
		m.Meta.Set(p)
		s := DefaultSettings()
		r := Analyze(m, &s)
		if r.Status != dls.StatusError || !strings.Contains(r.Message, "("+string(p.Origin)+" "+p.Where+")") ||
			!strings.HasPrefix(r.Message, "mono.csv: ") {
			t.Errorf("%s: status %s, message %q; want an error on mono.csv naming %q", p.Origin, r.Status, r.Message, p.Where)
		}
	}
}

// TestImplausibleWrapsSentinel: the error of an implausible value wraps
// dls.ErrImplausible in a *dls.PosError at the metadata line.
func TestImplausibleWrapsSentinel(t *testing.T) {
	meta := workedMeta()
	meta[dls.KeyTemperatureC] = "1e9"
	m := monoMeasurement(meta)
	s := DefaultSettings()
	_, err := plausibility(m, m.Meta, &s)
	var pe *dls.PosError
	p, _ := m.Meta.Get(dls.KeyTemperatureC)
	if !errors.Is(err, dls.ErrImplausible) || !errors.As(err, &pe) || p.Where != pe.File+":"+strconv.Itoa(pe.Line) {
		t.Errorf("error %v: want ErrImplausible at %s", err, p.Where)
	}
}

// TestErrorAfterTheFitCarriesNoSize: a failure found after the cumulant
// fit (here a k_D without the volume fraction it needs) leaves no size in
// the result, so results.csv writes empty cells (io/report/columns.go
// writes the cumulant columns only when HasCumulants).
func TestErrorAfterTheFitCarriesNoSize(t *testing.T) {
	meta := workedMeta()
	meta[dls.KeyKD] = "hard-sphere"
	s := DefaultSettings()
	r := Analyze(monoMeasurement(meta), &s)
	if r.Status != dls.StatusError || !strings.Contains(r.Message, "volume_fraction") {
		t.Fatalf("status %s: %s; want the missing volume fraction", r.Status, r.Message)
	}
	if r.HasCumulants || r.HasDistribution || r.ZAvgNm != 0 || r.PDI != 0 || r.ZAvgUcNm != 0 || r.Budget != nil ||
		r.Intensity != nil || r.Correction != "" || r.Curves != nil {
		t.Errorf("error result carries a size: %+v", r.Cumulants)
	}
	if !r.HasConditions || r.TemperatureC != 25 || r.CorrelationKind != "g2" {
		t.Errorf("conditions or identity lost: %+v", r.Conditions)
	}
}

// TestMieTableIsPlausible: every material of the Mie table, at every laser
// line it covers, lies inside the particle_ri range, so that writing a
// material's index as a number is never refused. The indices are the
// table's published data (Johnson & Christy 1972 for the metals, the
// dispersion formulas cited in dls/mie for the dielectrics).
func TestMieTableIsPlausible(t *testing.T) {
	re, _ := dls.PlausibleRange(dls.KeyParticleRI, "real")
	im, _ := dls.PlausibleRange(dls.KeyParticleRI, "imaginary")
	n := 0
	for _, name := range mie.Materials() {
		for _, nm := range []float64{405, 488, 514.5, 532, 632.8, 660, 785, 830} {
			m, _, err := mie.MaterialIndex(name, nm*1e-9)
			if err != nil {
				continue // a line outside the material's data
			}
			n++
			if !re.Contains(real(m)) || !im.Contains(imag(m)) {
				t.Errorf("%s at %g nm: %v outside real %s, imaginary %s", name, nm, m, re, im)
			}
		}
	}
	if n < 40 { // the table has eight lines for each of at least five materials
		t.Errorf("only %d material lines checked", n)
	}
}
