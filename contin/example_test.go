package contin_test

import (
	"fmt"
	"math"
	"math/rand/v2"

	"dlsbatch/contin"
)

// Invert a two-population decay measured on a multi-tau lag grid and list
// the peaks of the rate spectrum.
func Example() {
	// Lags of a multi-tau correlator: 16 channels at 1 µs, then 8 per
	// octave, up to 0.5 s.
	var tau []float64
	for k := 1; k <= 16; k++ {
		tau = append(tau, float64(k)*1e-6)
	}
	for dt := 2e-6; tau[len(tau)-1] < 0.5; dt *= 2 {
		for j := 9; j <= 16; j++ {
			tau = append(tau, float64(j)*dt)
		}
	}
	// g1 of two exponential decays, 800/s (40 %) and 8000/s (60 %), with
	// noise of standard deviation 1e-3.
	rng := rand.New(rand.NewPCG(1, 2))
	y := make([]float64, len(tau))
	sigma := make([]float64, len(tau))
	for i, t := range tau {
		y[i] = 0.4*math.Exp(-800*t) + 0.6*math.Exp(-8000*t) + 1e-3*rng.NormFloat64()
		sigma[i] = 1e-3
	}

	grid, err := contin.NewGrid(tau, nil) // build once per lag grid, share freely
	if err != nil {
		fmt.Println(err)
		return
	}
	res, err := contin.Invert(grid, y, sigma, nil) // default: ProbReject, free baseline
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("criterion %v, status %v\n", res.Criterion, res.Status)
	fmt.Printf("intercept Σx + baseline = %.2f\n", res.SumAmplitude+res.Baseline)
	for i, p := range contin.Peaks(res.GammaPerS, res.Amplitude, nil) {
		fmt.Printf("peak %d: mode %.1f×10³ 1/s, %.0f %% of the amplitude\n", i+1, p.ModePerS/1e3, 100*p.Fraction)
	}
	// Output:
	// criterion prob-reject, status converged
	// intercept Σx + baseline = 1.00
	// peak 1: mode 0.8×10³ 1/s, 40 % of the amplitude
	// peak 2: mode 8.0×10³ 1/s, 60 % of the amplitude
}
