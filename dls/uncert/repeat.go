package uncert

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/stat"
)

// Repeatability summarises repeat runs of one sample, in the unit of the
// values given (nm for z-averages).
type Repeatability struct {
	N    int     `json:"n"`
	Mean float64 `json:"mean"`
	// SD is the sample standard deviation s (n − 1 in the denominator),
	// RSDPct = 100·s/|mean|, SEMean = s/√n, DOF = n − 1.
	SD     float64 `json:"sd"`
	RSDPct float64 `json:"rsd_pct"`
	SEMean float64 `json:"se_mean"`
	DOF    int     `json:"dof"`
}

// RepeatabilityOf returns the repeatability of values (e.g. the z-averages
// of a sample's runs). Fewer than two values, or a value that is not
// finite, is an error wrapping ErrBadInput.
func RepeatabilityOf(values []float64) (*Repeatability, error) {
	if len(values) < 2 {
		return nil, fmt.Errorf("repeatability needs at least 2 runs, got %d: %w", len(values), ErrBadInput)
	}
	for i, v := range values {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("run %d: value %g is not finite: %w", i+1, v, ErrBadInput)
		}
	}
	mean, sd := stat.MeanStdDev(values, nil)
	n := len(values)
	r := &Repeatability{N: n, Mean: mean, SD: sd, SEMean: sd / math.Sqrt(float64(n)), DOF: n - 1}
	if mean != 0 {
		r.RSDPct = 100 * sd / math.Abs(mean)
	}
	return r, nil
}
