package cumulants

import "math"

// LocalSigma estimates the standard deviation of each channel's noise from
// residuals r of a fit over channels first..last: the root mean square of
// the residuals in a window of ±10 channels (clipped to the fit range).
// Measured on simulated multi-tau correlograms, this window is wide enough
// that the weights it gives are nearly as good as the true σ (the scatter
// of Γ̄ within 1 % of that with the true σ) and narrow enough to follow
// the noise's change along the lag axis. Channels outside the range take
// the value of the nearest end. floor keeps weights finite on noise-free
// data. Fit weights its second pass with it when no σ is given.
func LocalSigma(r []float64, first, last int, floor float64) []float64 {
	const half = 10
	out := make([]float64, len(r))
	for i := first; i <= last; i++ {
		var ss float64
		lo, hi := max(first, i-half), min(last, i+half)
		for k := lo; k <= hi; k++ {
			ss += r[k] * r[k]
		}
		out[i] = math.Max(math.Sqrt(ss/float64(hi-lo+1)), floor)
	}
	for i := 0; i < first; i++ {
		out[i] = out[first]
	}
	for i := last + 1; i < len(r); i++ {
		out[i] = out[last]
	}
	return out
}
