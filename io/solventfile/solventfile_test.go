package solventfile

import (
	"bytes"
	"errors"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"dlsbatch/dls"
	"dlsbatch/dls/medium"
)

func near(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if !(math.Abs(got-want) <= tol) {
		t.Errorf("%s = %.10g, want %.10g ± %.2g", what, got, want, tol)
	}
}

func TestReadFixture(t *testing.T) {
	path := filepath.Join("testdata", "user_solvents.csv")
	entries, err := ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if len(entries) != 4 {
		t.Fatalf("%d entries, want 4", len(entries))
	}
	// Lines as in the file (comments and blank lines counted).
	wantLines := []int{8, 11, 15, 18}
	for i, e := range entries {
		if e.Line != wantLines[i] {
			t.Errorf("entry %s on line %d, want %d", e.Name, e.Line, wantLines[i])
		}
	}

	tab := medium.NewDefaultTable()
	if err := Load(path, tab); err != nil {
		t.Fatal(err)
	}

	// Constant viscosity: the toluene reference value of Santos et al.,
	// J. Phys. Chem. Ref. Data 35, 1 (2006), given in mPa·s, read in Pa·s.
	s, err := tab.Lookup("TOL-REF")
	if err != nil {
		t.Fatal(err)
	}
	p, err := s.Props(298.15, 632.8e-9, false)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "toluene-ref η", p.ViscosityPaS, 0.5542e-3, 1e-15)
	// Constant index 1.49450 at 25 °C with dn/dT −5e-4 /K (the file's).
	near(t, "toluene-ref n(25 °C)", p.RefractiveIndex, 1.49450, 1e-12)
	if p, err = s.Props(299.15, 632.8e-9, false); err != nil {
		t.Fatal(err)
	}
	near(t, "toluene-ref n(26 °C)", p.RefractiveIndex, 1.49450-5e-4, 1e-12)
	if s.Origin != path+":8" {
		t.Errorf("origin %q", s.Origin)
	}

	// Andrade law fitted through CRC water 1.002 mPa·s (20 °C) and 0.547
	// (50 °C): the file's A, B (10 digits) return both within 1e-8.
	s, _ = tab.Lookup("water-andrade")
	for _, c := range []struct{ tC, mPa float64 }{{20, 1.002}, {50, 0.547}} {
		p, err := s.Props(dls.KelvinFromCelsius(c.tC), 632.8e-9, false)
		if err != nil {
			t.Fatal(err)
		}
		near(t, "Andrade η", p.ViscosityPaS*1e3/c.mPa, 1, 1e-8)
		if !strings.Contains(p.IndexSource, "not given") {
			t.Errorf("index source %q does not say the temperature is not given", p.IndexSource)
		}
	}

	// Cauchy law with the glycerol coefficients of Rheims et al. 1997 must
	// equal the built-in glycerol dispersion (same coefficients, formula 5).
	s, _ = tab.Lookup("gly-c")
	g, _ := tab.Lookup("glycerol")
	for _, lNm := range []float64{589.3, 632.8, 785, 1050} {
		p1, err1 := s.Props(298.15, lNm*1e-9, false)
		p2, err2 := g.Props(298.15, lNm*1e-9, false)
		if err1 != nil || err2 != nil {
			t.Fatal(err1, err2)
		}
		near(t, "Cauchy vs built-in glycerol", p1.RefractiveIndex, p2.RefractiveIndex, 1e-15)
	}
	if _, err := s.Props(298.15, 532e-9, false); !errors.Is(err, dls.ErrOutOfRange) {
		t.Errorf("532 nm outside the file's 589.3–1050 nm: err = %v", err)
	}

	// Override: "ethylene glycol" now comes from the file, with the same
	// Perry's coefficients as the built-in entry (so the same viscosity).
	s, _ = tab.Lookup("ethylene glycol")
	if !strings.HasPrefix(s.Origin, path) {
		t.Errorf("ethylene glycol not overridden: origin %q", s.Origin)
	}
	builtin, err := medium.Lookup("ethylene glycol")
	if err != nil {
		t.Fatal(err)
	}
	// Errors checked: two failed Props would give two zero viscosities,
	// which compare equal and would let the check pass.
	p1, err1 := s.Props(298.15, 632.8e-9, false)
	p2, err2 := builtin.Props(298.15, 632.8e-9, false)
	if err1 != nil || err2 != nil || !(p2.ViscosityPaS > 0) {
		t.Fatalf("ethylene glycol at 25 °C: %v, %v, η = %g", err1, err2, p2.ViscosityPaS)
	}
	// Same coefficients, same arithmetic: 1e-15 Pa·s is far below η ≈ 16e-3.
	near(t, "overridden EG η", p1.ViscosityPaS, p2.ViscosityPaS, 1e-15)
	if _, err := tab.Lookup("meg"); !errors.Is(err, dls.ErrUnknownSolvent) {
		t.Errorf("alias of the replaced entry still found: %v", err)
	}
}

func TestParseErrors(t *testing.T) {
	const head = "name,t_min_c,t_max_c,viscosity_model,viscosity_params,index_model,index_params,source\n"
	tests := []struct {
		name      string
		in        string
		line, col int
		is        error
		msg       string
	}{
		{"empty", "", 0, 0, dls.ErrEmpty, "empty"},
		{"comments only", "# nothing\n", 0, 0, dls.ErrEmpty, "empty"},
		{"unknown column", "name,viscosity,t_min_c\n", 1, 6, dls.ErrBadHeader, `unknown column "viscosity"`},
		{"duplicate column", head[:len(head)-1] + ",name\n", 1, 87, dls.ErrBadHeader, "twice"},
		{"missing column", "name,t_min_c\n", 1, 0, dls.ErrBadHeader, `missing column "t_max_c"`},
		{"short row", head + "a,1,2\n", 2, 1, dls.ErrBadHeader, "3 fields"},
		{"bad number", head + "a,x,30,constant,1,constant,1.33,lab\n", 2, 3, dls.ErrNotANumber, "t_min_c"},
		{"infinite", head + "a,0,inf,constant,1,constant,1.33,lab\n", 2, 5, dls.ErrNonFinite, "t_max_c"},
		// dls.ParseNumber's syntax; strconv.ParseFloat would read these as
		// 16, 10 and 0.
		{"hexadecimal", head + "a,0x10,30,constant,1,constant,1.33,lab\n", 2, 3, dls.ErrNotANumber, "hexadecimal"},
		{"digit separator", head + "a,0,30,andrade,-6.5 1_900,constant,1.33,lab\n", 2, 16, dls.ErrNotANumber, "'_'"},
		{"underflow", head + "a,0,30,constant,1e-400,constant,1.33,lab\n", 2, 17, dls.ErrOutOfRange, "underflows"},
		{"empty range", head + "a,30,20,constant,1,constant,1.33,lab\n", 2, 6, dls.ErrOutOfRange, "t_max_c"},
		{"model", head + "a,0,30,vogel,1,constant,1.33,lab\n", 2, 8, nil, `"vogel": want constant, andrade or dippr101`},
		{"param count", head + "a,0,30,andrade,1,constant,1.33,lab\n", 2, 16, nil, "andrade takes 2 numbers, got 1"},
		{"negative viscosity", head + "a,0,30,constant,-1,constant,1.33,lab\n", 2, 17, dls.ErrOutOfRange, "not positive"},
		{"index below 1", head + "a,0,30,constant,1,constant,0.9,lab\n", 2, 28, dls.ErrOutOfRange, "outside 1–5"},
		{"cauchy without range", head + "a,0,30,constant,1,cauchy,1.4 0.003,lab\n", 2, 0, dls.ErrMissingValue, "lambda_min_nm"},
		{"no source", head + "a,0,30,constant,1,constant,1.33,\n", 2, 33, dls.ErrMissingValue, "source"},
		{"no name", head + ",0,30,constant,1,constant,1.33,lab\n", 2, 1, dls.ErrMissingValue, "name"},
		{"mixture name", head + "a:b,0,30,constant,1,constant,1.33,lab\n", 2, 1, nil, "reserved for mixtures"},
		{"duplicate name", head + "a,0,30,constant,1,constant,1.33,lab\nA,0,30,constant,1,constant,1.33,lab\n", 3, 1, nil, "already defined on line 2"},
		{"bare quote", head + "a,0,30,constant,1,constant,1.33,l\"ab\n", 2, 34, nil, "bare"},
		{"dn/dT without temperature", "name,t_min_c,t_max_c,viscosity_model,viscosity_params,index_model,index_params,dn_dt_per_k,source\n" +
			"a,0,30,constant,1,constant,1.33,-1e-4,lab\n", 2, 33, dls.ErrMissingValue, "index_t_c"},
		{"binary", "name\x00", 0, 0, dls.ErrNotText, "not a text file"},
	}
	for _, tc := range tests {
		_, err := Parse(strings.NewReader(tc.in), "user.csv")
		var pe *dls.PosError
		if !errors.As(err, &pe) {
			t.Errorf("%s: err = %v, want a *dls.PosError", tc.name, err)
			continue
		}
		if pe.File != "user.csv" || pe.Line != tc.line || (tc.col != 0 && pe.Column != tc.col) {
			t.Errorf("%s: at %s:%d:%d, want line %d column %d (%v)", tc.name, pe.File, pe.Line, pe.Column, tc.line, tc.col, err)
		}
		if tc.is != nil && !errors.Is(err, tc.is) {
			t.Errorf("%s: %v does not wrap %v", tc.name, err, tc.is)
		}
		if !strings.Contains(err.Error(), tc.msg) {
			t.Errorf("%s: %q does not say %q", tc.name, err, tc.msg)
		}
	}
}

func TestWriteRoundTrip(t *testing.T) {
	entries, err := ReadFile(filepath.Join("testdata", "user_solvents.csv"))
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := Write(&buf, entries); err != nil {
		t.Fatal(err)
	}
	again, err := Parse(&buf, "written.csv")
	if err != nil {
		t.Fatalf("%v\n%s", err, buf.String())
	}
	for i := range entries {
		entries[i].File, entries[i].Line = "", 0
		again[i].File, again[i].Line = "", 0
	}
	if !reflect.DeepEqual(entries, again) {
		t.Errorf("round trip changed the entries:\n%+v\n%+v", entries, again)
	}
}

func TestLoadErrors(t *testing.T) {
	tab := medium.NewDefaultTable()
	err := Load(filepath.Join(t.TempDir(), "missing.csv"), tab)
	var pe *dls.PosError
	if !errors.As(err, &pe) || !errors.Is(err, os.ErrNotExist) {
		t.Errorf("missing file: err = %v, want a PosError wrapping os.ErrNotExist", err)
	}
}

func FuzzParse(f *testing.F) {
	seed, err := os.ReadFile(filepath.Join("testdata", "user_solvents.csv"))
	if err != nil {
		f.Fatal(err)
	}
	f.Add(string(seed))
	f.Add("name,t_min_c,t_max_c,viscosity_model,viscosity_params,index_model,index_params,source\n" +
		"a,0,30,andrade,-6.5 1900,cauchy,1.4 0.003 1e-5,lab\n")
	f.Add("name,t_min_c,t_max_c,viscosity_model,viscosity_params,index_model,index_params,index_t_c,dn_dt_per_k,lambda_min_nm,lambda_max_nm,source\n" +
		"\"b,c\",-10,80,dippr101,1 2 3 4 5,cauchy,1.5 0.01,20,-4e-4,400,900,\"x \"\"y\"\"\"\n")
	f.Add("")
	f.Add("name,t_min_c,t_max_c,viscosity_model,viscosity_params,index_model,index_params,source\n" +
		"a,+0.,3E1,andrade,-6.5 .19e4,constant,1.33,lab\nb,0x0,1_0,constant,1e-400,constant,inf,lab\n")
	f.Fuzz(func(t *testing.T, in string) {
		entries, err := Parse(strings.NewReader(in), "fuzz.csv")
		if err != nil {
			var pe *dls.PosError
			if !errors.As(err, &pe) {
				t.Fatalf("error %v is not a *dls.PosError", err)
			}
			return
		}
		tab := &medium.Table{}
		for _, e := range entries {
			if err := tab.Add(e.Solvent()); err != nil {
				t.Fatalf("parsed entry %+v not accepted by the table: %v", e, err)
			}
		}
		var buf bytes.Buffer
		if err := Write(&buf, entries); err != nil {
			t.Fatal(err)
		}
		again, err := Parse(&buf, "fuzz.csv")
		if err != nil {
			t.Fatalf("written file does not parse: %v\n%s", err, buf.String())
		}
		if len(again) != len(entries) {
			t.Fatalf("round trip: %d entries, want %d", len(again), len(entries))
		}
		for i := range entries {
			a, b := entries[i], again[i]
			a.File, a.Line, b.File, b.Line = "", 0, "", 0
			if !reflect.DeepEqual(a, b) {
				t.Fatalf("round trip changed entry %d:\n%+v\n%+v", i, a, b)
			}
		}
	})
}

// Errors quote a cell only as an excerpt: its first 40 characters in Go
// quoting, then "…" (the rule of io/safetext); a bad number does not print
// its *strconv.NumError, which would repeat the whole cell.
func TestErrorsQuoteExcerpts(t *testing.T) {
	const head = "name,t_min_c,t_max_c,viscosity_model,viscosity_params,index_model,index_params,source\n"
	long := strings.Repeat("z", 1000)
	cases := []struct {
		name, in string
		want     string
	}{
		{"model", head + "a,0,30," + long + ",1,constant,1.33,lab\n", `"` + long[:40] + `"…: want constant, andrade or dippr101`},
		{"number", head + "a,0,3" + long + ",constant,1,constant,1.33,lab\n", `"3` + long[:39] + `"…: not a number`},
		{"control character", head + "a\x1b[2J" + long + ",0,30,constant,1,constant,1.33,lab\n", `"a\x1b[2J` + long[:35] + `"… holds a control character`},
		{"mixture name", head + long + ":b,0,30,constant,1,constant,1.33,lab\n", `"` + long[:40] + `"…: ':' is reserved`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Parse(strings.NewReader(c.in), "user.csv")
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("error %v lacks %q", err, c.want)
			}
			if n := len(err.Error()); n > 300 {
				t.Errorf("message of %d bytes", n)
			}
		})
	}
}
