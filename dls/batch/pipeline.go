package batch

import (
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"strings"

	"dlsbatch/contin"
	"dlsbatch/cumulants"
	"dlsbatch/dls"
	"dlsbatch/dls/medium"
	"dlsbatch/dls/qc"
	"dlsbatch/dls/uncert"
)

// Settings control the analysis of every measurement in a batch. Start
// from DefaultSettings.
type Settings struct {
	Cumulants cumulants.Settings
	// Overrides are applied over every measurement's metadata with
	// dls.OriginFlag precedence; Defaults fill keys that no other source
	// gives, with dls.OriginDefault.
	Overrides []dls.Param
	Defaults  []dls.Param
	// Extrapolate allows solvent correlations outside their valid range,
	// with a warning on every result touched.
	Extrapolate bool
	// AllowImplausible turns a metadata value outside its physically
	// plausible range (dls.PlausibleRanges) from an error into a warning
	// that names it.
	AllowImplausible bool
	// KeepCurves stores data, fit and residuals in each result.
	KeepCurves bool
	// Solvents is the table solvent names are looked up in; nil means the
	// built-in table (medium.Lookup).
	Solvents *medium.Table
	// Distribution controls the regularised inversion into size
	// distributions.
	Distribution DistributionSettings
	// QC holds the thresholds of the quality-control flags.
	QC qc.Thresholds
	// Uncertainty holds the Type B standard uncertainties of the GUM
	// budget (a zero viscosity uncertainty means: from the correlation);
	// CoverageFactor is k of the expanded uncertainty.
	Uncertainty    uncert.Uncertainties
	CoverageFactor float64

	// skipFiniteGuard leaves out the last guard against non-finite
	// numbers, so that tests can check what the stages themselves produce.
	skipFiniteGuard bool
}

// DefaultSettings returns the documented defaults: cumulants.DefaultSettings,
// no overrides, solvent water by default (reported as an assumption), no
// extrapolation, implausible values refused, curves kept,
// DefaultDistributionSettings.
func DefaultSettings() Settings {
	return Settings{
		Cumulants:      cumulants.DefaultSettings(),
		Defaults:       []dls.Param{{Key: dls.KeySolvent, Value: "water", Origin: dls.OriginDefault, Where: "built-in default"}},
		KeepCurves:     true,
		Distribution:   DefaultDistributionSettings(),
		QC:             qc.DefaultThresholds(),
		Uncertainty:    defaultUncertainties(),
		CoverageFactor: uncert.DefaultCoverageFactor,
	}
}

// Analyze runs the per-measurement pipeline: metadata precedence, the
// plausibility of every numeric value, medium properties, cumulant fit and
// Stokes–Einstein. It never returns nil and never panics on bad data:
// failures give StatusError with a message that names file and line, and a
// result with StatusError carries no size (its cumulant, distribution,
// correction and uncertainty parts are zero, HasCumulants and
// HasDistribution false).
func Analyze(m *dls.Measurement, s *Settings) *dls.Result {
	meta := m.Meta.Clone()
	for _, p := range s.Overrides {
		meta.Set(p)
	}
	for _, p := range s.Defaults {
		if _, ok := meta.Get(p.Key); !ok {
			meta.Set(p)
		}
	}
	if _, ok := meta.Get(dls.KeySample); !ok {
		stem := strings.TrimSuffix(filepath.Base(m.File), filepath.Ext(m.File))
		meta.Set(dls.Param{Key: dls.KeySample, Value: stem, Origin: dls.OriginDefault, Where: "file name"})
	}
	r := &dls.Result{
		Identity: dls.Identity{
			File:    m.File,
			Run:     m.Run,
			Sample:  meta.String(dls.KeySample),
			Lot:     meta.String(dls.KeyLot),
			Product: meta.String(dls.KeyProduct),
			Role:    dls.Role(strings.ToLower(meta.String(dls.KeyRole))),
			Group:   meta.String(dls.KeyGroup),
			// The data as read, before any normalisation.
			DataSHA256: dls.DataDigest(m.TauS, m.Corr),
		},
		Cumulants: dls.Cumulants{CorrelationColumn: m.CorrColumn, CorrelationKind: m.Kind.String()},
		Params:    meta.Params(),
	}
	if r.Role == "" {
		r.Role = dls.RoleSample
	}
	warn := append([]string(nil), m.Warnings...)
	if p, ok := meta.Get(dls.KeySolvent); ok && p.Origin == dls.OriginDefault {
		warn = append(warn, fmt.Sprintf("solvent not given: %s assumed (%s)", p.Value, p.Where))
	}
	// A sheet's or flag's condition that differs from the file's own is
	// said: it may be meant (the file is wrong) or a slip (--set for
	// --default, a sheet row matching one file too many).
	for _, p := range meta.Params() {
		if p.Replaces != "" {
			warn = append(warn, fmt.Sprintf("%s %s from %s, where the file states %s", p.Key, p.Value, p.Where, p.Replaces))
		}
	}
	fail := func(err error) *dls.Result {
		var pe *dls.PosError
		if !errors.As(err, &pe) {
			err = &dls.PosError{File: m.File, Line: m.HeaderLine, Err: err}
		}
		clearSizes(r)
		r.Status = dls.StatusError
		r.Message = err.Error()
		r.Warnings = warn
		r.Flags = qc.Measurement(r, m.TauS, s.QC)
		return r
	}

	pw, err := plausibility(m, meta, s)
	if err != nil {
		return fail(err)
	}
	warn = append(warn, pw...)
	cond, cw, err := conditions(m, meta, s)
	if err != nil {
		return fail(err)
	}
	warn = append(warn, cw...)
	r.HasConditions = true
	r.TemperatureC = cond.tempC
	r.Solvent = cond.solvent
	r.ViscosityMPaS = cond.etaPaS * 1e3
	r.RefractiveIndex = cond.optics.RefractiveIndex
	r.WavelengthNm = cond.optics.WavelengthM * 1e9
	r.AngleDeg = cond.optics.AngleRad * 180 / math.Pi
	r.QPerM = cond.optics.Q()
	r.ViscositySource, r.IndexSource = cond.etaSource, cond.nSource
	if v, ok, err := meta.Float(dls.KeyCountRateKcps); err != nil {
		return fail(err)
	} else if ok {
		r.CountRateKcps, r.HasCountRate = v, true
	}
	if v, ok, err := meta.Float(dls.KeyDurationS); err != nil {
		return fail(err)
	} else if ok {
		r.DurationS, r.HasDuration = v, true
	}

	nm, note, err := normaliseG2(m)
	if err != nil {
		return fail(err)
	}
	if note != "" {
		m = nm
		warn = append(warn, note)
	}
	// The notes from here on are about the fit and the sizes (see message).
	fitNotes := len(warn)
	fit, err := fitCumulants(m, &s.Cumulants, acquisition(r))
	if err != nil {
		return fail(err)
	}
	tK := dls.KelvinFromCelsius(cond.tempC)
	q := r.QPerM
	r.HasCumulants = true
	r.Method = fit.Method.String()
	r.Order = fit.Order
	r.GammaMeanPerS = fit.GammaPerS
	r.GammaSEPerS, r.PDISE = fitErrors(fit)
	r.Mu2PerS2 = fit.Mu2PerS2
	r.Mu3PerS3 = fit.Mu3PerS3
	r.DiffusionM2PerS = dls.DiffusionFromRate(fit.GammaPerS, q)
	r.ZAvgNm = dls.DiameterFromDiffusion(tK, cond.etaPaS, r.DiffusionM2PerS) * 1e9
	// d ∝ 1/Γ̄, so its relative standard error is that of Γ̄.
	r.ZAvgSENm = r.ZAvgNm * r.GammaSEPerS / fit.GammaPerS
	r.PDI = fit.PDI
	r.Intercept = fit.Intercept
	r.Baseline = fit.Baseline
	r.FarBaseline = fit.FarBaseline
	r.BaselineReached = fit.BaselineReached
	r.FitRMS = fit.ResidualRMS
	r.ReducedChi2 = fit.ReducedChi2
	r.SigmaEstimated = fit.SigmaEstimated
	r.FitPoints = fit.PointsUsed
	r.FitFirstTauS = m.TauS[fit.FitFirst]
	r.FitLastTauS = m.TauS[fit.FitLast]
	r.RangeShiftPct = 100 * fit.RangeShift
	r.Iterations = fit.Iterations
	if fit.Linear.GammaPerS > 0 {
		r.LinearZAvgNm = dls.DiameterFromDiffusion(tK, cond.etaPaS, dls.DiffusionFromRate(fit.Linear.GammaPerS, q)) * 1e9
		r.LinearPDI = fit.Linear.PDI
	}
	for _, w := range fit.Warnings {
		warn = append(warn, w.Error())
	}
	r.Correction, r.Medium = "none", cond.medium
	r.Assumptions = append(r.Assumptions, cond.assumptions...)
	if cond.medium != nil {
		r.Correction = "medium"
	}
	kdt, kw, err := applyKD(r, meta)
	if err != nil {
		return fail(err)
	}
	warn = append(warn, kw...)
	warn = append(warn, budget(r, fit, cond, kdt, meta, s)...)
	if s.Distribution.Enabled {
		warn = append(warn, distribution(m, fit, cond, meta, &s.Distribution, r)...)
	}
	// Last guard: no output may carry NaN or Inf. A non-finite cumulant
	// result fails the measurement; a non-finite distribution is dropped.
	if cOK, dOK := r.Finite(); s.skipFiniteGuard {
		// tests only: keep what the stages produced
	} else if !cOK {
		*r = dls.Result{Identity: r.Identity, Params: r.Params,
			Cumulants: dls.Cumulants{CorrelationColumn: r.CorrelationColumn, CorrelationKind: r.CorrelationKind}}
		return fail(fmt.Errorf("numerical failure: the cumulant fit gave a non-finite value"))
	} else if !dOK {
		dropDistribution(r)
		warn = append(warn, "size distribution dropped: the inversion gave a non-finite value")
	}
	if s.KeepCurves {
		r.Curves = &dls.Curves{TauS: m.TauS, Data: m.Corr, Fitted: fit.Fitted, Residuals: fit.Residuals, Kind: m.Kind.String()}
	} else if r.Distribution != nil {
		d := r.Distribution
		d.G1, d.G1Sigma, d.G1Fitted, d.G1Residuals = nil, nil, nil, nil
	}
	r.Warnings = warn
	r.Flags = qc.Measurement(r, m.TauS, s.QC)
	r.Status = dls.StatusOK
	if msg := message(r, warn, fitNotes); msg != "" {
		r.Status = dls.StatusWarn
		r.Message = msg
	}
	return r
}

// message joins a measurement's notes and its flags, in that order. A
// blank's size is the dispersant's signal (its BLANK flag says so), so
// the notes on its fit and sizes, warn[fitNotes:], are only counted in
// its message (they stay whole in Warnings): what concerns a blank is
// how it was read, its conditions and its flags.
func message(r *dls.Result, warn []string, fitNotes int) string {
	msg, dropped := append([]string(nil), warn...), 0
	if r.Role == dls.RoleBlank && fitNotes < len(warn) {
		msg, dropped = msg[:fitNotes], len(warn)-fitNotes
	}
	for _, f := range r.Flags {
		msg = append(msg, string(f.Code)+": "+f.Message)
	}
	switch {
	case dropped == 1:
		msg = append(msg, "1 note on the fit of the dispersant's signal (listed in the result's warnings)")
	case dropped > 1:
		msg = append(msg, fmt.Sprintf("%d notes on the fit of the dispersant's signal (listed in the result's warnings)", dropped))
	}
	return strings.Join(msg, "; ")
}

// state is the resolved physical state of one measurement.
type state struct {
	tempC     float64
	solvent   string
	etaPaS    float64
	etaSource string
	nSource   string
	optics    dls.Optics
	// etaLaw is η(T) of the continuous phase, for the uncertainty budget's
	// ∂d/∂T: the solvent's correlation (times the medium factor), or a
	// constant for a user-supplied viscosity; solventLaw is the same
	// before the medium factor (its uncertainty is the solvent's).
	etaLaw     medium.ViscosityLaw
	solventLaw medium.ViscosityLaw
	// indexLaw is the solvent table's index law, nil for a given index.
	indexLaw         medium.IndexLaw
	etaGiven, nGiven bool
	medium           *dls.MediumNote
	// mediumU holds what the budget needs of a medium correction.
	mediumU *mediumTerms
	// assumptions are decisions on the metadata that the result records
	// without a warning.
	assumptions []string
}

// conditions resolves temperature, optics and medium from the metadata.
func conditions(m *dls.Measurement, meta dls.Metadata, s *Settings) (state, []string, error) {
	var st state
	var warn []string
	// Every missing condition is named in one message, with its fixes.
	var missing []string
	need := func(key, hint string) (float64, error) {
		v, ok, err := meta.Float(key)
		if err == nil && !ok {
			missing = append(missing, key+"="+hint)
		}
		return v, err
	}
	var err error
	var lamNm, angle float64
	if st.tempC, err = need(dls.KeyTemperatureC, "25"); err != nil {
		return st, nil, err
	}
	if lamNm, err = need(dls.KeyWavelengthNm, "633"); err != nil {
		return st, nil, err
	}
	if angle, err = need(dls.KeyAngleDeg, "173"); err != nil {
		return st, nil, err
	}
	if len(missing) > 0 {
		return st, nil, missingError(missing)
	}
	if st.tempC <= -273.15 {
		return st, nil, fmt.Errorf("%w: temperature %g °C is below absolute zero", dls.ErrBadMetadata, st.tempC)
	}
	st.optics = dls.Optics{WavelengthM: lamNm * 1e-9, AngleRad: angle * math.Pi / 180}
	tK := dls.KelvinFromCelsius(st.tempC)

	st.solvent = meta.String(dls.KeySolvent)
	eta, etaGiven, err := meta.Float(dls.KeyViscosityMPaS)
	if err != nil {
		return st, nil, err
	}
	n, nGiven, err := meta.Float(dls.KeyRefractiveIndex)
	if err != nil {
		return st, nil, err
	}
	if !etaGiven || !nGiven {
		var sol *medium.Solvent
		if s.Solvents != nil {
			sol, err = s.Solvents.Lookup(st.solvent)
		} else {
			sol, err = medium.Lookup(st.solvent)
		}
		if err != nil {
			return st, nil, solventError(m, meta, err)
		}
		// A user-given viscosity or index needs no correlation, so the
		// correlation's range does not apply to it: replace the law of a
		// given value with that value before asking the table.
		use := *sol
		if etaGiven {
			use.Viscosity = medium.ConstantViscosity{PaS: eta * 1e-3, TMinK: 0, TMaxK: math.Inf(1), Ref: "user-supplied"}
		}
		if nGiven {
			use.Index = givenIndex(n)
		}
		props, perr := use.Props(tK, st.optics.WavelengthM, s.Extrapolate)
		if perr != nil {
			return st, nil, tableError(meta, etaGiven, nGiven, perr)
		}
		if !etaGiven {
			eta, st.etaSource = props.ViscosityPaS*1e3, props.ViscositySource
			st.etaLaw = sol.Viscosity
		}
		if !nGiven {
			n, st.nSource = props.RefractiveIndex, props.IndexSource
			st.indexLaw = sol.Index
		}
		warn = append(warn, props.Warnings...)
	}
	if etaGiven {
		p, _ := meta.Get(dls.KeyViscosityMPaS)
		st.etaSource = "user-supplied (" + string(p.Origin) + ": " + p.Where + ")"
	}
	if nGiven {
		p, _ := meta.Get(dls.KeyRefractiveIndex)
		st.nSource = "user-supplied (" + string(p.Origin) + ": " + p.Where + ")"
	}
	if !(eta > 0) {
		return st, nil, fmt.Errorf("%w: viscosity %g mPa·s must be positive", dls.ErrBadMetadata, eta)
	}
	st.etaPaS = eta * 1e-3
	if st.etaLaw == nil {
		st.etaLaw = medium.ConstantViscosity{PaS: st.etaPaS, TMinK: 0, TMaxK: math.Inf(1), Ref: "user-supplied"}
	}
	st.solventLaw, st.etaGiven, st.nGiven = st.etaLaw, etaGiven, nGiven
	// A given viscosity is the solvent's: a medium fraction or reading
	// corrects it too (applyMedium says so).
	mw, err := applyMedium(&st, meta)
	if err != nil {
		return st, nil, err
	}
	warn = append(warn, mw...)
	st.optics.RefractiveIndex = n
	if err := st.optics.Validate(); err != nil {
		return st, nil, fmt.Errorf("%w: %v", dls.ErrBadMetadata, err)
	}
	return st, warn, nil
}

// missingError names every missing condition (each as key=example) and
// the three ways to give them.
func missingError(missing []string) error {
	keys := make([]string, len(missing))
	lines := make([]string, len(missing))
	flags := make([]string, len(missing))
	for i, m := range missing {
		k, v, _ := strings.Cut(m, "=")
		keys[i], lines[i], flags[i] = k, "'# "+k+": "+v+"'", "--default "+m
	}
	return fmt.Errorf("%w: no %s for this measurement; give each as a line %s in the file, a sample-sheet column of that name, or %s",
		dls.ErrMissingValue, strings.Join(keys, ", "), strings.Join(lines, ", "), strings.Join(flags, " "))
}

// solventError places an unknown solvent at the line (or sheet cell, or
// flag) that names it and says how to go without the table.
func solventError(m *dls.Measurement, meta dls.Metadata, err error) error {
	if !errors.Is(err, dls.ErrUnknownSolvent) {
		return err
	}
	p, _ := meta.Get(dls.KeySolvent)
	err = fmt.Errorf("%w (%s %s); or give viscosity_mpas and refractive_index of the medium at the measurement's temperature and wavelength, which need no solvent table",
		err, p.Origin, p.Where)
	return paramError(m, p, err)
}

// tableError says which value the solvent table was asked for when its
// correlation does not cover the state: a value given by the user is
// never at fault, and giving the other one too is a way out.
func tableError(meta dls.Metadata, etaGiven, nGiven bool, err error) error {
	sol, _ := meta.Get(dls.KeySolvent)
	from := fmt.Sprintf("from the %s table entry (solvent %s %s)", sol.Value, sol.Origin, sol.Where)
	switch {
	case etaGiven:
		p, _ := meta.Get(dls.KeyViscosityMPaS)
		return fmt.Errorf("the refractive index is not given and comes %s; the viscosity_mpas given (%s %s) is not at fault; give refractive_index too: %w",
			from, p.Origin, p.Where, err)
	case nGiven:
		p, _ := meta.Get(dls.KeyRefractiveIndex)
		return fmt.Errorf("the viscosity is not given and comes %s; the refractive_index given (%s %s) is not at fault; give viscosity_mpas too: %w",
			from, p.Origin, p.Where, err)
	}
	return err
}

// givenIndex is a user-supplied refractive index, valid at any state.
type givenIndex float64

func (g givenIndex) RefractiveIndex(float64, float64) float64 { return float64(g) }
func (givenIndex) RangeK() (float64, float64)                 { return 0, math.Inf(1) }
func (givenIndex) RangeLambdaM() (float64, float64)           { return 0, math.Inf(1) }
func (givenIndex) Source(float64) string                      { return "user-supplied" }

// clearSizes removes from a failed result everything that a size rests
// on: the cumulant fit (keeping the correlation column, the count rate and
// the duration, which are inputs), the distribution, the corrections, the
// uncertainty and the curves. The conditions stay: they were resolved.
func clearSizes(r *dls.Result) {
	c := r.Cumulants
	r.Cumulants = dls.Cumulants{CorrelationColumn: c.CorrelationColumn, CorrelationKind: c.CorrelationKind,
		CountRateKcps: c.CountRateKcps, HasCountRate: c.HasCountRate, DurationS: c.DurationS, HasDuration: c.HasDuration}
	r.DistSummary = dls.DistSummary{}
	r.Corrections = dls.Corrections{}
	r.Uncertainty = dls.Uncertainty{}
	r.Assumptions = nil
	r.Curves = nil
}

// dropDistribution removes every distribution result from r.
func dropDistribution(r *dls.Result) {
	r.HasDistribution = false
	r.Intensity, r.Volume, r.Number, r.Distribution = nil, nil, nil, nil
	r.Alpha, r.Lambda, r.DegreesOfFreedom, r.ProbReject, r.DistMeanRatePerS, r.DistZAvgNm, r.DistFitRMS = 0, 0, 0, 0, 0, 0, 0
	r.AlphaCriterion, r.ParticleRI = "", ""
}

// defaultUncertainties are uncert's defaults with the viscosity's left to
// the correlation used.
func defaultUncertainties() uncert.Uncertainties {
	u := uncert.DefaultUncertainties()
	u.ViscosityRel, u.ViscosityBasis = 0, ""
	return u
}

// Validate reports the first setting outside its allowed range: the
// cumulant settings, negative or non-finite Type B uncertainties, a
// coverage factor that is not positive, a fixed regularisation strength
// that is not positive, a probability-to-reject target outside (0, 1), or
// a decay-rate grid outside 20–400 points (0 means the default).
func (s *Settings) Validate() error {
	if err := s.Cumulants.Validate(); err != nil {
		return err
	}
	u := s.Uncertainty
	for _, v := range []float64{u.TemperatureK, u.ViscosityRel, u.RefractiveIndex, u.AngleRad} {
		if !(v >= 0) || math.IsInf(v, 0) {
			return fmt.Errorf("uncertainties must not be negative")
		}
	}
	if !(s.CoverageFactor > 0) {
		return fmt.Errorf("coverage factor %g: want a positive value", s.CoverageFactor)
	}
	d := s.Distribution
	if d.Contin.Criterion == contin.Fixed && !(d.Contin.Lambda > 0) {
		return fmt.Errorf("the fixed regularisation criterion needs a positive strength λ")
	}
	if t := d.Contin.TargetProbReject; !(t > 0 && t < 1) {
		return fmt.Errorf("probability-to-reject target %g: want a value between 0 and 1", t)
	}
	if d.PeakNoise < PeakNoiseAuto || d.PeakNoise > PeakNoiseResiduals {
		return fmt.Errorf("peak uncertainty choice %d: not one of %v", int(d.PeakNoise), PeakNoiseChoices())
	}
	if t := d.JointTargetProbReject; !(t >= 0 && t < 1) { // 0: the runs' target
		return fmt.Errorf("joint probability-to-reject target %g: want a value between 0 and 1", t)
	}
	if n := d.Grid.NGamma; n != 0 && (n < 20 || n > 400) { // 0: contin.DefaultNGamma
		return fmt.Errorf("decay-rate grid of %d points: want 20 to 400", n)
	}
	return nil
}
