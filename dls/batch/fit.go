package batch

import (
	"errors"
	"fmt"

	"dlsbatch/cumulants"
	"dlsbatch/dls"
)

// fitCumulants runs the cumulant fit of m with the standard errors under
// the correlator's noise (cumulants.FitCorrelated) for the acquisition
// acq. The fit knows points only by
// their index; an error about one point (a *cumulants.PointError) becomes a
// *dls.PosError at that point's file line, wrapping the same sentinel, so
// that the message reads "file:line: reason". Other errors are returned as
// they are (Analyze positions them at the header line).
func fitCumulants(m *dls.Measurement, s *cumulants.Settings, acq cumulants.Acquisition) (*cumulants.Result, error) {
	kind, err := cumulantKind(m.Kind)
	if err != nil {
		return nil, err
	}
	fit, err := cumulants.FitCorrelated(m.TauS, m.Corr, m.Sigma, kind, s, acq)
	if err != nil {
		var pe *cumulants.PointError
		if errors.As(err, &pe) {
			return nil, &dls.PosError{File: m.File, Line: m.LineOf(pe.Index), Err: pe.Err}
		}
		return nil, err
	}
	return fit, nil
}

// cumulantKind maps the kind of a measurement's correlation column to the
// fit's.
func cumulantKind(k dls.CorrKind) (cumulants.Kind, error) {
	switch k {
	case dls.KindG2:
		return cumulants.G2, nil
	case dls.KindG2m1:
		return cumulants.G2Minus1, nil
	case dls.KindG1:
		return cumulants.G1, nil
	}
	return 0, fmt.Errorf("correlation kind %v: want g2, g2m1 or g1", k)
}
