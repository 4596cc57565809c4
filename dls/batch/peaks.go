package batch

import (
	"math"
	"sort"

	"dlsbatch/contin"
	"dlsbatch/dls"
	"dlsbatch/dls/sizedist"
)

// summariseWeightings summarises the three weightings of d. The intensity
// peaks are those of contin.Peaks that pass the significance test
// (contin.Significant, with the uncertainties that sens gives; every
// candidate when sens is nil); the volume and number weights are then
// confined to their bins (keepPeaks). amp are the inversion's amplitudes
// on the ascending rate grid (d's bins in reverse order). Each peak carries
// the standard uncertainties of its share and mean diameter (0 without
// sens).
func summariseWeightings(d *sizedist.Distribution, amp []float64, sens *contin.Sensitivity, ps *contin.PeakSettings) (in, vol, num *dls.WeightSummary) {
	sig := *ps
	sig.MinZ = sens.MinZ(ps) // the threshold that goes with sens's uncertainties
	in = summarise(d, d.Intensity, ps, func(p contin.Peak) (bool, float64, float64) {
		uA, uM := peakNoise(d, d.Intensity, nil, amp, sens, p)
		return sens == nil || contin.Significant(p.Fraction, uA, &sig), uA, uM
	})
	keepPeaks(d, in)
	kept := make([]bool, len(d.DiameterNm))
	for j, v := range d.Volume {
		kept[j] = v > 0
	}
	vol = summarise(d, d.Volume, ps, func(p contin.Peak) (bool, float64, float64) {
		uA, uM := peakNoise(d, d.Volume, kept, amp, sens, p)
		return true, uA, uM
	})
	num = summarise(d, d.Number, ps, func(p contin.Peak) (bool, float64, float64) {
		uA, uM := peakNoise(d, d.Number, kept, amp, sens, p)
		return true, uA, uM
	})
	return in, vol, num
}

// peakNoise returns the standard uncertainties of the share (fraction) and
// of the mean diameter (nm) of peak p of weighting w, by linear propagation
// through sens (0, 0 when sens is nil). The weighting is w_j = F_j·x_{n−1−j}
// with F_j = w_j/I_j (1 for the intensity) over the bins where in is true
// (every bin for nil), so that with T the weighting's total, A the peak's
// share of it and m its mean over the peak's bins P
//
//	∂(A/T)/∂x = F_j·(1[j∈P] − A/T)/T,   ∂m/∂x = F_j·(d_j − m)/A   (j∈P).
func peakNoise(d *sizedist.Distribution, w []float64, in []bool, amp []float64, sens *contin.Sensitivity, p contin.Peak) (uFrac, uMeanNm float64) {
	if sens == nil {
		return 0, 0
	}
	n := len(w)
	F := make([]float64, n)
	var T, A, AD float64
	for j := range w {
		x := amp[n-1-j]
		if !(x > 0) || !(d.Intensity[j] > 0) || (in != nil && !in[j]) {
			continue
		}
		F[j] = w[j] / d.Intensity[j]
		T += F[j] * x
		if j >= p.Lo && j <= p.Hi {
			A += F[j] * x
			AD += F[j] * x * d.DiameterNm[j]
		}
	}
	if !(T > 0) || !(A > 0) {
		return 0, 0
	}
	f, mean := A/T, AD/A
	cf := make([]float64, n)
	cm := make([]float64, n)
	for j, Fj := range F {
		if Fj == 0 {
			continue
		}
		k := n - 1 - j
		cf[k] = -Fj * f / T
		if j >= p.Lo && j <= p.Hi {
			cf[k] += Fj / T
			cm[k] = Fj * (d.DiameterNm[j] - mean) / A
		}
	}
	uFrac, uMeanNm = sens.StdDev(cf), sens.StdDev(cm)
	if math.IsNaN(uFrac) || math.IsNaN(uMeanNm) {
		return 0, 0
	}
	if p.Lo == p.Hi {
		// A peak of one bin has the bin's diameter for its mean whatever
		// its amplitude, so the propagation gives 0; its position is known
		// only to the bin: the resolution of an indication, a rectangular
		// distribution of the bin's width δ, u = δ/(2√3) (GUM, JCGM
		// 100:2008, F.2.2.1).
		uMeanNm = math.Hypot(uMeanNm, binWidthNm(d.DiameterNm, p.Lo)/(2*math.Sqrt(3)))
	}
	return uFrac, uMeanNm
}

// binWidthNm is the width of bin j of the increasing, log-spaced
// diameters dNm: from the geometric mean with its lower neighbour to that
// with its upper one, an end bin reflected about its diameter in log.
func binWidthNm(dNm []float64, j int) float64 {
	n := len(dNm)
	if n < 2 {
		return 0
	}
	var lo, hi float64
	if j > 0 {
		lo = math.Sqrt(dNm[j-1] * dNm[j])
	}
	if j < n-1 {
		hi = math.Sqrt(dNm[j] * dNm[j+1])
	}
	if j == 0 {
		lo = dNm[0] * dNm[0] / hi
	}
	if j == n-1 {
		hi = dNm[j] * dNm[j] / lo
	}
	return hi - lo
}

// keepPeaks confines the volume and number weights to the bins of the
// intensity peaks. Outside them the intensity solution is ripple (below
// the peak rule's minimum share) or a peak that the noise could have
// made (below its significance), and the factors 1/d³ and 1/d⁶ of the
// conversion would turn a ripple of 0.1 % at the small end of the grid into
// most of the number distribution (Finsy 1994; Patty & Frisken 2006).
func keepPeaks(d *sizedist.Distribution, in *dls.WeightSummary) {
	if len(in.Peaks) == 0 {
		return
	}
	keep := make([]bool, len(d.DiameterNm))
	for _, p := range in.Peaks {
		for j, x := range d.DiameterNm {
			if x >= p.LowNm && x <= p.HighNm {
				keep[j] = true
			}
		}
	}
	for _, w := range [][]float64{d.Volume, d.Number} {
		var sum float64
		for j := range w {
			if !keep[j] {
				w[j] = 0
			}
			sum += w[j]
		}
		if sum > 0 {
			for j := range w {
				w[j] /= sum
			}
		}
	}
}

// summarise finds the peaks of one weighting (largest area first), its
// mean and its percentiles. The peak rule is contin.Peaks, which applies to
// any ascending log-spaced grid: here the diameters. judge says whether a
// candidate is reported and gives its uncertainties (share as a fraction,
// mean diameter in nm).
func summarise(d *sizedist.Distribution, w []float64, ps *contin.PeakSettings, judge func(contin.Peak) (keep bool, uFrac, uMeanNm float64)) *dls.WeightSummary {
	ws := &dls.WeightSummary{
		D10Nm: d.Percentile(w, 0.1),
		D50Nm: d.Percentile(w, 0.5),
		D90Nm: d.Percentile(w, 0.9),
	}
	var sw, swd float64
	for j, v := range w {
		sw += v
		swd += v * d.DiameterNm[j]
	}
	if sw > 0 {
		ws.MeanNm = swd / sw
	}
	cand := contin.Peaks(d.DiameterNm, w, ps)
	// The largest candidate always stands: the test asks whether a peak
	// is more than noise beside the rest, and the distribution's main
	// population is not in question.
	main := -1
	for i, p := range cand {
		if main < 0 || p.Fraction > cand[main].Fraction {
			main = i
		}
	}
	for i, p := range cand {
		keep, uFrac, uMean := judge(p)
		if !keep && i != main {
			ws.InsignificantPct += 100 * p.Fraction
			continue
		}
		var a, ad float64
		for j := p.Lo; j <= p.Hi; j++ {
			a += w[j]
			ad += w[j] * d.DiameterNm[j]
		}
		mean := ad / a
		var v float64
		for j := p.Lo; j <= p.Hi; j++ {
			v += w[j] * (d.DiameterNm[j] - mean) * (d.DiameterNm[j] - mean)
		}
		ws.Peaks = append(ws.Peaks, dls.Peak{ModeNm: p.ModePerS, MeanNm: mean, SDNm: math.Sqrt(v / a),
			AreaPct: 100 * p.Fraction, LowNm: d.DiameterNm[p.Lo], HighNm: d.DiameterNm[p.Hi],
			MeanUNm: uMean, AreaUPct: 100 * uFrac})
	}
	sort.SliceStable(ws.Peaks, func(i, j int) bool { return ws.Peaks[i].AreaPct > ws.Peaks[j].AreaPct })
	return ws
}
