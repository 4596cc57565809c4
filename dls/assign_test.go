package dls

import (
	"strings"
	"testing"
)

// TestParseAssignment: key=value with spaces trimmed, an empty value kept,
// and unknown or missing keys refused (the keys are the input contract's).
func TestParseAssignment(t *testing.T) {
	for _, tc := range []struct {
		in, key, value, err string
	}{
		{"temperature_c=25", "temperature_c", "25", ""},
		{" angle_deg = 173 ", "angle_deg", "173", ""},
		{"sample=", "sample", "", ""},
		{"sample=a=b", "sample", "a=b", ""},
		{"colour=red", "", "", "unknown key"},
		{"=25", "", "", "want key=value"},
		{"temperature_c", "", "", "want key=value"},
	} {
		p, err := ParseAssignment(tc.in, OriginFlag, "--set "+tc.in)
		if tc.err != "" {
			if err == nil || !strings.Contains(err.Error(), tc.err) {
				t.Errorf("%q: error %v, want %q", tc.in, err, tc.err)
			}
			continue
		}
		if err != nil || p.Key != tc.key || p.Value != tc.value || p.Origin != OriginFlag {
			t.Errorf("%q: %+v, %v", tc.in, p, err)
		}
		if got := Assignments([]Param{p})[0]; got != tc.key+"="+tc.value {
			t.Errorf("%q written back as %q", tc.in, got)
		}
	}
}
