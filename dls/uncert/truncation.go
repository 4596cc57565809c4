package uncert

import (
	"fmt"
	"math"
)

// LargeTruncationRel is the relative standard uncertainty of Γ̄ from the
// cumulant truncation at or above which AddTruncation reports the term as
// large: half the default viscosity term (1 %), so that the truncation is
// then among the leading inputs of a default budget (a choice, not a
// standard). On lognormal samples it is reached near PDI 0.25.
const LargeTruncationRel = 0.005

// AddTruncation adds the truncation of the cumulant series to budget b as
// a Type B input of the decay rate: the bias of Γ̄ from fitting a broad
// sample at second order, not corrected (its sign depends on the shape of
// the distribution) but taken as a standard uncertainty u = |relBias|·Γ̄
// with the sensitivity −d/Γ̄ and infinite degrees of freedom. relBias is
// the estimate of cumulants.TruncationBias for a lognormal of PDI
// pdiLognormal. b is recombined (combined and expanded uncertainty,
// shares, ν_eff). large is true when |relBias| ≥ LargeTruncationRel: the
// z-average then rests noticeably on the truncated series and the PDI
// reads low; the caller should say so. A zero relBias adds an exact
// component. Errors wrap ErrBadInput: a nil budget, a decay rate that is
// not a positive number, a bias that is not finite or of 100 % or more.
func AddTruncation(b *Budget, gammaPerS, relBias, pdiLognormal float64) (large bool, err error) {
	switch {
	case b == nil:
		return false, fmt.Errorf("truncation term: no budget: %w", ErrBadInput)
	case !(gammaPerS > 0) || math.IsInf(gammaPerS, 0):
		return false, fmt.Errorf("truncation term: decay rate %g is not a positive number: %w", gammaPerS, ErrBadInput)
	case math.IsNaN(relBias) || !(math.Abs(relBias) < 1):
		return false, fmt.Errorf("truncation term: relative bias %g is not a number below 100 %%: %w", relBias, ErrBadInput)
	}
	rel := math.Abs(relBias)
	basis := "exact for a PDI at or below 0.01"
	if rel > 0 {
		basis = fmt.Sprintf("second-order fit of the exact correlogram of a lognormal of PDI %.3f: Γ̄ off by %+.2f %%, taken as a standard uncertainty", pdiLognormal, 100*relBias)
	}
	b.Components = append(b.Components, Component{
		Name: "cumulant_truncation", Symbol: "δΓ̄", Type: "B", Value: 0, StandardUncertainty: rel * gammaPerS, Unit: "1/s",
		Sensitivity: -b.ZAvgNm / gammaPerS, Basis: basis,
	})
	if err := recombine(b); err != nil {
		return false, err
	}
	large = rel >= LargeTruncationRel
	if large {
		b.Notes = append(b.Notes, fmt.Sprintf("cumulant truncation: the second-order series moves Γ̄ of a broad sample by about %.1f %%; the PDI reads low (lognormal equivalent %.2f)", 100*rel, pdiLognormal))
	}
	return large, nil
}
