package cumulants_test

import (
	"fmt"
	"math"

	"dlsbatch/cumulants"
	"dlsbatch/dls"
)

// A single exponential decay on a multi-tau lag grid: the fit returns the
// generating decay rate, a zero polydispersity index, the coherence factor
// and the baseline.
func ExampleFit() {
	tau := multiTau(1e-6, 8, 180)
	m := &dls.Measurement{File: "example.csv", Kind: dls.KindG2, TauS: tau, Corr: make([]float64, len(tau))}
	for i, t := range tau {
		m.Corr[i] = 1 + 0.9*math.Exp(-2*1500*t) // g2 = B + β·exp(−2Γτ)
	}
	r, err := cumulants.Fit(m, nil)
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
