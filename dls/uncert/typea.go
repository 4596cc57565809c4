package uncert

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/stat"
)

// Bases of the Type A input u(Γ̄) (Inputs.GammaBasis), by the source of the
// standard error.
const (
	// TypeAModel: the cumulant fit's covariance under the noise covariance
	// of a photon correlator for the stated duration and count rate
	// (cumulants.FitCorrelated, basis "model").
	TypeAModel = "cumulant fit, correlator noise covariance (Schätzel 1990) for the stated duration and count rate"
	// TypeASigma: the same with the channel variances of the σ column
	// (from sub-runs, say; basis "sigma").
	TypeASigma = "cumulant fit, σ column with the correlator noise correlation (Schätzel 1990)"
	// TypeATail: the same scaled to the far channels' residuals (no
	// duration stated; basis "tail"): noisy and on average high.
	TypeATail = "cumulant fit, correlator noise covariance (Schätzel 1990) scaled to the far channels (no duration given)"
	// TypeAIndependent: the fit's own standard error, which assumes
	// independent channel noise and understates a correlator's (about
	// sixfold on photon-level data).
	TypeAIndependent = "cumulant fit assuming independent channel noise (understated for correlator data)"
	// TypeARuns: the scatter of the decay rates of repeat runs
	// (DecayRateOfRuns).
	TypeARuns = "scatter of the decay rates of the runs, s/√n"
)

// DecayRateOfRuns returns the mean of the decay rates Γ̄_i (1/s) of n
// repeat runs (or sub-runs) of one sample and its Type A standard
// uncertainty from their scatter (GUM 4.2): u = s/√n with s the sample
// standard deviation and ν = n − 1 degrees of freedom. It needs no noise
// model, so it holds for correlated correlator noise, dust and drift
// alike; pass the three with GammaBasis TypeARuns to ZAverage for the
// budget of the sample's mean z-average (the size of the mean rate). With
// few runs ν is small: the interval d ± k·u_c with k = 2 then covers less
// than 95 % (88 % for ν = 4), and CoverageFactorT95 of the budget is the
// k to use. Fewer than two rates, or a rate that is not a positive finite
// number, is an error wrapping ErrBadInput.
func DecayRateOfRuns(gammas []float64) (meanPerS, sePerS, dof float64, err error) {
	if len(gammas) < 2 {
		return 0, 0, 0, fmt.Errorf("decay rate of runs needs at least 2 runs, got %d: %w", len(gammas), ErrBadInput)
	}
	for i, g := range gammas {
		if !(g > 0) || math.IsInf(g, 0) {
			return 0, 0, 0, fmt.Errorf("run %d: decay rate %g is not a positive number: %w", i+1, g, ErrBadInput)
		}
	}
	m, s := stat.MeanStdDev(gammas, nil)
	n := float64(len(gammas))
	return m, s / math.Sqrt(n), n - 1, nil
}

// recombine fills the contributions, the combined, relative and expanded
// uncertainties, the variance shares, ν_eff (Welch–Satterthwaite) and the
// Student coverage factor of b from its components, ZAvgNm and
// CoverageFactor. A non-finite result is an error wrapping ErrBadInput.
func recombine(b *Budget) error {
	var uc2, wsDen float64
	for i := range b.Components {
		c := &b.Components[i]
		c.ContributionNm = 0
		if c.StandardUncertainty != 0 { // no −0 for an exact input
			c.ContributionNm = c.Sensitivity * c.StandardUncertainty
		}
		uc2 += c.ContributionNm * c.ContributionNm
	}
	for i := range b.Components {
		c := &b.Components[i]
		c.VarianceSharePct = 0
		if uc2 > 0 {
			c.VarianceSharePct = 100 * c.ContributionNm * c.ContributionNm / uc2
		}
		if c.DOF > 0 {
			u2 := c.ContributionNm * c.ContributionNm
			wsDen += u2 * u2 / c.DOF
		}
	}
	b.CombinedUNm = math.Sqrt(uc2)
	b.RelativeUPct = 0
	if b.ZAvgNm != 0 {
		b.RelativeUPct = 100 * b.CombinedUNm / b.ZAvgNm
	}
	b.ExpandedUNm = b.CoverageFactor * b.CombinedUNm
	b.EffectiveDOF = 0
	b.CoverageFactorT95 = z975
	if wsDen > 0 {
		b.EffectiveDOF = uc2 * uc2 / wsDen
		b.CoverageFactorT95 = t975(b.EffectiveDOF)
	}
	vals := []float64{b.ZAvgNm, b.CombinedUNm, b.RelativeUPct, b.ExpandedUNm, b.EffectiveDOF, b.CoverageFactorT95}
	for _, c := range b.Components {
		vals = append(vals, c.Sensitivity, c.ContributionNm, c.VarianceSharePct)
	}
	for _, v := range vals {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("inputs of extreme magnitude give a non-finite budget: %w", ErrBadInput)
		}
	}
	return nil
}
