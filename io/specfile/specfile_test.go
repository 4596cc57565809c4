package specfile

import (
	"errors"
	"math"
	"strings"
	"testing"

	"dlsbatch/dls"
	"dlsbatch/dls/spec"
)

const good = `product,quantity,min,max,target,tol,at_nm,note
latex-100,z_avg_nm,,,101.8,3.0,,lab window
gold-20,z_avg_nm,18,22,,,,
gold-20,pdi,,0.10,,,,
gold-20,intensity_pct_above,,2,,,100,no aggregates
gold-20,runs,3,,,,,
`

func TestParse(t *testing.T) {
	s, err := Parse(strings.NewReader(good), "spec.csv")
	if err != nil {
		t.Fatal(err)
	}
	if len(s.Limits) != 5 {
		t.Fatalf("%d limits", len(s.Limits))
	}
	l := s.Limits[0]
	// target ± tol becomes the inclusive interval [98.8, 104.8].
	if !l.HasMin || !l.HasMax || l.Min != 101.8-3.0 || l.Max != 101.8+3.0 || l.Text != "101.8 ± 3" {
		t.Errorf("target row: %+v", l)
	}
	if l := s.Limits[3]; l.AtNm != 100 || !l.HasMax || l.HasMin {
		t.Errorf("intensity row: %+v", l)
	}
	if p := s.Products(); len(p) != 2 || p[0] != "gold-20" {
		t.Errorf("products %v", p)
	}
}

// TestParseRules: the rows without bounds (none, no_bracketing) and the
// new limits drift_pct and count_rate_kcps read as the format doc says.
func TestParseRules(t *testing.T) {
	in := "product,quantity,min,max,target,tol,at_nm,note\n" +
		"latex,z_avg_nm,,,62.5,2.5,,\nlatex,drift_pct,,2,,,,\nwater,count_rate_kcps,,15,,,,\nuser,none,,,,,,\ngold-rd,no_bracketing,,,,,,\ngold-rd,pdi,,0.2,,,,\n"
	s, err := Parse(strings.NewReader(in), "spec.csv")
	if err != nil {
		t.Fatal(err)
	}
	want := []struct {
		q    string
		max  float64
		rule bool
	}{{"z_avg_nm", 65, false}, {"drift_pct", 2, false}, {"count_rate_kcps", 15, false}, {"none", 0, true}, {"no_bracketing", 0, true}, {"pdi", 0.2, false}}
	if len(s.Limits) != len(want) {
		t.Fatalf("%d limits, want %d", len(s.Limits), len(want))
	}
	for i, w := range want {
		l := s.Limits[i]
		// Exact: the bounds are the decimal values as written (65 = 62.5 + 2.5 exactly in binary).
		if l.Quantity != w.q || spec.IsRule(l.Quantity) != w.rule || (!w.rule && l.Max != w.max) || (w.rule && (l.HasMin || l.HasMax)) {
			t.Errorf("row %d: %+v, want %s max %g", i+2, l, w.q, w.max)
		}
	}
}

func TestParseErrors(t *testing.T) {
	h := "product,quantity,min,max,target,tol,at_nm\n"
	cases := []struct {
		name, in  string
		line, col int
		substr    string
	}{
		{"unknown quantity", h + "p,zavg,1,2,,,\n", 2, 3, "unknown quantity"},
		{"unknown column", "product,quantity,maximum\np,pdi,1\n", 1, 18, "unknown column"},
		{"no limit", h + "p,pdi,,,,,\n", 2, 7, "no limit"},
		{"min above max", h + "p,pdi,0.3,0.1,,,\n", 2, 7, "above max"},
		{"not a number", h + "p,pdi,,low,,,\n", 2, 8, `"low": not a number`},
		// The number syntax of dls.ParseNumber: strconv.ParseFloat would
		// read each of these (as 16, 10, +Inf and 0).
		{"hexadecimal", h + "p,pdi,,0x10,,,\n", 2, 8, "hexadecimal"},
		{"digit separator", h + "p,pdi,,1_0,,,\n", 2, 8, "'_'"},
		{"infinity", h + "p,pdi,,+Inf,,,\n", 2, 8, "not finite"},
		{"underflow", h + "p,pdi,,1e-400,,,\n", 2, 8, "underflows"},
		// Values no sample can have: slips of unit or scale (common
		// practice: PDI a fraction, sizes in nm, percentages up to 100).
		{"pdi limit as a percentage", h + "p,pdi,,10,,,\n", 2, 8, "write 0.1 for 10 %"},
		{"size in µm", h + "p,z_avg_nm,0.018,0.022,,,\n", 2, 12, "sizes are in nm"},
		{"negative size", h + "p,d90_nm,-5,,,,\n", 2, 10, "outside the valid range"},
		{"size target in µm", h + "p,z_avg_nm,,,0.08,0.003,\n", 2, 14, "sizes are in nm"},
		{"tolerance beyond any size", h + "p,z_avg_nm,,,100,1e6,\n", 2, 18, "tolerance"},
		{"huge tolerance", h + "p,pdi,,,0.1,1.7e308,\n", 2, 13, "tolerance"},
		{"percentage over 100", h + "p,intensity_pct_above,,150,,,100\n", 2, 24, "a percentage"},
		{"at_nm in µm", h + "p,intensity_pct_above,,2,,,0.05\n", 2, 28, "at_nm"},
		{"count rate in cps", h + "p,count_rate_kcps,,2e5,,,\n", 2, 20, "kcps"},
		{"negative runs", h + "p,runs,-1,,,,\n", 2, 8, "runs"},
		{"target without tol", h + "p,z_avg_nm,,,100,,\n", 2, 14, "together"},
		{"target and min", h + "p,z_avg_nm,90,,100,2,\n", 2, 16, "either"},
		{"at_nm missing", h + "p,intensity_pct_above,,2,,,\n", 2, 28, "at_nm"},
		{"at_nm misplaced", h + "p,pdi,,0.1,,,100\n", 2, 14, "only to"},
		{"duplicate", h + "p,pdi,,0.1,,,\np,pdi,,0.2,,,\n", 3, 3, "already limited"},
		{"empty", "# nothing\n", 0, 0, "empty"},
		// none and no_bracketing are rules without bounds; none is a
		// product's only row (the format of this project).
		{"none with a bound", h + "p,none,,1,,,\n", 2, 9, "takes no max"},
		{"no_bracketing with a target", h + "p,no_bracketing,,,1,1,\n", 2, 19, "takes no target"},
		{"none and a limit", h + "p,pdi,,0.1,,,\nP,none,,,,,\n", 3, 3, "quantity none"},
		{"limit after none", h + "p,none,,,,,\np,pdi,,0.1,,,\n", 3, 3, "a pdi row"},
		{"none twice", h + "p,none,,,,,\np,none,,,,,\n", 3, 3, "already given"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Parse(strings.NewReader(c.in), "spec.csv")
			var pe *dls.PosError
			if !errors.As(err, &pe) {
				t.Fatalf("error %v is not positioned", err)
			}
			if pe.Line != c.line || pe.Column != c.col {
				t.Errorf("%v at %d:%d, want %d:%d", err, pe.Line, pe.Column, c.line, c.col)
			}
			if !strings.Contains(err.Error(), c.substr) {
				t.Errorf("%v lacks %q", err, c.substr)
			}
		})
	}
}

func FuzzParse(f *testing.F) {
	f.Add(good)
	f.Add("product,quantity,min\np,pdi,1\n")
	f.Add("product,quantity,min,max\np,pdi,+.5,5.E+0\n")
	f.Add("product,quantity,min,max\np,pdi,0x1p-2,1_0\n")
	f.Add("product,quantity,min,max\np,pdi,1e-400,1e999\n")
	f.Add("product,quantity,target,tol\np,pdi,1.7e308,1.7e308\n")
	f.Fuzz(func(t *testing.T, in string) {
		s, err := Parse(strings.NewReader(in), "f.csv")
		if err != nil {
			var pe *dls.PosError
			if !errors.As(err, &pe) {
				t.Fatalf("unpositioned error %v", err)
			}
			return
		}
		for _, l := range s.Limits {
			for _, v := range []float64{l.Min, l.Max, l.AtNm} {
				if math.IsNaN(v) || math.IsInf(v, 0) {
					t.Fatalf("non-finite limit %+v", l)
				}
			}
			if l.HasMin && l.HasMax && l.Min > l.Max {
				t.Fatalf("inverted limit %+v", l)
			}
		}
	})
}

// TestColumnsIsACopy: changing the returned slice does not change what a
// file may hold.
func TestColumnsIsACopy(t *testing.T) {
	c := Columns()
	c[0] = "changed"
	if Columns()[0] != "product" {
		t.Errorf("Columns() shares its backing array: %v", Columns())
	}
}

// Errors quote a cell only as an excerpt: its first 40 characters in Go
// quoting, then "…" (the rule of io/safetext).
func TestErrorsQuoteExcerpts(t *testing.T) {
	h := "product,quantity,min,max,target,tol,at_nm\n"
	long := strings.Repeat("y", 1000)
	cases := []struct {
		name, in string
		want     string
	}{
		{"number", h + "p,pdi," + long + ",,,,\n", `"` + long[:40] + `"…: not a number`},
		{"quantity", h + "p," + long + ",1,2,,,\n", `unknown quantity "` + long[:40] + `"… (known:`},
		{"repeated product", h + long + ",pdi,,0.1,,,\n" + long + ",pdi,,0.2,,,\n", `"` + long[:40] + `"… pdi already limited on line 2`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Parse(strings.NewReader(c.in), "spec.csv")
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("error %v lacks %q", err, c.want)
			}
			if n := len(err.Error()); n > 400 {
				t.Errorf("message of %d bytes", n)
			}
		})
	}
}

// TestDecimalCommaLocale: the specification of TestParse as a spreadsheet
// of a decimal-comma locale saves it (';' between cells, ',' as decimal
// sign, ISO 80000-1:2022, 7.3.2) gives the same limits; the numbers are the
// decimal texts of the ',' file, so the comparison is exact.
func TestDecimalCommaLocale(t *testing.T) {
	semi := "product;quantity;min;max;target;tol;at_nm;note\n" +
		"latex-100;z_avg_nm;;;101,8;3,0;;reference latex, lab window\n" +
		"gold-20;pdi;;0,10;;;;\n" +
		"gold-20;intensity_pct_above;;2;;;100;\n"
	s, err := Parse(strings.NewReader(semi), "spec.csv")
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		min, max float64
	}{{101.8 - 3.0, 101.8 + 3.0}, {0, 0.10}, {0, 2}}
	if len(s.Limits) != len(cases) {
		t.Fatalf("%d limits, want %d", len(s.Limits), len(cases))
	}
	for i, c := range cases {
		l := s.Limits[i]
		if l.Min != c.min || l.Max != c.max {
			t.Errorf("limit %d: %g … %g, want %g … %g", i, l.Min, l.Max, c.min, c.max)
		}
	}
	if _, err := Parse(strings.NewReader("product;quantity;max\ngold-20;pdi;0,1,0\n"), "spec.csv"); err == nil {
		t.Error("0,1,0 read as a number")
	}
}
