package cumulants_test

import (
	"errors"
	"fmt"
	"math"

	"dlsbatch/cumulants"
)

// A single exponential decay on a multi-tau lag grid, given as plain
// slices: the fit returns the generating decay rate, a zero polydispersity
// index, the coherence factor and the baseline. Without σ (nil) the noise
// is estimated from the data.
func ExampleFit() {
	tau := multiTau(1e-6, 8, 180) // lag times in s
	g2 := make([]float64, len(tau))
	for i, t := range tau {
		g2[i] = 1 + 0.9*math.Exp(-2*1500*t) // g2 = B + β·exp(−2Γτ)
	}
	r, err := cumulants.Fit(tau, g2, nil, cumulants.G2, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("method %s, order %d\n", r.Method, r.Order)
	fmt.Printf("mean decay rate %.2f 1/s, PDI %.4f\n", r.GammaPerS, math.Abs(r.PDI))
	fmt.Printf("intercept %.4f, baseline %.4f\n", r.Intercept, r.Baseline)
	// Output:
	// method nonlinear, order 2
	// mean decay rate 1500.00 1/s, PDI 0.0000
	// intercept 0.9000, baseline 1.0000
}

// An error about one point is a *PointError with the point's index, which a
// caller that read the data from a file can turn into a line number; the
// sentinel inside says what is wrong.
func ExampleFit_pointError() {
	tau := multiTau(1e-6, 8, 180)
	g2 := make([]float64, len(tau))
	for i, t := range tau {
		g2[i] = 1 + 0.9*math.Exp(-2*1500*t)
	}
	g2[17] = math.NaN()
	_, err := cumulants.Fit(tau, g2, nil, cumulants.G2, nil)
	var pe *cumulants.PointError
	if errors.As(err, &pe) {
		fmt.Println("index", pe.Index, "non-finite:", errors.Is(err, cumulants.ErrNonFinite))
	}
	fmt.Println(err)
	// Output:
	// index 17 non-finite: true
	// point 17: value is not finite
}
