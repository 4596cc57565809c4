package cumulants

import "fmt"

// Method selects the cumulant fitting method.
type Method int

// Methods.
const (
	Nonlinear Method = iota // Frisken 2001 moment fit of g2 with free baseline (default)
	Linear                  // weighted polynomial fit of ½·ln(g2 − B) with B fixed
)

func (m Method) String() string {
	switch m {
	case Nonlinear:
		return "nonlinear"
	case Linear:
		return "linear"
	}
	return fmt.Sprintf("Method(%d)", int(m))
}

// ParseMethod parses "nonlinear" or "linear".
func ParseMethod(s string) (Method, error) {
	switch s {
	case "nonlinear":
		return Nonlinear, nil
	case "linear":
		return Linear, nil
	}
	return 0, fmt.Errorf("cumulant method %q: want nonlinear or linear", s)
}

// Settings control a fit. The zero value is not useful; start from
// DefaultSettings. A nil *Settings passed to Fit means DefaultSettings.
type Settings struct {
	Method Method
	// Order is the cumulant order, 2 or 3.
	Order int
	// Cutoff ends the fit range where the estimated g1 first falls below
	// it (0 < Cutoff < 1).
	Cutoff float64
	// MinTauS drops channels at shorter lag (afterpulsing, dead time), in s.
	MinTauS float64
	// MinPoints is the fewest channels a fit may use.
	MinPoints int
	// RangeCheck refits with the range end moved by ±25 % and reports the
	// change of Γ̄ (costs two more fits).
	RangeCheck bool
	// MaxIter bounds the Levenberg–Marquardt iterations.
	MaxIter int
}

// DefaultSettings returns the documented defaults: nonlinear second-order
// fit, g1 cutoff 0.1, all channels from the first, at least 8 points, range
// check on, at most 100 iterations.
func DefaultSettings() Settings {
	return Settings{
		Method:     Nonlinear,
		Order:      2,
		Cutoff:     0.1,
		MinTauS:    0,
		MinPoints:  8,
		RangeCheck: true,
		MaxIter:    100,
	}
}

// Validate reports settings no fit can use.
func (s *Settings) Validate() error {
	switch {
	case s.Method != Nonlinear && s.Method != Linear:
		return fmt.Errorf("cumulants: unknown method %d", int(s.Method))
	case s.Order != 2 && s.Order != 3:
		return fmt.Errorf("cumulant order %d: want 2 or 3", s.Order)
	case !(s.Cutoff > 0 && s.Cutoff < 1):
		return fmt.Errorf("g1 cutoff %g: want a value between 0 and 1", s.Cutoff)
	case s.MinPoints < s.Order+3:
		return fmt.Errorf("minimum points %d: want at least %d for order %d", s.MinPoints, s.Order+3, s.Order)
	case s.MaxIter < 1:
		return fmt.Errorf("iteration bound %d: want at least 1", s.MaxIter)
	case s.MinTauS < 0:
		return fmt.Errorf("minimum lag %g s: want zero or more", s.MinTauS)
	}
	return nil
}
