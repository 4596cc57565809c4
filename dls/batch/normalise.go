package batch

import (
	"fmt"
	"math"

	"dlsbatch/dls"
)

// Recognising an intensity correlation exported without normalisation,
// G2(τ) = B·(1 + β·|g1(τ)|²) with B near (mean count)²·(number of
// products), e.g. 1e8, in a column declared g2.
const (
	// unnormalisedMinBaseline is the far-channel mean above which a g2
	// column is taken as unnormalised. A normalised g2 has its baseline at
	// 1 (symmetric normalisation) or within a few per cent of it (other
	// normalisations, dust, drift; common practice), and no normalised
	// correlation's far channels reach 10; its first channels reach 1 + β
	// ≤ 2 for Gaussian light (more only through number fluctuations, never
	// in the far channels).
	unnormalisedMinBaseline = 10
	// A clear plateau (plateauFlat, plateauEnded, plateauQuiet, relative
	// to the decay amplitude A of the normalised curve): the two halves of
	// the far channels agree within 2 % of A beyond three standard errors
	// of their difference; the block of channels before them is already
	// within 5 % of A of the baseline (the decay ended before the far
	// channels begin); the far channels scatter by at most 5 % of A.
	plateauFlat  = 0.02
	plateauEnded = 0.05
	plateauQuiet = 0.05
)

// normaliseG2 returns m unchanged when it is not a g2 column whose far
// channels lie above unnormalisedMinBaseline. Otherwise it returns a copy
// with the correlation (and σ) divided by the far-channel mean B, and a
// warning saying so, when the far channels form a clear plateau; without
// one it returns an error wrapping dls.ErrUnnormalised that says why and
// how to fix the export. The far channels are those the cumulant fit uses
// for its baseline: the last tenth, at least five.
func normaliseG2(m *dls.Measurement) (*dls.Measurement, string, error) {
	n := len(m.Corr)
	nt := max(5, n/10)
	if m.Kind != dls.KindG2 || n < 3*nt {
		return m, "", nil
	}
	tail := m.Corr[n-nt:]
	b := meanOf(tail)
	if !(b > unnormalisedMinBaseline) || math.IsInf(b, 0) {
		return m, "", nil
	}
	for _, v := range m.Corr {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return m, "", nil // the fit names the bad point
		}
	}
	amp := meanOf(m.Corr[:3])/b - 1
	sd := 0.0
	for _, v := range tail {
		sd += (v/b - 1) * (v/b - 1)
	}
	sd = math.Sqrt(sd / float64(nt-1))
	h := nt / 2
	drift := math.Abs(meanOf(tail[:h])-meanOf(tail[h:])) / b
	before := meanOf(m.Corr[n-2*nt:n-nt])/b - 1
	var why string
	switch {
	case !(amp > 0):
		why = fmt.Sprintf("the first channels (%.4g) are not above the far channels", meanOf(m.Corr[:3]))
	case before > plateauEnded*amp:
		why = fmt.Sprintf("the correlation is still at %.0f %% of its amplitude in the channels before the far ones (lags to %.3g s): the decay has not ended within the lag window",
			100*before/amp, m.TauS[n-nt-1])
	case sd > plateauQuiet*amp:
		why = fmt.Sprintf("the far channels scatter by %.0f %% of the amplitude", 100*sd/amp)
	case drift > plateauFlat*amp+3*sd*math.Sqrt(1/float64(h)+1/float64(nt-h)):
		why = fmt.Sprintf("the far channels drift by %.1f %% of the amplitude between their two halves", 100*drift/amp)
	}
	if why != "" {
		return nil, "", fmt.Errorf("%w: the g2 column looks unnormalised (its last %d channels average %.5g, where a normalised g2 has its baseline at 1) "+
			"but shows no clear baseline plateau to normalise by: %s; divide the column by its baseline (the far-channel mean of a run that reaches it, "+
			"or the squared mean count per sample time) and give it as g2, or export the normalised correlation", dls.ErrUnnormalised, nt, b, why)
	}
	c := *m
	c.Corr = make([]float64, n)
	for i, v := range m.Corr {
		c.Corr[i] = v / b
	}
	if m.Sigma != nil {
		c.Sigma = make([]float64, n)
		for i, v := range m.Sigma {
			c.Sigma[i] = v / b
		}
	}
	note := fmt.Sprintf("the g2 column is unnormalised (baseline %.6g): divided by the mean of its last %d channels, a clear plateau "+
		"(flat within %.2g %% of the amplitude, the decay ended before it); sizes do not depend on the scale, and intercept, baseline and curves are those of the normalised g2",
		b, nt, 100*math.Max(drift, sd)/amp)
	return &c, note, nil
}

func meanOf(v []float64) float64 {
	s := 0.0
	for _, x := range v {
		s += x
	}
	return s / float64(len(v))
}
