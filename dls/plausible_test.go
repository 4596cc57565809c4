package dls

import (
	"math"
	"testing"
)

// TestRangeFormat: how messages print a range and a value with its unit
// (the unit symbols of the SI Brochure, 9th ed., 2019; the degree sign
// follows the number without a space).
func TestRangeFormat(t *testing.T) {
	tests := []struct {
		r          Range
		str, value string
	}{
		{Range{Min: -20, Max: 150, Unit: "°C"}, "-20 … 150 °C", "25 °C"},
		{Range{Min: 5, Max: 179, Unit: "°"}, "5 … 179°", "25°"},
		{Range{Min: 1, Max: 2.5}, "1 … 2.5", "25"},
		{Range{Min: 0, Max: 1e7, Unit: "kcps"}, "0 … 1e+07 kcps", "25 kcps"},
		{Range{Min: 0, Max: math.Inf(1), Unit: "s"}, "≥ 0 s", "25 s"},
		{Range{Min: math.Inf(-1), Max: 3}, "≤ 3", "25"},
	}
	for _, tc := range tests {
		if got := tc.r.String(); got != tc.str {
			t.Errorf("%+v: String %q, want %q", tc.r, got, tc.str)
		}
		if got := tc.r.WithUnit("25"); got != tc.value {
			t.Errorf("%+v: WithUnit %q, want %q", tc.r, got, tc.value)
		}
	}
	r := Range{Min: 0, Max: 1}
	for _, c := range []struct {
		v    float64
		want bool
	}{{0, true}, {1, true}, {-1e-300, false}, {math.Nextafter(1, 2), false}, {math.NaN(), false}} {
		if got := r.Contains(c.v); got != c.want {
			t.Errorf("[0, 1] contains %g: %v, want %v (bounds inclusive, NaN never inside)", c.v, got, c.want)
		}
	}
}
