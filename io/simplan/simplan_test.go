package simplan

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"dlsbatch/dls"
	"dlsbatch/dls/sim"
)

var def = sim.Job{Sample: "s", Population: "mono(100nm)", Solvent: "water", TemperatureC: 25,
	WavelengthNm: 632.8, AngleDeg: 173, CountRateKcps: 300, DurationS: 60, Beta: 0.9, Baseline: 1, Runs: 1, Seed: 7}

// TestParse: empty cells take the defaults, a row without a seed takes the
// default seed plus its row number, and given cells override (values are
// the plan's own text, so the expected numbers are exact).
func TestParse(t *testing.T) {
	plan := "# demo\nfile,runs,temperature_c,seed,sigma\na.csv,3,,,yes\nb.csv,,37.5,42,\n"
	got, err := Parse(strings.NewReader(plan), "p.csv", def)
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != 2 {
		t.Fatalf("%d entries, want 2", len(got))
	}
	a, b := got[0], got[1]
	if a.Job.File != "a.csv" || a.Job.Runs != 3 || a.Job.TemperatureC != 25 || a.Job.Seed != 7 || !a.Job.Sigma || a.Line != 3 {
		t.Errorf("row a: %+v line %d", a.Job, a.Line)
	}
	if b.Job.Runs != 1 || b.Job.TemperatureC != 37.5 || b.Job.Seed != 42 || b.Job.Sigma || b.Line != 4 {
		t.Errorf("row b: %+v line %d", b.Job, b.Line)
	}
}

// TestAt: a field error lands on its cell when the plan has the column,
// on the row otherwise.
func TestAt(t *testing.T) {
	got, err := Parse(strings.NewReader("file,population\na.csv,mono(1nm)\n"), "p.csv", def)
	if err != nil {
		t.Fatal(err)
	}
	e := got[0].At(&sim.FieldError{Field: "population", Err: errors.New("bad")})
	if e.Error() != "p.csv:2:7: population: bad" {
		t.Errorf("cell error %q", e)
	}
	e = got[0].At(&sim.FieldError{Field: "solvent", Err: errors.New("bad")})
	if e.Error() != "p.csv:2: bad" {
		t.Errorf("row error %q", e)
	}
}

// TestNumberSyntax: plan numbers are read by dls.ParseNumber; each row
// would read with strconv.ParseFloat (as 25, 10, +Inf and 0).
func TestNumberSyntax(t *testing.T) {
	tests := []struct {
		cell     string
		sentinel error
	}{
		{"0x19", dls.ErrNotANumber},
		{"1_0", dls.ErrNotANumber},
		{"inf", dls.ErrNonFinite},
		{"1e-400", dls.ErrOutOfRange},
	}
	for _, tc := range tests {
		_, err := Parse(strings.NewReader("file,temperature_c\na.csv,"+tc.cell+"\n"), "p.csv", def)
		var pe *dls.PosError
		if !errors.As(err, &pe) || pe.Line != 2 || pe.Column != 7 || !errors.Is(err, tc.sentinel) || !strings.Contains(err.Error(), tc.cell) {
			t.Errorf("temperature_c %q: %v; want an error at p.csv:2:7 wrapping %v", tc.cell, err, tc.sentinel)
		}
	}
	got, err := Parse(strings.NewReader("file,temperature_c,angle_deg\na.csv,+25.,.9e2\n"), "p.csv", def)
	if err != nil || got[0].Job.TemperatureC != 25 || got[0].Job.AngleDeg != 90 {
		t.Errorf("signed and bare-point numbers: %v, %+v", err, got)
	}
}

// FuzzParse: no panic, every error is positioned in the plan, and every
// accepted file name is plain and every number finite.
func FuzzParse(f *testing.F) {
	f.Add([]byte("file,population\na.csv,mono(100nm)\n"))
	f.Add([]byte("file,runs\na.csv,\"1\n"))
	f.Add([]byte("file,seed,sigma\na.csv,-1,maybe\n"))
	f.Add([]byte("file,temperature_c,angle_deg,beta\na.csv,+25.,.9e2,0x1p-1\nb.csv,1_0,inf,1e-400\n"))
	if b, err := os.ReadFile(filepath.Join("..", "..", "testdata", "demo-plan.csv")); err == nil {
		f.Add(b)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		got, err := Parse(strings.NewReader(string(data)), "p.csv", def)
		if err != nil {
			var pe *dls.PosError
			if !errors.As(err, &pe) || pe.File != "p.csv" {
				t.Fatalf("error without position: %v", err)
			}
			return
		}
		for _, e := range got {
			if e.Job.File == "" || filepath.Base(e.Job.File) != e.Job.File {
				t.Fatalf("bad file name accepted: %q", e.Job.File)
			}
			j := e.Job
			for _, v := range []float64{j.TemperatureC, j.WavelengthNm, j.AngleDeg, j.ViscosityMPaS, j.RefractiveIndex,
				j.CountRateKcps, j.DurationS, j.Beta, j.Baseline} {
				if math.IsNaN(v) || math.IsInf(v, 0) {
					t.Fatalf("non-finite number accepted: %+v", j)
				}
			}
		}
	})
}

// TestNoiseColumn: the noise column names the job's noise model (any
// case), an empty cell keeps the default, and an unknown model is an error
// at its cell.
func TestNoiseColumn(t *testing.T) {
	got, err := Parse(strings.NewReader("file,noise\na.csv,Photon\nb.csv,\nc.csv,correlated\n"), "p.csv", def)
	if err != nil {
		t.Fatal(err)
	}
	for i, want := range []string{sim.NoisePhoton, "", sim.NoiseCorrelated} {
		if got[i].Job.Noise != want {
			t.Errorf("row %d: noise %q, want %q", i+1, got[i].Job.Noise, want)
		}
	}
	_, err = Parse(strings.NewReader("file,noise\na.csv,pink\n"), "p.csv", def)
	if err == nil || !strings.HasPrefix(err.Error(), "p.csv:2:7: noise") {
		t.Errorf("unknown model: error %v, want one at p.csv:2:7", err)
	}
}
