package batch

import (
	"strings"
	"testing"

	"dlsbatch/contin"
)

// TestSettingsValidate: the defaults are valid, and each setting just past
// its documented limit is refused with a message naming it. The limits are
// this package's own documented ranges (Settings.Validate).
func TestSettingsValidate(t *testing.T) {
	def := DefaultSettings()
	if err := def.Validate(); err != nil {
		t.Fatalf("defaults invalid: %v", err)
	}
	tests := []struct {
		name string
		mod  func(s *Settings)
		want string
	}{
		{"cumulant order", func(s *Settings) { s.Cumulants.Order = 4 }, "cumulant order"},
		{"negative u(T)", func(s *Settings) { s.Uncertainty.TemperatureK = -0.1 }, "uncertainties"},
		{"coverage factor", func(s *Settings) { s.CoverageFactor = 0 }, "coverage factor"},
		{"fixed without λ", func(s *Settings) { s.Distribution.Contin.Criterion = contin.Fixed }, "positive strength"},
		{"target 1", func(s *Settings) { s.Distribution.Contin.TargetProbReject = 1 }, "target"},
		{"target 0", func(s *Settings) { s.Distribution.Contin.TargetProbReject = 0 }, "target"},
		{"grid 19", func(s *Settings) { s.Distribution.Grid.NGamma = 19 }, "20 to 400"},
		{"grid 401", func(s *Settings) { s.Distribution.Grid.NGamma = 401 }, "20 to 400"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := DefaultSettings()
			tc.mod(&s)
			err := s.Validate()
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %v, want one containing %q", err, tc.want)
			}
		})
	}
	s := DefaultSettings()
	s.Distribution.Grid.NGamma = 20
	s.Distribution.Contin.Criterion, s.Distribution.Contin.Lambda = contin.Fixed, 1e-4
	if err := s.Validate(); err != nil {
		t.Errorf("limits themselves refused: %v", err)
	}
}
