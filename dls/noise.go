package dls

import (
	"math"
	"sort"
)

// LocalSigma estimates the standard deviation of each channel's noise from
// residuals r of a fit over channels first..last: 1.4826 times the median
// absolute residual in a window of ±6 channels (clipped to the fit range),
// which for normal errors estimates σ (the MAD's consistency factor) and is
// robust to the odd outlier. Channels outside the range take the value of
// the nearest end. floor keeps weights finite on noise-free data.
func LocalSigma(r []float64, first, last int, floor float64) []float64 {
	const half = 6
	out := make([]float64, len(r))
	buf := make([]float64, 0, 2*half+1)
	for i := first; i <= last; i++ {
		buf = buf[:0]
		for k := max(first, i-half); k <= min(last, i+half); k++ {
			buf = append(buf, math.Abs(r[k]))
		}
		sort.Float64s(buf)
		med := buf[len(buf)/2]
		if len(buf)%2 == 0 {
			med = (buf[len(buf)/2-1] + buf[len(buf)/2]) / 2
		}
		out[i] = math.Max(1.4826*med, floor)
	}
	for i := 0; i < first; i++ {
		out[i] = out[first]
	}
	for i := last + 1; i < len(r); i++ {
		out[i] = out[last]
	}
	return out
}
