package batch

import (
	"errors"
	"fmt"

	"dlsbatch/cumulants"
	"dlsbatch/dls"
	"dlsbatch/dls/uncert"
)

// acquisition is what the correlator noise model needs from the file: the
// run's duration and mean count rate (zero when not given).
func acquisition(r *dls.Result) cumulants.Acquisition {
	var a cumulants.Acquisition
	if r.HasDuration {
		a.DurationS = r.DurationS
	}
	if r.HasCountRate {
		a.CountRateHz = r.CountRateKcps * 1e3
	}
	return a
}

// fitErrors returns the standard errors of Γ̄ and the PDI to report: under
// the correlator's noise when the fit could form them, else the fit's own
// (independent channel noise).
func fitErrors(fit *cumulants.Result) (gammaSE, pdiSE float64) {
	if c := fit.Correlated; c != nil {
		return c.GammaSEPerS, c.PDISE
	}
	return fit.GammaSEPerS, fit.PDISE
}

// typeA returns the Type A input of the budget: u(Γ̄), its degrees of
// freedom and its basis (with the reason when the correlator noise model
// could not be used).
func typeA(fit *cumulants.Result) (se, dof float64, basis string) {
	c := fit.Correlated
	if c == nil {
		basis = uncert.TypeAIndependent
		for _, e := range fit.Unavailable {
			if errors.Is(e, cumulants.ErrNoCorrelated) {
				basis += "; " + e.Error()
			}
		}
		return fit.GammaSEPerS, float64(fit.PointsUsed - 2 - fit.Order), basis
	}
	switch c.Basis {
	case cumulants.BasisModel:
		basis = uncert.TypeAModel
	case cumulants.BasisSigma:
		basis = uncert.TypeASigma
	default:
		basis = uncert.TypeATail
	}
	return c.GammaSEPerS, c.DOF, basis
}

// truncationTerm adds the cumulant truncation to the budget b and returns
// a warning when it is large.
func truncationTerm(b *dls.Budget, fit *cumulants.Result) []string {
	tr := fit.Truncation
	if tr == nil {
		for _, e := range fit.Unavailable {
			if errors.Is(e, cumulants.ErrNoTruncation) {
				b.Notes = append(b.Notes, "no cumulant truncation term: "+e.Error())
			}
		}
		return nil
	}
	large, err := uncert.AddTruncation(b, fit.GammaPerS, tr.GammaBias, tr.PDILognormal)
	if err != nil {
		return []string{"truncation term not computed: " + err.Error()}
	}
	if large {
		return []string{fmt.Sprintf("broad sample: truncating the cumulant series at second order moves the z-average by about %.1f %% (a term of the uncertainty budget) and reads the PDI low (%.2f here; a lognormal that reads so has %.2f); read the distribution",
			100*abs(tr.GammaBias), fit.PDI, tr.PDILognormal)}
	}
	return nil
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}
