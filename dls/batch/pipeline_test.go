package batch

import (
	"context"
	"errors"
	"fmt"
	"math"
	"strings"
	"sync"
	"testing"

	"dlsbatch/dls"
	"dlsbatch/dls/medium"
)

// monoMeasurement is a noise-free single exponential for a 100 nm sphere of
// the Stokes–Einstein worked example (water, 25 °C, 632.8 nm, 173°:
// Γ = 3418.78 1/s with η = 0.890022 mPa·s and n = 1.33162).
func monoMeasurement(meta map[string]string) *dls.Measurement {
	var tau []float64
	for k := 1; k <= 16; k++ {
		tau = append(tau, float64(k)*1e-6)
	}
	for s := 1; len(tau) < 180; s++ {
		for j := 1; j <= 8; j++ {
			tau = append(tau, float64(8+j)*math.Ldexp(1e-6, s))
		}
	}
	m := &dls.Measurement{File: "mono.csv", Kind: dls.KindG2, TauS: tau, Corr: make([]float64, len(tau)), HeaderLine: 8}
	for i, t := range tau {
		m.Corr[i] = 1 + 0.9*math.Exp(-2*3418.78*t)
	}
	line := 1
	for _, k := range dls.MetadataKeys() {
		if v, ok := meta[k]; ok {
			m.Meta.Set(dls.Param{Key: k, Value: v, Origin: dls.OriginFile, Where: fmt.Sprintf("mono.csv:%d", line)})
			line++
		}
	}
	return m
}

func workedMeta() map[string]string {
	return map[string]string{"temperature_c": "25", "wavelength_nm": "632.8", "angle_deg": "173", "solvent": "water",
		"viscosity_mpas": "0.890022", "refractive_index": "1.33162"}
}

func TestAnalyzeWorkedExample(t *testing.T) {
	s := DefaultSettings()
	r := Analyze(monoMeasurement(workedMeta()), &s)
	if r.Status != dls.StatusOK {
		t.Fatalf("status %s: %s", r.Status, r.Message)
	}
	// 100.00 nm to the worked value's 5-digit rounding.
	if math.Abs(r.ZAvgNm-100) > 0.005 {
		t.Errorf("z-average %.4f nm, want 100.00", r.ZAvgNm)
	}
	if !strings.HasPrefix(r.ViscositySource, "user-supplied") || !strings.HasPrefix(r.IndexSource, "user-supplied") {
		t.Errorf("sources %q / %q, want user-supplied", r.ViscositySource, r.IndexSource)
	}
	if r.Sample != "mono" {
		t.Errorf("sample %q, want the file stem", r.Sample)
	}
}

func TestAnalyzeSolventTable(t *testing.T) {
	// Without an explicit viscosity and index, water's come from the table
	// at 25 °C and 632.8 nm: IAPWS 2008 η = 0.89002 mPa·s and R9-97
	// n = 1.33162 (computed check values to 5 digits). The size then
	// agrees with the worked example within their rounding, 2e-4
	// relative.
	meta := workedMeta()
	delete(meta, "viscosity_mpas")
	delete(meta, "refractive_index")
	s := DefaultSettings()
	r := Analyze(monoMeasurement(meta), &s)
	if r.Status != dls.StatusOK {
		t.Fatalf("status %s: %s", r.Status, r.Message)
	}
	if math.Abs(r.ViscosityMPaS-0.89002) > 1e-5 || math.Abs(r.RefractiveIndex-1.33162) > 1e-5 {
		t.Errorf("η %.6f mPa·s, n %.6f; want 0.89002 and 1.33162", r.ViscosityMPaS, r.RefractiveIndex)
	}
	if math.Abs(r.ZAvgNm/100-1) > 2e-4 {
		t.Errorf("z-average %.4f nm, want 100.00 ± 0.02", r.ZAvgNm)
	}
	if strings.HasPrefix(r.ViscositySource, "user") || r.ViscositySource == "" {
		t.Errorf("viscosity source %q, want the table's citation", r.ViscositySource)
	}
}

func TestAnalyzeErrorsAndAssumptions(t *testing.T) {
	cases := []struct {
		name   string
		edit   func(map[string]string)
		status dls.Status
		want   error
		substr string
		also   []string // further parts of the message
	}{
		{"missing temperature", func(m map[string]string) { delete(m, "temperature_c") }, dls.StatusError, dls.ErrMissingValue, "temperature_c", nil},
		{"missing angle", func(m map[string]string) { delete(m, "angle_deg") }, dls.StatusError, dls.ErrMissingValue, "angle_deg", nil},
		{"unknown solvent", func(m map[string]string) {
			m["solvent"] = "unobtainium"
			delete(m, "viscosity_mpas")
		}, dls.StatusError, dls.ErrUnknownSolvent, "unobtainium", nil},
		{"non-numeric temperature", func(m map[string]string) { m["temperature_c"] = "warm" }, dls.StatusError, dls.ErrNotANumber, "mono.csv:", nil},
		{"angle out of range", func(m map[string]string) { m["angle_deg"] = "190" }, dls.StatusError, dls.ErrBadMetadata, "outside", nil},
		{"temperature outside the water correlation", func(m map[string]string) {
			m["temperature_c"] = "150"
			delete(m, "viscosity_mpas")
			delete(m, "refractive_index")
		}, dls.StatusError, dls.ErrOutOfRange, "°C", nil},
		{"explicit values need no correlation range", func(m map[string]string) { m["temperature_c"] = "150" }, dls.StatusOK, nil, "", nil},
		// Water's viscosity correlation stops at 90 °C, its index at 110 °C
		// (the ranges of the IAPWS-based table): a given viscosity at 95 °C
		// needs only the index, which is in range; at 150 °C it is not.
		{"given viscosity, index from table", func(m map[string]string) {
			m["temperature_c"] = "95"
			delete(m, "refractive_index")
		}, dls.StatusOK, nil, "", nil},
		{"given viscosity, index out of range", func(m map[string]string) {
			m["temperature_c"] = "150"
			delete(m, "refractive_index")
		}, dls.StatusError, dls.ErrOutOfRange, "refractive index", nil},
		{"solvent assumed", func(m map[string]string) { delete(m, "solvent") }, dls.StatusWarn, nil, "water assumed", nil},
		// Messages that say what to do. Lines: monoMeasurement numbers the
		// values in the order of dls.MetadataKeys, from 1.
		{"every missing condition in one message", func(m map[string]string) {
			delete(m, "temperature_c")
			delete(m, "wavelength_nm")
			delete(m, "angle_deg")
		}, dls.StatusError, dls.ErrMissingValue, "no temperature_c, wavelength_nm, angle_deg for this measurement",
			[]string{"'# wavelength_nm: 633'", "--default temperature_c=25 --default wavelength_nm=633 --default angle_deg=173"}},
		{"unknown solvent at its line, with the way out", func(m map[string]string) {
			m["solvent"] = "unobtainium"
			delete(m, "viscosity_mpas")
		}, dls.StatusError, dls.ErrUnknownSolvent, "mono.csv:4: ", []string{"give viscosity_mpas and refractive_index"}},
		{"given viscosity not blamed", func(m map[string]string) {
			m["temperature_c"] = "150"
			delete(m, "refractive_index")
		}, dls.StatusError, dls.ErrOutOfRange, "the refractive index is not given and comes from the water table entry",
			[]string{"viscosity_mpas given (file mono.csv:5) is not at fault", "give refractive_index too"}},
		{"given index not blamed", func(m map[string]string) {
			m["temperature_c"] = "95"
			delete(m, "viscosity_mpas")
		}, dls.StatusError, dls.ErrOutOfRange, "the viscosity is not given and comes from the water table entry",
			[]string{"refractive_index given (file mono.csv:5) is not at fault", "give viscosity_mpas too"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			meta := workedMeta()
			c.edit(meta)
			s := DefaultSettings()
			r := Analyze(monoMeasurement(meta), &s)
			if r.Status != c.status {
				t.Fatalf("status %s (%s), want %s", r.Status, r.Message, c.status)
			}
			for _, sub := range append([]string{c.substr}, c.also...) {
				if !strings.Contains(r.Message, sub) {
					t.Errorf("message %q lacks %q", r.Message, sub)
				}
			}
			if c.status == dls.StatusError && !strings.HasPrefix(r.Message, "mono.csv:") {
				t.Errorf("message %q does not name the file", r.Message)
			}
		})
	}
}

func TestAnalyzeErrorsWrapSentinels(t *testing.T) {
	// The sentinel survives into the message through PosError; check the
	// mapping with errors.Is on conditions() directly.
	meta := workedMeta()
	delete(meta, "temperature_c")
	m := monoMeasurement(meta)
	s := DefaultSettings()
	_, _, err := conditions(m, m.Meta, &s)
	if !errors.Is(err, dls.ErrMissingValue) {
		t.Errorf("error %v does not wrap ErrMissingValue", err)
	}
}

func TestRunnerOrderAndCancel(t *testing.T) {
	// Results come back in path order whatever the worker count, and a
	// cancelled context stops the batch with what finished.
	paths := []string{"c", "a", "b", "d", "e", "f"}
	read := func(p string) []Input {
		m := monoMeasurement(workedMeta())
		m.File = p
		return []Input{{File: p, M: m}, {File: p, Run: "r10", Err: errors.New("x")}, {File: p, Run: "r2", Err: errors.New("y")}}
	}
	for _, w := range []int{1, 2, 5} {
		rn := &Runner{Read: read, Settings: DefaultSettings(), Workers: w}
		res, err := rn.Run(context.Background(), paths)
		if err != nil {
			t.Fatal(err)
		}
		var got []string
		for _, r := range res {
			got = append(got, r.File+"/"+r.Run)
		}
		want := "c/ c/r2 c/r10 a/ a/r2 a/r10 b/ b/r2 b/r10 d/ d/r2 d/r10 e/ e/r2 e/r10 f/ f/r2 f/r10"
		if strings.Join(got, " ") != want {
			t.Errorf("workers %d: order %v", w, got)
		}
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	rn := &Runner{Read: read, Settings: DefaultSettings(), Workers: 2}
	if _, err := rn.Run(ctx, paths); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled run returned %v", err)
	}
}

func TestNaturalLess(t *testing.T) {
	cases := []struct {
		a, b string
		want bool
	}{
		{"r2", "r10", true}, {"r10", "r2", false}, {"", "r1", true}, {"a", "b", true}, {"r1a", "r1b", true},
		{"run01", "run1", false}, {"run1", "run01", true},
	}
	for _, c := range cases {
		if got := naturalLess(c.a, c.b); got != c.want {
			t.Errorf("naturalLess(%q, %q) = %v", c.a, c.b, got)
		}
	}
}

func TestAnalyzeUserSolventTable(t *testing.T) {
	// A user entry replaces nothing built in and is found by name; its
	// constant viscosity and index are used as given.
	tab := medium.NewDefaultTable()
	if err := tab.Add(&medium.Solvent{Name: "buffer-x", Viscosity: medium.ConstantViscosity{PaS: 0.890022e-3, TMinK: 273, TMaxK: 333, Ref: "lab"},
		Index: givenIndex(1.33162), Origin: "test"}); err != nil {
		t.Fatal(err)
	}
	meta := workedMeta()
	delete(meta, "viscosity_mpas")
	delete(meta, "refractive_index")
	meta["solvent"] = "buffer-x"
	s := DefaultSettings()
	s.Solvents = tab
	r := Analyze(monoMeasurement(meta), &s)
	if r.Status != dls.StatusOK || math.Abs(r.ZAvgNm-100) > 0.005 {
		t.Errorf("status %s (%s), z %.4f nm; want ok and 100.00", r.Status, r.Message, r.ZAvgNm)
	}
	s.Solvents = nil
	if r := Analyze(monoMeasurement(meta), &s); r.Status != dls.StatusError {
		t.Errorf("the built-in table knows buffer-x: %s", r.Message)
	}
}

// TestRunnerEmit: with Emit, results arrive in input order, one file at a
// time, while no more than 4 files per worker are ever in flight or
// waiting; an Emit error stops the batch and is returned.
func TestRunnerEmit(t *testing.T) {
	var paths []string
	for i := range 60 {
		paths = append(paths, fmt.Sprintf("f%02d", i))
	}
	var mu sync.Mutex
	inFlight, most := 0, 0
	read := func(p string) []Input {
		mu.Lock()
		inFlight++
		most = max(most, inFlight)
		mu.Unlock()
		m := monoMeasurement(workedMeta())
		m.File = p
		return []Input{{File: p, M: m}}
	}
	const workers = 3
	var got []string
	rn := &Runner{Read: read, Settings: DefaultSettings(), Workers: workers, Emit: func(res []*dls.Result) error {
		mu.Lock()
		inFlight--
		mu.Unlock()
		for _, r := range res {
			got = append(got, r.File)
		}
		return nil
	}}
	res, err := rn.Run(context.Background(), paths)
	if err != nil || len(res) != 0 {
		t.Fatalf("Run returned %d results, %v; want none (emitted)", len(res), err)
	}
	if strings.Join(got, " ") != strings.Join(paths, " ") {
		t.Errorf("emitted out of order: %v", got)
	}
	if most > 4*workers {
		t.Errorf("%d files read but not yet emitted at once, want at most %d", most, 4*workers)
	}
	boom := errors.New("disk full")
	n := 0
	rn.Emit = func([]*dls.Result) error {
		if n++; n == 5 {
			return boom
		}
		return nil
	}
	if _, err := rn.Run(context.Background(), paths); !errors.Is(err, boom) {
		t.Errorf("Emit error: Run returned %v", err)
	}
}

// TestBlankMessage: a blank's fitted size is the dispersant's signal, so
// its message keeps what concerns a blank (how it was read, its
// conditions, its flags) and only counts the notes on its fit, which its
// warnings keep whole; a sample with the same data lists them. The data
// end before the correlation has decayed (a fit note) and name no solvent
// (a note on its conditions).
func TestBlankMessage(t *testing.T) {
	s := DefaultSettings()
	analyse := func(role string) *dls.Result {
		meta := workedMeta()
		delete(meta, "solvent")
		meta["role"] = role
		m := monoMeasurement(meta)
		m.TauS, m.Corr = m.TauS[:64], m.Corr[:64] // last lag 1.0 ms, g1 ≈ 0.07 there
		return Analyze(m, &s)
	}
	sample, blank := analyse("sample"), analyse("blank")
	const fitNote, readNote = "baseline not reached", "solvent not given"
	if !strings.Contains(sample.Message, fitNote) || !strings.Contains(sample.Message, readNote) {
		t.Fatalf("sample's message %q: want both notes", sample.Message)
	}
	if fmt.Sprint(blank.Warnings) != fmt.Sprint(sample.Warnings) {
		t.Errorf("blank's warnings %q, want the sample's %q", blank.Warnings, sample.Warnings)
	}
	for _, want := range []string{readNote, "BLANK: ", "1 note on the fit of the dispersant's signal"} {
		if !strings.Contains(blank.Message, want) {
			t.Errorf("blank's message %q does not say %q", blank.Message, want)
		}
	}
	if strings.Contains(blank.Message, fitNote) {
		t.Errorf("blank's message %q lists the fit note %q", blank.Message, fitNote)
	}
	if blank.Status != dls.StatusWarn {
		t.Errorf("blank's status %s, want warn (its BLANK flag)", blank.Status)
	}
}

// TestOverriddenConditionSaid: a flag's temperature that differs from the
// file's is used (flag over file) and said in the notes, with where the
// file states its own; the same value given again says nothing.
func TestOverriddenConditionSaid(t *testing.T) {
	for _, c := range []struct {
		set  string
		note bool
	}{{"30", true}, {"25.0", false}} {
		s := DefaultSettings()
		s.Overrides = []dls.Param{{Key: dls.KeyTemperatureC, Value: c.set, Origin: dls.OriginFlag, Where: "--set temperature_c=" + c.set}}
		meta := workedMeta()
		delete(meta, "viscosity_mpas") // the viscosity then follows the temperature
		r := Analyze(monoMeasurement(meta), &s)
		said := strings.Contains(strings.Join(r.Warnings, "\n"), "temperature_c "+c.set+" from --set temperature_c="+c.set+", where the file states 25 (mono.csv:")
		if said != c.note || r.TemperatureC != mustFloat(t, c.set) {
			t.Errorf("--set %s: temperature %g, note %v (want %v): %q", c.set, r.TemperatureC, said, c.note, r.Warnings)
		}
	}
}

func mustFloat(t *testing.T, s string) float64 {
	t.Helper()
	v, err := dls.ParseNumber(s)
	if err != nil {
		t.Fatal(err)
	}
	return v
}
