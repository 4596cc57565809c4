package resultdiff

import (
	"math"
	"testing"
)

// TestTolerances: the rule |a − b| ≤ Abs + Rel·max(|a|, |b|) applied to
// worked cases (expected outcomes by hand), the defaults by column, and
// the --tol syntax.
func TestTolerances(t *testing.T) {
	for _, tc := range []struct {
		col, a, b string
		tol       map[string]Tol
		out       bool
	}{
		{"z_avg_nm", "100.000", "100.090", nil, false}, // 0.09 ≤ 0.1 % of 100.09
		{"z_avg_nm", "100.000", "100.200", nil, true},  // 0.2 > 0.1002
		{"pdi", "0.100", "0.104", nil, false},          // 0.004 ≤ 0.005
		{"pdi", "0.100", "0.106", nil, true},           // 0.006 > 0.005
		{"status", "ok", "warn", nil, true},            // text: exact
		{"z_avg_nm", "100", "101", map[string]Tol{"z_avg_nm": {Rel: 0.02}}, false},
		{"z_avg_nm", "", "", nil, false},   // both empty
		{"z_avg_nm", "", "100", nil, true}, // a value appears
		{"fit_points", "58", "59", map[string]Tol{"fit_points": {Exact: true}}, true},
	} {
		if _, out := compareCell(tc.col, tc.a, tc.b, tc.tol); out != tc.out {
			t.Errorf("%s %q vs %q: out %v, want %v", tc.col, tc.a, tc.b, out, tc.out)
		}
	}
	if d, _ := compareCell("z_avg_nm", "100", "100.3", nil); math.Abs(d.Excess-0.3/0.1003) > 1e-9 {
		t.Errorf("excess %g, want %g (0.3 over the 0.1003 allowed)", d.Excess, 0.3/0.1003)
	}
	for _, tc := range []struct {
		in   string
		col  string
		want Tol
		ok   bool
	}{
		{"z_avg_nm=0.5%", "z_avg_nm", Tol{Rel: 0.005}, true},
		{"pdi=0.01", "pdi", Tol{Abs: 0.01}, true},
		{"status=exact", "status", Tol{Exact: true}, true},
		{"pdi=-1", "", Tol{}, false},
		{"=1", "", Tol{}, false},
		{"pdi", "", Tol{}, false},
	} {
		col, got, err := ParseTol(tc.in)
		if (err == nil) != tc.ok || col != tc.col || got != tc.want {
			t.Errorf("ParseTol(%q) = %q %+v %v", tc.in, col, got, err)
		}
	}
}
