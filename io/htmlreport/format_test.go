package htmlreport

import (
	"math"
	"strings"
	"testing"
)

// Number formats of the pages. Expected strings follow from the stated
// rule (n significant digits; fixed decimals; no negative zero), worked
// by hand; exact strings, no tolerance.
func TestFormats(t *testing.T) {
	for _, tc := range []struct {
		name, got, want string
	}{
		{"sig 4 of 100.95187", sig(100.95187, 4), "101.0"},
		{"sig 4 of 0.0050686", sig(0.0050686, 4), "0.005069"},
		{"sig 4 of -0.0144", sig(-0.0144, 4), "-0.01440"},
		{"sig 4 below 1e-3 uses an exponent", sig(1.380649e-23, 4), "1.381e-23"},
		{"sig 4 of 1e6 uses an exponent", sig(2.5e6, 4), "2.500e+06"},
		{"sig of zero", sig(0, 4), "0"},
		{"sig of NaN", sig(math.NaN(), 4), "—"},
		{"fixed has no negative zero", fixed(-0.0001, 3), "0.000"},
		{"fixed keeps a real sign", fixed(-0.0144, 3), "-0.014"},
		{"fixed of +Inf", fixed(math.Inf(1), 1), "—"},
		{"size ≥ 100 nm: integer", size(101.325), "101"},
		{"size 10–100 nm: one decimal", size(19.46), "19.5"},
		{"size < 10 nm: two decimals", size(8.234), "8.23"},
		{"lag in ns", lag(2.5e-8), "25.0 ns"},
		{"lag in µs", lag(6.656e-4), "666 µs"},
		{"lag in ms", lag(3.356e-3), "3.36 ms"},
		{"lag in s", lag(3.355443), "3.36 s"},
		{"mean ± SD of two runs", meanSD(100.94, 0.42, 2, 1), "100.9 ± 0.4"},
		{"one run: no SD", meanSD(100.94, 0, 1, 1), "100.9"},
		{"no run: dash", meanSD(0, 0, 0, 1), "—"},
		{"RSD needs two runs", spread(0.4, 1, 1), "—"},
		{"temperatures", temperatures([]float64{25, 37.04}), "25.0, 37.0"},
		// Numbers by meaning (issue: the particle index to 4 decimals,
		// counts as integers).
		{"particle index: 4 decimals", particleIndex("1.4607063448921334+0i"), "1.4607+0i"},
		{"particle index with absorption", particleIndex("0.18+3.0835i"), "0.1800+3.0835i"},
		{"particle index, negative imaginary part", particleIndex("1.5-0.00123i"), "1.5000-0.0012i"},
		{"particle index: no negative zero", particleIndex("1.5-0.00004i"), "1.5000+0.0000i"},
		{"particle index, real only", particleIndex("1.59"), "1.5900+0i"},
		{"particle index that is not a number", particleIndex("rayleigh"), "rayleigh"},
		{"count of runs", checkValue("runs", 3), "3"},
		{"count of runs used", checkValue("n_used", 6), "6"},
		{"PDI check", checkValue("pdi", -0.002039), "-0.0020"},
		{"RSD check", checkValue("z_avg_rsd_pct", 0.4123), "0.41"},
		{"intensity above a size", checkValue("intensity_pct_above", 12.0787), "12.08"},
		{"size check", checkValue("z_avg_nm", 100.95187), "101.0"},
		{"integral value of an unknown quantity", checkValue("references", 1), "1"},
		{"other value of an unknown quantity", checkValue("drift_pct", 1.23456), "1.235"},
		{"count of NaN", count(math.NaN()), "—"},
		{"tick label with a true minus", tickNumber(-0.005, 3), "−0.005"},
		{"tick label without negative zero", tickNumber(-1e-18, 3), "0.000"},
	} {
		if tc.got != tc.want {
			t.Errorf("%s: got %q, want %q", tc.name, tc.got, tc.want)
		}
	}
}

// TestSettingsRows: settings are listed sorted by key, strings as they
// are, everything else as compact JSON, whether they come as a map or a
// struct with json tags (expected strings worked by hand from the rule).
func TestSettingsRows(t *testing.T) {
	type inner struct {
		B int `json:"b"`
		A int `json:"a"`
	}
	type settings struct {
		Str   string   `json:"str"`
		List  []string `json:"list"`
		None  []string `json:"none"`
		Float float64  `json:"float"`
		Flag  bool     `json:"flag"`
		In    inner    `json:"in"`
	}
	v := settings{Str: "nonlinear", List: []string{"solvent=water"}, Float: 1.380649e-23, Flag: true, In: inner{2, 1}}
	want := []keyValue{{"flag", "true"}, {"float", "1.380649e-23"}, {"in", `{"b":2,"a":1}`},
		{"list", `["solvent=water"]`}, {"none", "null"}, {"str", "nonlinear"}}
	for _, in := range []any{v, map[string]any{"str": "nonlinear", "list": []string{"solvent=water"}, "none": []string(nil),
		"float": 1.380649e-23, "flag": true, "in": inner{2, 1}}} {
		got := settingsRows(in)
		if len(got) != len(want) {
			t.Fatalf("%d rows, want %d: %v", len(got), len(want), got)
		}
		for i := range want {
			if got[i] != want[i] {
				t.Errorf("row %d: %v, want %v", i, got[i], want[i])
			}
		}
	}
	if settingsRows(nil) != nil {
		t.Error("nil settings gave rows")
	}
}

// Linear ticks: a round step (1, 2 or 5 × 10^n) with three to six ticks
// inside the range, labelled with the step's decimals (common practice
// for plot axes; expected lists worked by hand).
func TestLinearTicks(t *testing.T) {
	for _, tc := range []struct {
		lo, hi float64
		want   string
	}{
		{0.99, 1.93, "1.0 1.2 1.4 1.6 1.8"},
		{-0.0105, 0.0105, "−0.010 −0.005 0.000 0.005 0.010"},
		{0, 31.5, "0 10 20 30"},
		{0, 1.05, "0.0 0.2 0.4 0.6 0.8 1.0"},
	} {
		ticks := linearTicks(tc.lo, tc.hi)
		var got []string
		for _, tk := range ticks {
			got = append(got, tk.Label)
		}
		if g := strings.Join(got, " "); g != tc.want {
			t.Errorf("ticks of [%g, %g]: %q, want %q", tc.lo, tc.hi, g, tc.want)
		}
	}
}
