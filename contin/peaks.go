package contin

import (
	"math"
)

// Defaults of PeakSettings.
const (
	DefaultPeakMinFraction = 0.01
	DefaultPeakValley      = 0.5
)

// PeakSettings control Peaks. A nil pointer or zero fields mean the
// defaults.
type PeakSettings struct {
	// MinFraction drops peaks holding less than this fraction of the total
	// amplitude (ripple); 0 means DefaultPeakMinFraction (1 %).
	MinFraction float64
	// Valley: two neighbouring maxima count as separate peaks only when the
	// lowest density between them is below Valley times the lower of the
	// two maxima; otherwise they are one peak. 0 means DefaultPeakValley.
	Valley float64
	// MinZ is the significance a peak needs to be reported: its share
	// must be at least MinZ times its standard uncertainty (Significant);
	// 0 means DefaultPeakMinZ, a negative value reports every peak that
	// Peaks finds. Peaks itself does not apply it (it needs the noise).
	MinZ float64
}

// Peak is one population of a rate spectrum.
type Peak struct {
	// ModePerS is the rate of the density maximum (1/s), refined by a
	// parabola through the three bins around it in ln Γ.
	ModePerS float64
	// MeanPerS is Σ x_jΓ_j / Σ x_j over the peak's bins (1/s).
	MeanPerS float64
	// SigmaLn is the amplitude-weighted standard deviation of ln Γ over the
	// peak's bins.
	SigmaLn float64
	// Fraction is the peak's share of the total amplitude.
	Fraction float64
	// Lo and Hi are the first and last bin of the peak (inclusive).
	Lo, Hi int
}

// Peaks splits a rate spectrum on an ascending grid into peaks. The
// density is x_j/w_j with trapezoid weights w_j in ln Γ. The rule, which
// ignores the numerical ripple of regularised solutions:
//
//  1. every local maximum of the density starts a candidate peak;
//  2. going up in Γ, a candidate merges into the previous one when the
//     lowest density between their maxima is at least Valley times the
//     lower maximum (a shallow dip is ripple, not a gap);
//  3. a peak ends at the lowest bin between it and the next one;
//  4. peaks holding less than MinFraction of the total are dropped (the
//     fractions of the others are not renormalised).
//
// Negative or non-finite amplitudes count as zero. Peaks are returned in
// increasing Γ; nil when the spectrum is zero. It panics if the lengths
// differ. The rule needs only an ascending, positive abscissa, so it
// applies equally to a spectrum mapped onto ascending diameters; the
// fields named …PerS then carry the abscissa's unit.
func Peaks(gammaPerS, amplitude []float64, s *PeakSettings) []Peak {
	if len(gammaPerS) != len(amplitude) {
		panic("contin: Peaks: lengths of rates and amplitudes differ")
	}
	n := len(gammaPerS)
	if n == 0 {
		return nil
	}
	minFrac, valley := DefaultPeakMinFraction, DefaultPeakValley
	if s != nil {
		if s.MinFraction > 0 {
			minFrac = s.MinFraction
		}
		if s.Valley > 0 {
			valley = s.Valley
		}
	}
	x := make([]float64, n)
	d := make([]float64, n) // density
	lg := make([]float64, n)
	var total float64
	for j, v := range amplitude {
		if v > 0 && !math.IsInf(v, 0) {
			x[j] = v
			total += v
		}
		lg[j] = math.Log(gammaPerS[j])
	}
	if !(total > 0) {
		return nil
	}
	for j := range x {
		var w float64
		if j > 0 {
			w += (lg[j] - lg[j-1]) / 2
		}
		if j < n-1 {
			w += (lg[j+1] - lg[j]) / 2
		}
		if w > 0 {
			d[j] = x[j] / w
		}
	}
	// Local maxima (the first bin of a plateau).
	var maxima []int
	for j := 0; j < n; j++ {
		if d[j] <= 0 {
			continue
		}
		if (j == 0 || d[j] > d[j-1]) && (j == n-1 || d[j] >= d[j+1]) {
			// Skip to the end of a plateau so it counts once.
			k := j
			for k+1 < n && d[k+1] == d[j] {
				k++
			}
			if k == n-1 || d[k] > d[k+1] {
				maxima = append(maxima, j)
			}
			j = k
		}
	}
	type cand struct{ lo, hi, top int }
	var cands []cand
	start := 0
	cur := -1
	for _, mx := range maxima {
		if cur < 0 {
			cur = mx
			continue
		}
		v := cur
		for j := cur; j <= mx; j++ {
			if d[j] < d[v] {
				v = j
			}
		}
		if d[v] >= valley*math.Min(d[cur], d[mx]) {
			if d[mx] > d[cur] {
				cur = mx
			}
			continue
		}
		cands = append(cands, cand{start, v, cur})
		start, cur = v+1, mx
	}
	if cur >= 0 {
		cands = append(cands, cand{start, n - 1, cur})
	}
	var peaks []Peak
	for _, c := range cands {
		lo, hi := c.lo, c.hi
		for lo < hi && x[lo] == 0 {
			lo++
		}
		for hi > lo && x[hi] == 0 {
			hi--
		}
		var sx, sxg, sxl float64
		for j := lo; j <= hi; j++ {
			sx += x[j]
			sxg += x[j] * gammaPerS[j]
			sxl += x[j] * lg[j]
		}
		if sx < minFrac*total {
			continue
		}
		ml := sxl / sx
		var v float64
		for j := lo; j <= hi; j++ {
			v += x[j] * (lg[j] - ml) * (lg[j] - ml)
		}
		peaks = append(peaks, Peak{
			ModePerS: math.Exp(parabolicMode(lg, d, c.top)),
			MeanPerS: sxg / sx,
			SigmaLn:  math.Sqrt(v / sx),
			Fraction: sx / total,
			Lo:       lo,
			Hi:       hi,
		})
	}
	return peaks
}

// parabolicMode returns the abscissa of the vertex of the parabola through
// the density at bins k−1, k, k+1, kept within half a bin of k; at the grid
// ends it returns the bin itself.
func parabolicMode(lg, d []float64, k int) float64 {
	if k == 0 || k == len(d)-1 {
		return lg[k]
	}
	x0, x1, x2 := lg[k-1], lg[k], lg[k+1]
	y0, y1, y2 := d[k-1], d[k], d[k+1]
	// Vertex of the interpolating parabola (general spacing).
	num := (x1-x0)*(x1-x0)*(y1-y2) - (x1-x2)*(x1-x2)*(y1-y0)
	den := (x1-x0)*(y1-y2) - (x1-x2)*(y1-y0)
	if !(den != 0) {
		return x1
	}
	v := x1 - 0.5*num/den
	lo, hi := x1-(x1-x0)/2, x1+(x2-x1)/2
	if math.IsNaN(v) {
		return x1
	}
	return math.Min(math.Max(v, lo), hi)
}

// PeaksMeanPerS returns the amplitude-weighted mean rate over the bins of
// the given peaks, Σ Fraction·MeanPerS / Σ Fraction (1/s), or 0 for no
// peaks. Unlike Result.MeanRatePerS it leaves out the bins that Peaks
// discards as ripple, which matters for the first moment: an amplitude ε
// at the fast end of the grid adds about ε·Γmax to Σx_jΓ_j, and noise in
// the first lags can leave such amplitudes at the level of the noise.
func PeaksMeanPerS(peaks []Peak) float64 {
	var s, f float64
	for _, p := range peaks {
		s += p.Fraction * p.MeanPerS
		f += p.Fraction
	}
	if !(f > 0) {
		return 0
	}
	return s / f
}
