package batch

import (
	"errors"
	"fmt"
	"strings"

	"dlsbatch/cumulants"
	"dlsbatch/dls"
	"dlsbatch/dls/conc"
	"dlsbatch/dls/uncert"
)

// applyMedium corrects the viscosity of the continuous phase for a known
// content of a much smaller colloid, micelle or excipient: a measured
// relative viscosity (medium_relative_viscosity, a viscometer reading) is
// used as given, otherwise η_r follows from medium_volume_fraction through
// Einstein, Batchelor or Krieger–Dougherty (dls/conc). When both are given,
// the volume fraction that the reading implies is checked against the
// stated one. This is the medium's viscosity only: the sized particles'
// own concentration never enters it (see applyKD).
func applyMedium(st *state, meta dls.Metadata) ([]string, error) {
	phi, hasPhi, err := meta.Float(dls.KeyMediumVolumeFraction)
	if err != nil {
		return nil, err
	}
	etaR, hasR, err := meta.Float(dls.KeyMediumRelViscosity)
	if err != nil {
		return nil, err
	}
	if !hasPhi && !hasR {
		return nil, nil
	}
	var warn []string
	note := &dls.MediumNote{SolventMPaS: st.etaPaS * 1e3}
	var med *conc.Medium
	switch {
	case hasR:
		if !(etaR >= 1) {
			return nil, fmt.Errorf("%w: %s %g: a medium cannot be less viscous than its solvent", dls.ErrBadMetadata, dls.KeyMediumRelViscosity, etaR)
		}
		med = &conc.Medium{RelativeViscosity: etaR, Model: "measured", SolventViscosityPaS: st.etaPaS, MediumViscosityPaS: st.etaPaS * etaR}
		note.Model, note.RelativeViscosity = "measured relative viscosity", etaR
		if !hasPhi {
			// No stated φ to check against: report the hydrodynamic
			// volume fraction the reading implies.
			if impl, model, err := conc.VolumeFractionFromViscosity(etaR, nil); err == nil {
				note.VolumeFraction = impl
				note.Check = fmt.Sprintf("the reading implies a hydrodynamic volume fraction of %.4g (%s)", impl, model)
			}
		}
		if hasPhi {
			note.VolumeFraction = phi
			// A viscometer reading carries about 1 % (common practice) when
			// no uncertainty is stated.
			chk, err := conc.CheckMedium(phi, etaR, 0.01*etaR, nil)
			if err != nil {
				return nil, fmt.Errorf("%s: %w", dls.KeyMediumVolumeFraction, err)
			}
			note.Check = chk.Message
			if !chk.Consistent {
				warn = append(warn, "medium: "+chk.Message)
			}
		}
	default:
		med, err = conc.CorrectMedium(st.etaPaS, phi, nil)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", dls.KeyMediumVolumeFraction, err)
		}
		note.Model, note.VolumeFraction, note.RelativeViscosity = med.Model, phi, med.RelativeViscosity
		for _, w := range med.Warnings {
			warn = append(warn, "medium: "+w)
		}
	}
	st.etaPaS = med.MediumViscosityPaS
	st.etaSource += fmt.Sprintf("; × %.5g for the medium (%s)", med.RelativeViscosity, note.Model)
	st.etaLaw = conc.MediumLaw(st.etaLaw, med)
	st.medium = note
	return warn, nil
}

// applyKD corrects the collective diffusion coefficient of concentrated
// particles to infinite dilution, D0 = D_c/(1 + k_D·φ), when the metadata
// state k_D (a number, or "hard-sphere" for Batchelor's 1.45) and the
// particles' volume fraction (volume_fraction, or concentration_mg_ml with
// particle_density_g_cm3). The measured z-average stays as it is; the size
// at infinite dilution is reported beside it.
func applyKD(r *dls.Result, meta dls.Metadata) ([]string, error) {
	p, ok := meta.Get(dls.KeyKD)
	if !ok || strings.TrimSpace(p.Value) == "" {
		return nil, nil
	}
	var kd float64
	var warn []string
	switch v := strings.TrimSpace(p.Value); strings.ToLower(v) {
	case "hard-sphere", "hard-spheres", "hs":
		kd = conc.HardSphereKD
		warn = append(warn, fmt.Sprintf("k_D = %g assumed: hard spheres (Batchelor 1976), not measured for this sample", kd))
	default:
		x, err := dls.ParseNumber(v)
		if err != nil {
			return nil, fmt.Errorf("%s: %s: want a number or hard-sphere: %w: %w", p.Where, dls.KeyKD, err, dls.ErrBadMetadata)
		}
		kd = x
	}
	f, err := conc.FractionFromMetadata(meta)
	if errors.Is(err, conc.ErrNoFraction) {
		return nil, fmt.Errorf("%s: %s given but no volume_fraction (or concentration_mg_ml with particle_density_g_cm3): %w", p.Where, dls.KeyKD, dls.ErrMissingValue)
	}
	if err != nil {
		return nil, err
	}
	d, err := conc.ToInfiniteDilution(r.DiffusionM2PerS, kd, f.Value)
	if err != nil {
		return nil, err
	}
	warn = append(warn, f.Warnings...)
	warn = append(warn, d.Warnings...)
	r.KD, r.KDPhi = kd, f.Value
	r.ZAvgD0Nm = r.ZAvgNm * d.Factor
	r.Correction = appendCorrection(r.Correction, "kd")
	return warn, nil
}

// budget fills the GUM uncertainty of the z-average. Its failures are
// warnings: the size stands without its uncertainty.
func budget(r *dls.Result, fit *cumulants.Result, st state, s *Settings) []string {
	u := s.Uncertainty
	var notes []string
	if u.ViscosityRel == 0 {
		if rel, basis, ok := uncert.ViscosityRelUncertainty(st.etaLaw); ok {
			u.ViscosityRel, u.ViscosityBasis = rel, basis
		} else {
			u.ViscosityRel = uncert.DefaultViscosityRelUncertainty
			u.ViscosityBasis = "assumed 1 % (no stated uncertainty for this viscosity; set --u-viscosity-rel)"
			notes = append(notes, "viscosity uncertainty assumed 1 %")
		}
	}
	se, dof, basis := typeA(fit)
	if fit.Correlated == nil {
		notes = append(notes, "Type A of the z-average assumes independent channel noise, understated for correlator data (give duration_s and count_rate_kcps)")
	}
	b, err := uncert.ZAverage(&uncert.Inputs{
		GammaPerS: fit.GammaPerS, GammaSEPerS: se, GammaDOF: dof, GammaBasis: basis,
		TemperatureK: dls.KelvinFromCelsius(st.tempC), Viscosity: st.etaLaw.ViscosityPaS,
		RefractiveIndex: st.optics.RefractiveIndex, AngleRad: st.optics.AngleRad, WavelengthM: st.optics.WavelengthM,
		U: u, CoverageFactor: s.CoverageFactor,
	})
	if err != nil {
		return []string{"uncertainty not computed: " + err.Error()}
	}
	warn := truncationTerm(b, fit)
	r.ZAvgUcNm, r.ZAvgExpandedNm, r.Budget = b.CombinedUNm, b.ExpandedUNm, b
	if len(notes) > 0 {
		r.Assumptions = append(r.Assumptions, notes...)
	}
	return warn
}
