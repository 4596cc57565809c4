package batch

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"dlsbatch/cumulants"
	"dlsbatch/dls"
	"dlsbatch/dls/conc"
	"dlsbatch/dls/medium"
	"dlsbatch/dls/uncert"
)

// Standard uncertainties assumed where the user states none.
const (
	// viscometerRelU is u(η_r)/η_r of a viscometer reading given without
	// its uncertainty: 1 % (common practice for a calibrated capillary or
	// rotational viscometer).
	viscometerRelU = 0.01
)

// hardSphereKDU is u(k_D) of the hard-sphere value: the two published
// two-body results, 1.45 (Batchelor 1976) and 1.56 (Felderhof 1978),
// differ by 0.11, taken as the half-width of a rectangular distribution
// about the value used (GUM 4.3.7): 0.11/√3.
var hardSphereKDU = (conc.FelderhofKD - conc.HardSphereKD) / math.Sqrt(3)

// mediumTerms is what the uncertainty budget needs of a medium
// correction: either a measured relative viscosity with its uncertainty,
// or a volume fraction with its uncertainty, the slope dη_r/dφ and the
// model uncertainty of the relation used.
type mediumTerms struct {
	measured bool
	etaR     float64
	uEtaR    float64 // measured: u(η_r), stated or assumed
	etaRNote string  // measured: where u(η_r) comes from
	stated   bool    // the uncertainty (u(η_r) or u(φ)) was given
	phi      float64
	uPhi     float64
	phiNote  string
	slope    float64
	model    string
	uModel   float64
}

// where names a metadata value for messages: "key = value (origin where)".
func where(meta dls.Metadata, key string) string {
	p, _ := meta.Get(key)
	return fmt.Sprintf("%s = %s (%s %s)", key, strings.TrimSpace(p.Value), p.Origin, p.Where)
}

// applyMedium corrects the viscosity of the continuous phase for a known
// content of a much smaller colloid, micelle or excipient. Decisions, each
// recorded in the result:
//
//   - a measured relative viscosity (medium_relative_viscosity, a
//     viscometer reading) takes precedence over medium_volume_fraction;
//     when both are given, the volume fraction the reading implies is only
//     checked against the stated one (an assumption naming both keys when
//     they agree, a warning when they do not);
//   - otherwise η_r follows from medium_volume_fraction (dls/conc: Batchelor
//     up to φ = 0.10, Krieger–Dougherty beyond);
//   - a given viscosity_mpas is taken as the solvent's and multiplied by
//     η_r like a correlation's value, with a warning that says so (a
//     viscosity measured on the medium itself must come without a medium
//     key).
//
// This is the medium's viscosity only: the sized particles' own
// concentration never enters it (see applyKD).
func applyMedium(st *state, meta dls.Metadata) ([]string, error) {
	phi, hasPhi, err := meta.Float(dls.KeyMediumVolumeFraction)
	if err != nil {
		return nil, err
	}
	etaR, hasR, err := meta.Float(dls.KeyMediumRelViscosity)
	if err != nil {
		return nil, err
	}
	uPhi, hasUPhi, err := meta.Float(dls.KeyUMediumVolumeFraction)
	if err != nil {
		return nil, err
	}
	uR, hasUR, err := meta.Float(dls.KeyUMediumRelViscosity)
	if err != nil {
		return nil, err
	}
	var warn []string
	if hasUR && !hasR {
		warn = append(warn, fmt.Sprintf("%s given without %s: ignored", where(meta, dls.KeyUMediumRelViscosity), dls.KeyMediumRelViscosity))
	}
	if hasUPhi && (!hasPhi || hasR) {
		why := "without " + dls.KeyMediumVolumeFraction
		if hasR {
			why = "while " + dls.KeyMediumRelViscosity + " sets the medium's viscosity"
		}
		warn = append(warn, fmt.Sprintf("%s given %s: ignored", where(meta, dls.KeyUMediumVolumeFraction), why))
	}
	if !hasPhi && !hasR {
		return warn, nil
	}
	note := &dls.MediumNote{SolventMPaS: st.etaPaS * 1e3}
	terms := &mediumTerms{}
	var med *conc.Medium
	switch {
	case hasR:
		if !(etaR >= 1) {
			return nil, fmt.Errorf("%w: %s %g: a medium cannot be less viscous than its solvent", dls.ErrBadMetadata, dls.KeyMediumRelViscosity, etaR)
		}
		med = &conc.Medium{RelativeViscosity: etaR, Model: "measured", SolventViscosityPaS: st.etaPaS, MediumViscosityPaS: st.etaPaS * etaR}
		note.Model, note.RelativeViscosity = "measured relative viscosity", etaR
		terms.measured, terms.etaR = true, etaR
		terms.uEtaR, terms.etaRNote, terms.stated = viscometerRelU*etaR, "assumed 1 % of the reading (common practice for a viscometer; state it as "+dls.KeyUMediumRelViscosity+")", false
		if hasUR {
			terms.uEtaR, terms.etaRNote, terms.stated = uR, "stated: "+where(meta, dls.KeyUMediumRelViscosity), true
		}
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
			u := terms.uEtaR
			if !(u > 0) {
				u = viscometerRelU * etaR
			}
			chk, err := conc.CheckMedium(phi, etaR, u, nil)
			if err != nil {
				return nil, fmt.Errorf("%s: %w", dls.KeyMediumVolumeFraction, err)
			}
			note.Check = chk.Message
			decision := fmt.Sprintf("medium: %s is used and %s only checked against it (a measured viscosity takes precedence over a volume fraction): %s",
				where(meta, dls.KeyMediumRelViscosity), where(meta, dls.KeyMediumVolumeFraction), chk.Message)
			if !chk.Consistent {
				warn = append(warn, decision)
			} else {
				st.assumptions = append(st.assumptions, decision)
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
		terms.etaR, terms.phi, terms.model = med.RelativeViscosity, phi, med.Model
		if terms.slope, err = conc.RelativeViscositySlope(phi, nil); err != nil {
			return nil, fmt.Errorf("%s: %w", dls.KeyMediumVolumeFraction, err)
		}
		if terms.uModel, err = conc.ModelUncertainty(phi, nil); err != nil {
			return nil, fmt.Errorf("%s: %w", dls.KeyMediumVolumeFraction, err)
		}
		terms.phiNote = "not stated (" + dls.KeyUMediumVolumeFraction + "): taken as exact"
		if hasUPhi {
			terms.uPhi, terms.phiNote, terms.stated = uPhi, "stated: "+where(meta, dls.KeyUMediumVolumeFraction), true
		}
	}
	if st.etaGiven {
		by := where(meta, dls.KeyMediumVolumeFraction)
		if hasR {
			by = where(meta, dls.KeyMediumRelViscosity)
		}
		warn = append(warn, fmt.Sprintf("medium: %s is taken as the solvent's viscosity and multiplied by the relative viscosity %.5g (%s, from %s), giving %.5g mPa·s; "+
			"if the given viscosity was measured on the medium itself, drop the medium keys", where(meta, dls.KeyViscosityMPaS), med.RelativeViscosity, note.Model, by, med.MediumViscosityPaS*1e3))
	}
	st.etaPaS = med.MediumViscosityPaS
	st.etaSource += fmt.Sprintf("; × %.5g for the medium (%s)", med.RelativeViscosity, note.Model)
	st.etaLaw = conc.MediumLaw(st.etaLaw, med)
	st.medium, st.mediumU = note, terms
	return warn, nil
}

// kdTerms is what the uncertainty budget needs of a k_D correction.
type kdTerms struct {
	kd, uKD, phi, uPhi float64
	kdNote, phiNote    string
	kdStated, phiGiven bool
}

// applyKD corrects the collective diffusion coefficient of concentrated
// particles to infinite dilution, D0 = D_c/(1 + k_D·φ), when the metadata
// state k_D (a number, or "hard-sphere" for Batchelor's 1.45) and the
// particles' volume fraction (volume_fraction, or concentration_mg_ml with
// particle_density_g_cm3). The measured z-average stays as it is; the size
// at infinite dilution is reported beside it, and the budget of that size
// adds u(k_D) (u_kd; for hard-sphere the Batchelor–Felderhof spread) and
// u(φ) (u_volume_fraction).
func applyKD(r *dls.Result, meta dls.Metadata) (*kdTerms, []string, error) {
	p, ok := meta.Get(dls.KeyKD)
	var warn []string
	for _, k := range []string{dls.KeyUKD, dls.KeyUVolumeFraction} {
		if _, has, _ := meta.Float(k); has && (!ok || strings.TrimSpace(p.Value) == "") {
			warn = append(warn, fmt.Sprintf("%s given without %s: ignored (only the k_D correction uses it)", where(meta, k), dls.KeyKD))
		}
	}
	if !ok || strings.TrimSpace(p.Value) == "" {
		return nil, warn, nil
	}
	t := &kdTerms{}
	switch v := strings.TrimSpace(p.Value); strings.ToLower(v) {
	case "hard-sphere", "hard-spheres", "hs":
		t.kd = conc.HardSphereKD
		t.uKD, t.kdNote = hardSphereKDU, "hard spheres: Batchelor 1976 (1.45) and Felderhof 1978 (1.56) differ by 0.11, a rectangular half-width (GUM 4.3.7)"
		t.kdStated = true
		warn = append(warn, fmt.Sprintf("k_D = %g assumed: hard spheres (Batchelor 1976), not measured for this sample", t.kd))
	default:
		x, err := dls.ParseNumber(v)
		if err != nil {
			return nil, nil, fmt.Errorf("%s: %s: want a number or hard-sphere: %w: %w", p.Where, dls.KeyKD, err, dls.ErrBadMetadata)
		}
		t.kd, t.kdNote = x, "not stated ("+dls.KeyUKD+"): taken as exact"
	}
	if u, has, err := meta.Float(dls.KeyUKD); err != nil {
		return nil, nil, err
	} else if has {
		t.uKD, t.kdNote, t.kdStated = u, "stated: "+where(meta, dls.KeyUKD), true
	}
	f, err := conc.FractionFromMetadata(meta)
	if errors.Is(err, conc.ErrNoFraction) {
		return nil, nil, fmt.Errorf("%s: %s given but no volume_fraction (or concentration_mg_ml with particle_density_g_cm3): %w", p.Where, dls.KeyKD, dls.ErrMissingValue)
	}
	if err != nil {
		return nil, nil, err
	}
	t.phi, t.phiNote = f.Value, "not stated ("+dls.KeyUVolumeFraction+"): taken as exact"
	if u, has, err := meta.Float(dls.KeyUVolumeFraction); err != nil {
		return nil, nil, err
	} else if has {
		t.uPhi, t.phiNote, t.phiGiven = u, "stated: "+where(meta, dls.KeyUVolumeFraction), true
	}
	d, err := conc.ToInfiniteDilution(r.DiffusionM2PerS, t.kd, f.Value)
	if err != nil {
		return nil, nil, err
	}
	warn = append(warn, f.Warnings...)
	warn = append(warn, d.Warnings...)
	r.KD, r.KDPhi = t.kd, f.Value
	r.ZAvgD0Nm = r.ZAvgNm * d.Factor
	r.Correction = appendCorrection(r.Correction, "kd")
	return t, warn, nil
}

// budget fills the GUM uncertainty of the z-average, and of the size at
// infinite dilution when a k_D correction applies. Its failures are
// warnings: the size stands without its uncertainty.
//
// Uncertainties of the medium's properties, in order of precedence: the
// value's own stated uncertainty (u_viscosity_mpas, u_refractive_index,
// for a given viscosity_mpas or refractive_index); the settings
// (--u-viscosity-rel, --u-refractive-index); the correlation's stated
// uncertainty (IAPWS water, DIPPR-101 fits; for the index the larger of
// the settings' and the correlation's). A given value without a stated
// uncertainty is listed in the budget's unstated_uncertainties, with what
// was assumed in its component's basis.
func budget(r *dls.Result, fit *cumulants.Result, st state, kdt *kdTerms, meta dls.Metadata, s *Settings) []string {
	u := s.Uncertainty
	var notes, warn, unstated []string
	nBasis := ""
	uEta, hasUEta, err := meta.Float(dls.KeyUViscosityMPaS)
	if err != nil {
		return []string{"uncertainty not computed: " + err.Error()}
	}
	uN, hasUN, err := meta.Float(dls.KeyURefractiveIndex)
	if err != nil {
		return []string{"uncertainty not computed: " + err.Error()}
	}
	if hasUEta && !st.etaGiven {
		warn = append(warn, fmt.Sprintf("%s given without %s: ignored; the correlation's uncertainty is used", where(meta, dls.KeyUViscosityMPaS), dls.KeyViscosityMPaS))
	}
	switch {
	case st.etaGiven && hasUEta:
		base := st.solventLaw.ViscosityPaS(dls.KelvinFromCelsius(st.tempC)) * 1e3
		u.ViscosityRel, u.ViscosityBasis = uEta/base, "stated with the viscosity: "+where(meta, dls.KeyUViscosityMPaS)
	case u.ViscosityRel == 0:
		if rel, basis, ok := uncert.ViscosityRelUncertainty(st.solventLaw); ok && !st.etaGiven {
			u.ViscosityRel, u.ViscosityBasis = rel, basis
		} else {
			u.ViscosityRel = uncert.DefaultViscosityRelUncertainty
			u.ViscosityBasis = "assumed 1 % (no stated uncertainty for this viscosity; set --u-viscosity-rel)"
			notes = append(notes, "viscosity uncertainty assumed 1 %")
			if st.etaGiven {
				u.ViscosityBasis = "assumed 1 %: " + dls.KeyViscosityMPaS + " given without " + dls.KeyUViscosityMPaS
				unstated = append(unstated, "viscosity")
			}
		}
	}
	switch {
	case st.nGiven && hasUN:
		u.RefractiveIndex, nBasis = uN, "stated with the index: "+where(meta, dls.KeyURefractiveIndex)
	case st.nGiven && u.RefractiveIndex == uncert.DefaultIndexUncertainty:
		nBasis = fmt.Sprintf("default %.2g assumed: %s given without %s", u.RefractiveIndex, dls.KeyRefractiveIndex, dls.KeyURefractiveIndex)
		unstated = append(unstated, "refractive_index")
	case st.nGiven: // the settings state u(n) for every measurement
	default:
		if hasUN {
			warn = append(warn, fmt.Sprintf("%s given without %s: ignored; the correlation's uncertainty is used", where(meta, dls.KeyURefractiveIndex), dls.KeyRefractiveIndex))
		}
		if law, ok := st.indexLaw.(medium.IndexUncertainty); ok {
			if un, basis := law.IndexUncertainty(dls.KelvinFromCelsius(st.tempC), st.optics.WavelengthM); un > u.RefractiveIndex {
				u.RefractiveIndex, nBasis = un, basis
			}
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
		return append(warn, "uncertainty not computed: "+err.Error())
	}
	if nBasis != "" {
		uncert.SetBasis(b, "refractive_index", nBasis)
	}
	if m := st.mediumU; m != nil {
		comps, un := mediumComponents(m, b.ZAvgNm)
		unstated = append(unstated, un...)
		if b, err = uncert.Extend(b, comps...); err != nil {
			return append(warn, "uncertainty not computed: "+err.Error())
		}
	}
	b.Unstated = append(b.Unstated, unstated...)
	warn = append(warn, truncationTerm(b, fit)...)
	r.ZAvgUcNm, r.ZAvgExpandedNm, r.Budget = b.CombinedUNm, b.ExpandedUNm, b
	if kdt != nil && r.ZAvgD0Nm > 0 {
		d0, err := d0Budget(b, kdt, r.ZAvgD0Nm/r.ZAvgNm)
		if err != nil {
			warn = append(warn, "uncertainty of the size at infinite dilution not computed: "+err.Error())
		} else {
			r.ZAvgD0Budget = d0
		}
	}
	if len(notes) > 0 {
		r.Assumptions = append(r.Assumptions, notes...)
	}
	return warn
}

// mediumComponents are the budget terms of a medium correction, with the
// names of the inputs given without an uncertainty. d = z-average in nm;
// d ∝ 1/η_r, so ∂d/∂η_r = −d/η_r and ∂d/∂φ = −d·(dη_r/dφ)/η_r.
func mediumComponents(m *mediumTerms, dNm float64) ([]uncert.Component, []string) {
	if m.measured {
		var un []string
		if !m.stated {
			un = append(un, "medium_relative_viscosity")
		}
		return []uncert.Component{{Name: "medium_relative_viscosity", Symbol: "η_r", Type: "B", Value: m.etaR, StandardUncertainty: m.uEtaR, Unit: "1",
			Sensitivity: -dNm / m.etaR, Basis: m.etaRNote}}, un
	}
	var un []string
	if !m.stated {
		un = append(un, "medium_volume_fraction")
	}
	return []uncert.Component{
		{Name: "medium_volume_fraction", Symbol: "φ_m", Type: "B", Value: m.phi, StandardUncertainty: m.uPhi, Unit: "1",
			Sensitivity: -dNm * m.slope / m.etaR, Basis: m.phiNote + "; sensitivity through dη_r/dφ of " + m.model},
		{Name: "medium_viscosity_model", Symbol: "η_r", Type: "B", Value: m.etaR, StandardUncertainty: m.uModel, Unit: "1",
			Sensitivity: -dNm / m.etaR, Basis: fmt.Sprintf("%s at φ = %.4g against the other of Batchelor 1977 and Krieger–Dougherty 1959: largest difference as a rectangular half-width (dls/conc ModelUncertainty)", m.model, m.phi)},
	}, un
}

// d0Budget is the budget of d0 = d·f, f = 1 + k_D·φ: the z-average's
// components times f, and the terms of k_D (∂d0/∂k_D = d·φ) and φ
// (∂d0/∂φ = d·k_D).
func d0Budget(b *uncert.Budget, t *kdTerms, f float64) (*uncert.Budget, error) {
	d := b.ZAvgNm
	out := uncert.Scaled(b, f)
	for i, n := range out.Notes {
		if strings.Contains(n, "concentration of the sized particles") {
			out.Notes[i] = "size at infinite dilution d0 = d·(1 + k_D·φ), first order in φ; the terms above are those of d, times (1 + k_D·φ)"
		}
	}
	if !t.kdStated {
		out.Unstated = append(out.Unstated, "kd")
	}
	if !t.phiGiven {
		out.Unstated = append(out.Unstated, "volume_fraction")
	}
	return uncert.Extend(out,
		uncert.Component{Name: "kd", Symbol: "k_D", Type: "B", Value: t.kd, StandardUncertainty: t.uKD, Unit: "1", Sensitivity: d * t.phi, Basis: t.kdNote},
		uncert.Component{Name: "volume_fraction", Symbol: "φ", Type: "B", Value: t.phi, StandardUncertainty: t.uPhi, Unit: "1", Sensitivity: d * t.kd, Basis: t.phiNote},
	)
}
