package batch

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"

	"dlsbatch/contin"
	"dlsbatch/cumulants"
	"dlsbatch/dls"
	"dlsbatch/dls/mie"
	"dlsbatch/dls/sizedist"
)

// DistributionSettings control the size-distribution step.
type DistributionSettings struct {
	// Enabled runs the inversion; without it results carry cumulants only.
	Enabled bool
	Contin  contin.Settings
	Grid    contin.GridSettings
	Peaks   contin.PeakSettings
	// JointTargetProbReject is the probability-to-reject target of a
	// sample's joint analysis (JointDistributions) when the criterion is
	// ProbReject; 0 takes Contin.TargetProbReject, as the runs have it.
	// The default, DefaultJointTargetProbReject, is weaker than the runs':
	// DEVELOPERS.md "Joint inversion of a sample's runs" has the
	// measurements that set it.
	JointTargetProbReject float64
	// PeakNoise chooses the noise covariance of the peaks' uncertainties:
	// PeakNoiseAuto (the zero value) decides by the correlation of the
	// inversion's residuals from lag to lag (minCorrelatorRho), which a
	// few per cent of correlator runs fall below; a site that knows its
	// instrument's noise can fix the choice.
	PeakNoise PeakNoiseChoice
	// DefaultParticleRI is used, and named in the result's assumptions,
	// when a measurement gives no particle_ri: 1.59+0i, the common-practice
	// value for polystyrene latex at visible wavelengths.
	DefaultParticleRI complex128
	Polarization      mie.Polarization
	// Cache shares kernels between measurements with the same lag grid; it
	// is safe for concurrent use. nil builds a grid per measurement.
	Cache *contin.Cache
	// MieCache shares the Mie intensities of the size grid between
	// measurements with the same rate grid, temperature, medium and optics
	// (safe for concurrent use); nil computes them per measurement.
	MieCache *sizedist.WeightCache
}

// PeakNoiseChoice says where a run's peak uncertainties take their noise
// covariance from.
type PeakNoiseChoice int

const (
	// PeakNoiseAuto takes the correlator model when the inversion's
	// standardised residuals are correlated from lag to lag (lag-one
	// autocorrelation at least minCorrelatorRho), else the residuals.
	PeakNoiseAuto PeakNoiseChoice = iota
	// PeakNoiseCorrelator takes the correlator model wherever it can be
	// built (a σ column, or the duration and count rate, or a reached
	// baseline), for data known to come from a correlator.
	PeakNoiseCorrelator
	// PeakNoiseResiduals takes the residuals' Bartlett estimate always,
	// for data whose noise is known to be independent from lag to lag.
	PeakNoiseResiduals
)

var peakNoiseNames = [...]string{"auto", "correlator-model", "residuals"}

// String returns the choice's name as flags and the settings record
// spell it.
func (c PeakNoiseChoice) String() string {
	if c < 0 || int(c) >= len(peakNoiseNames) {
		return fmt.Sprintf("PeakNoiseChoice(%d)", int(c))
	}
	return peakNoiseNames[c]
}

// PeakNoiseChoices lists the choices' names, the default first.
func PeakNoiseChoices() []string { return slices.Clone(peakNoiseNames[:]) }

// ParsePeakNoise reads a choice by its name; "" is PeakNoiseAuto (a
// settings record written before the choice existed).
func ParsePeakNoise(s string) (PeakNoiseChoice, error) {
	if s == "" {
		return PeakNoiseAuto, nil
	}
	for i, n := range peakNoiseNames {
		if s == n {
			return PeakNoiseChoice(i), nil
		}
	}
	return 0, fmt.Errorf("peak uncertainty %q: want one of %s", s, strings.Join(peakNoiseNames[:], ", "))
}

// DefaultJointTargetProbReject is the probability-to-reject target of a
// sample's joint analysis by default. On photon-level samples of three
// 30 s runs it resolves a diameter ratio of 3 in about three quarters of
// the samples (47 of 60 at 50/50 and at 20/80 over three sets) where the
// runs' 0.5 resolves half, and it showed a second peak on 6 of 200
// monodisperse samples (DEVELOPERS.md "Joint inversion of a sample's
// runs"). A single run keeps 0.5: at 0.02 one run invents
// second peaks more often than the peak rule is meant to allow.
const DefaultJointTargetProbReject = 0.02

// DefaultDistributionSettings returns the documented defaults: the
// inversion on, contin.DefaultSettings (probability to reject 0.5, free
// baseline column), the joint analyses' target
// DefaultJointTargetProbReject, the default grid and peak rule, particle
// index 1.59+0i, vertical polarisation, a fresh kernel cache and Mie
// cache.
func DefaultDistributionSettings() DistributionSettings {
	return DistributionSettings{
		Enabled:               true,
		Contin:                *contin.DefaultSettings(),
		JointTargetProbReject: DefaultJointTargetProbReject,
		DefaultParticleRI:     complex(1.59, 0),
		Polarization:          mie.Vertical,
		Cache:                 &contin.Cache{},
		MieCache:              &sizedist.WeightCache{},
	}
}

// fieldCorrelation turns the correlogram into g1 with its uncertainty,
// using the coherence factor β of the cumulant fit and the baseline B: the
// far-channel mean when the correlation has reached it (measured, and free
// of the cumulant model, which a broad or multimodal sample biases), else
// the cumulant fit's. For g2 and g2m1 data u = (y − B)/β estimates g1², and
//
//	g1 = sign(u)·√|u|,   σ_g1 = σ_u / (2·√max(|ũ|, σ_u)),   σ_u = σ/β
//
// where ũ is u itself, or, when model (a g1 over the same lags) is given,
// the model's g1·|g1|, so that the weights do not follow the noise of the
// data. The signed root keeps noise about a zero baseline symmetric about
// zero, so values at or below the baseline are neither clipped nor
// rectified into a spurious slow component; the propagated σ gives those
// channels little weight, and the floor at |ũ| = σ_u keeps it finite where
// u crosses zero. For g1 data g1 = (y − B)/β and σ_g1 = σ/β.
func fieldCorrelation(m *dls.Measurement, fit *cumulants.Result, first int, sigmaY, model []float64) (g1, sigma []float64) {
	n := len(m.TauS) - first
	g1 = make([]float64, n)
	sigma = make([]float64, n)
	beta, base := inversionBaseline(fit)
	for i := 0; i < n; i++ {
		k := first + i
		u := (m.Corr[k] - base) / beta
		su := sigmaY[k] / beta
		if m.Kind == dls.KindG1 {
			g1[i], sigma[i] = u, su
			continue
		}
		g1[i] = math.Copysign(math.Sqrt(math.Abs(u)), u)
		uw := u
		if model != nil {
			uw = model[i] * math.Abs(model[i])
		}
		sigma[i] = su / (2 * math.Sqrt(math.Max(math.Abs(uw), su)))
	}
	return g1, sigma
}

// inversionBaseline returns the coherence factor and baseline that map the
// correlogram to g1 (see fieldCorrelation).
func inversionBaseline(fit *cumulants.Result) (beta, base float64) {
	if fit.BaselineReached {
		return fit.Intercept, fit.FarBaseline
	}
	return fit.Intercept, fit.Baseline
}

// correlogramResiduals maps the inversion's fitted g1 (over lags first..)
// back to the correlogram's units and returns data − model at every lag
// (0 before first).
func correlogramResiduals(m *dls.Measurement, fit *cumulants.Result, first int, g1Fit []float64) []float64 {
	beta, base := inversionBaseline(fit)
	r := make([]float64, len(m.Corr))
	for i, f := range g1Fit {
		k := first + i
		u := f
		if m.Kind != dls.KindG1 {
			u = f * math.Abs(f)
		}
		r[k] = m.Corr[k] - (base + beta*u)
	}
	return r
}

// particleIndex resolves particle_ri: a complex index ("1.59+0.0i"), a
// material of the Mie table ("polystyrene", evaluated at the wavelength),
// or the default, which is then named as an assumption.
func particleIndex(meta dls.Metadata, lambdaM float64, def complex128) (complex128, string, string, error) {
	p, ok := meta.Get(dls.KeyParticleRI)
	if !ok || strings.TrimSpace(p.Value) == "" {
		s := mie.FormatComplexIndex(def)
		return def, s, "particle refractive index not given: " + s + " assumed (volume and number weightings depend on it)", nil
	}
	text := strings.TrimSpace(p.Value)
	_, serr := dls.ParseComplexNumber(text)
	switch letter := text[0] >= 'A' && text[0] <= 'Z' || text[0] >= 'a' && text[0] <= 'z'; {
	case serr == nil:
		// The syntax is dls's; mie checks the physics (n > 0, k ≥ 0).
		m, err := mie.ParseComplexIndex(text)
		if err != nil {
			return 0, "", "", fmt.Errorf("%s: particle_ri: %w", p.Where, err)
		}
		return m, mie.FormatComplexIndex(m), "", nil
	case !letter: // not a material name either
		return 0, "", "", fmt.Errorf("%s: particle_ri: %w: %w", p.Where, serr, dls.ErrBadMetadata)
	}
	m, src, err := mie.MaterialIndex(text, lambdaM)
	if err != nil {
		return 0, "", "", fmt.Errorf("%s: particle_ri %q is neither a complex index (e.g. 1.59+0.0i) nor a known material: %w", p.Where, p.Value, err)
	}
	return m, mie.FormatComplexIndex(m) + " (" + p.Value + ": " + src + ")", "", nil
}

// distribution runs the inversion and fills the distribution fields of r.
// Its failures do not fail the measurement: the cumulant result stands and
// the reason becomes a warning.
func distribution(m *dls.Measurement, fit *cumulants.Result, st state, meta dls.Metadata, s *DistributionSettings, r *dls.Result) (warn []string) {
	fail := func(err error) []string {
		return append(warn, "size distribution not computed: "+err.Error())
	}
	if !(fit.Intercept > 0) {
		return fail(errors.New("the cumulant fit gives no positive intercept"))
	}
	mPart, riText, assumed, err := particleIndex(meta, st.optics.WavelengthM, s.DefaultParticleRI)
	if err != nil {
		return fail(err)
	}
	first := fit.FitFirst
	tau := m.TauS[first:]
	tK := dls.KelvinFromCelsius(st.tempC)
	gs := sizeBoundedGrid(s.Grid, tau, tK, st.etaPaS, st.optics.Q())
	grid, err := s.grid(tau, &gs)
	if err != nil {
		return fail(err)
	}
	g1, sg := fieldCorrelation(m, fit, first, fit.Sigma, nil)
	cs := s.Contin
	// With the baseline reached, the measured far-channel baseline is
	// subtracted exactly and a free constant column would only trade
	// against the slowest component; it stays for data whose baseline the
	// lag window did not reach.
	cs.Baseline = cs.Baseline && !fit.BaselineReached
	cs.Start = cumulantStart(grid.GammaPerS(), fit)
	inv, err := contin.Invert(grid, g1, sg, &cs)
	if err != nil {
		return fail(err)
	}
	// Second pass. The first weighted each channel with the propagated σ
	// of its own data value, so that channels whose noise happened to
	// raise g1 got more weight: in the slow tail this biases slow
	// populations to larger sizes (measured: +5.6 % mean, +11 % at most,
	// for a 300 nm population beside a 30 nm one). The second pass takes
	// the weights from the first pass's model instead, which removes that
	// correlation (then +2.8 %, at most +7.8 %). When σ was estimated from
	// the cumulant fit's residuals, which hold that model's misfit on broad
	// or multimodal samples, σ is estimated again from the inversion's own
	// residuals as well.
	sigma := fit.Sigma
	if fit.SigmaEstimated {
		sigma = cumulants.LocalSigma(correlogramResiduals(m, fit, first, inv.Fitted), first, len(m.TauS)-1, 1e-6*fit.Intercept)
	}
	g1, sg = fieldCorrelation(m, fit, first, sigma, inv.Fitted)
	// The first pass's least-regularised solution starts the second's
	// (the same solution to rounding; far fewer active-set iterations).
	if inv2, err := contin.InvertFrom(grid, g1, sg, &cs, inv); err == nil {
		inv = inv2
	}
	d, err := sizedist.New(sizedist.Input{
		GammaPerS: inv.GammaPerS, Amplitude: inv.Amplitude, TempK: tK, ViscosityPaS: st.etaPaS,
		Optics: st.optics, ParticleIndex: mPart, Polarization: s.Polarization, Cache: s.MieCache,
	})
	if err != nil {
		return fail(err)
	}
	for _, w := range grid.Warnings() {
		warn = append(warn, "size distribution: "+w.Error())
	}
	for _, w := range inv.Warnings {
		warn = append(warn, "size distribution: "+w.Error())
	}
	warn = append(warn, d.Warnings...)
	if assumed != "" {
		r.Assumptions = append(r.Assumptions, assumed)
	}

	r.HasDistribution = true
	r.ParticleRI = riText
	r.AlphaCriterion = inv.Criterion.String()
	r.Alpha, r.Lambda = inv.Alpha, inv.Lambda
	r.DegreesOfFreedom = inv.DegreesOfFreedom
	r.ProbReject = inv.ProbReject
	// The mean rate over the peaks leaves out the scattered amplitude that
	// noise at the first lags leaves near the fast end of the grid, which
	// would otherwise add about x·Γ_max to the mean.
	rp := contin.Peaks(inv.GammaPerS, inv.Amplitude, &s.Peaks)
	r.DistMeanRatePerS = contin.PeaksMeanPerS(rp)
	res := correlogramResiduals(m, fit, first, inv.Fitted)
	var ss float64
	for k := fit.FitFirst; k <= fit.FitLast; k++ {
		ss += res[k] * res[k]
	}
	r.DistFitRMS = math.Sqrt(ss / float64(fit.FitLast-fit.FitFirst+1))
	if r.DistMeanRatePerS > 0 {
		r.DistZAvgNm = dls.DiameterFromDiffusion(tK, st.etaPaS, dls.DiffusionFromRate(r.DistMeanRatePerS, st.optics.Q())) * 1e9
	}
	sens, _ := contin.NewSensitivity(grid, inv, sg, &cs) // nil: peaks without uncertainties
	if sens != nil {
		r.PeakNoise = dls.PeakNoiseResiduals
		switch choice := s.PeakNoise; {
		case choice == PeakNoiseResiduals:
			r.PeakNoise = dls.PeakNoiseResidualsSet
		case choice == PeakNoiseAuto && sens.ResidualCorrelation() < minCorrelatorRho:
			r.PeakNoise = dls.PeakNoiseIndependent
		default:
			if noise, basis := correlatorNoise(m, fit, first, sigma, sg, acquisition(r)); noise != nil {
				sens.Noise = noise
				r.PeakNoise = dls.PeakNoiseModel + " (" + basis + ")"
			}
		}
	}
	r.Intensity, r.Volume, r.Number = summariseWeightings(d, inv.Amplitude, sens, &s.Peaks)
	sd := &dls.SizeDistribution{
		DiameterNm: d.DiameterNm, Intensity: d.Intensity, Volume: d.Volume, Number: d.Number, MieMasked: d.Masked,
		G1: padFront(g1, first), G1Sigma: padFront(sg, first), G1Fitted: padFront(inv.Fitted, first), G1Residuals: padFront(inv.Residuals, first),
	}
	for i, row := range inv.Scan {
		sd.Scan = append(sd.Scan, dls.AlphaRow{Lambda: row.Lambda, Alpha: row.Alpha, ChiSquare: row.ChiSquare,
			DegreesOfFreedom: row.DegreesOfFreedom, NormLx: row.NormLx, ProbReject: row.ProbReject, GCV: row.GCV, Chosen: i == inv.Chosen})
	}
	r.Distribution = sd
	return warn
}

// minCorrelatorRho is the lag-one autocorrelation of the inversion's
// standardised residuals from which its peaks take their uncertainties
// from the correlator model (correlatorNoise) rather than from the
// residuals. A correlator's channels share most of their noise; data
// whose noise is independent from lag to lag (simulations, or a
// correlogram averaged and smoothed differently) would have the model
// overstate the noise of every smooth functional and drop real peaks.
// Measured (standardised residuals of the second pass): independent
// Gaussian noise, 160 runs, median 0.00, 95th percentile 0.11, largest
// 0.23; photon-level runs of eight conditions (730 runs), medians
// 0.26–0.45, 2–28 % of them below 0.2 (these keep the residual-based
// uncertainty and its threshold).
const minCorrelatorRho = 0.2

// correlatorNoise returns the quadratic form g ↦ g'·C·g of the noise
// covariance of the inversion's data (g1 at the lags first…, with σ sg)
// under the correlator model of the cumulant fit (cumulants.ChannelNoise:
// one rate Γ̄; D the σ given with the data, or the model's variances for
// the stated duration and count rate, or those scaled to the far
// channels), and the basis of D; nil where the model does not apply (g1
// data, the linear method, too few far channels). g1 is linear in the
// data to first order, δg1_i = δy_i·σ_g1,i/σ_y,i (sigmaY the σ of the data
// that sg was propagated from).
//
// On photon-level runs the residual-based uncertainty of a peak's mean
// diameter understated its scatter 5 to 8 times (rms z 5.4 and 8.1 for
// 150 runs of 100 nm at 173° and 40 of 200 nm at 90°); with this one
// the rms z was 1.19 and 1.10 (DEVELOPERS.md, "Peaks you can believe").
func correlatorNoise(m *dls.Measurement, fit *cumulants.Result, first int, sigmaY, sg []float64, acq cumulants.Acquisition) (func([]float64) float64, string) {
	kind := cumulants.G2
	switch m.Kind {
	case dls.KindG2m1:
		kind = cumulants.G2Minus1
	case dls.KindG1:
		return nil, ""
	}
	cn, err := fit.ChannelNoise(m.TauS, kind, acq, first)
	if err != nil {
		return nil, ""
	}
	jac := make([]float64, len(sg))
	for i, s := range sg {
		if sy := sigmaY[first+i]; sy > 0 && !math.IsInf(s, 0) {
			jac[i] = s / sy
		}
	}
	w := make([]float64, len(sg))
	return func(g []float64) float64 {
		for i, x := range g {
			w[i] = x * jac[i]
		}
		return cn.Quad(w)
	}, cn.Basis
}

// cumulantStart returns amplitudes for the inversion's first solve to
// start from: a log-normal bump in ln Γ at the cumulant mean rate Γ̄ with
// the width its PDI gives, σ_ln = √ln(1 + PDI) (PDI taken within
// [0.01, 1]), cut at ±2σ_ln. The rates it covers form the first passive
// set, which saves the iterations that would add them one by one from
// x = 0; the solution does not depend on it (contin.Settings.Start). nil
// when the fit gives no positive rate.
func cumulantStart(gammaPerS []float64, fit *cumulants.Result) []float64 {
	g := fit.GammaPerS
	if !(g > 0) || math.IsInf(g, 1) {
		return nil
	}
	pdi := fit.PDI
	if !(pdi >= 0.01) {
		pdi = 0.01
	}
	sl := math.Sqrt(math.Log(1 + math.Min(pdi, 1)))
	x := make([]float64, len(gammaPerS))
	for j, gj := range gammaPerS {
		if u := math.Log(gj/g) / sl; math.Abs(u) < 2 {
			x[j] = math.Exp(-u * u / 2)
		}
	}
	return x
}

// Sizes the rate grid is allowed to reach (common practice): particles
// above about 20 µm sediment and fluctuate in number rather than diffuse
// through the scattering volume, and below 0.5 nm are single molecules of
// the solvent's size.
const (
	maxGridDiameterM = 20e-6
	minGridDiameterM = 0.5e-9
)

// sizeBoundedGrid narrows the rate grid that the lag window supports
// (contin's default, [0.2/τ_max, 1/τ_min]) to the rates of diameters in
// [minGridDiameterM, maxGridDiameterM], unless the settings fix the bounds.
func sizeBoundedGrid(gs contin.GridSettings, tau []float64, tK, etaPaS, q float64) contin.GridSettings {
	rate := func(dM float64) float64 { return dls.DiffusionFromDiameter(tK, etaPaS, dM) * q * q }
	if gs.GammaMinPerS == 0 {
		gs.GammaMinPerS = math.Max(contin.DefaultGammaMinTimesTauMax/tau[len(tau)-1], rate(maxGridDiameterM))
	}
	if gs.GammaMaxPerS == 0 {
		gs.GammaMaxPerS = math.Min(contin.DefaultGammaMaxTimesTauMin/tau[0], rate(minGridDiameterM))
	}
	return gs
}

// grid returns the inversion grid of the lags, from the cache when there
// is one.
func (s *DistributionSettings) grid(tau []float64, gs *contin.GridSettings) (*contin.Grid, error) {
	if s.Cache != nil {
		return s.Cache.Grid(tau, gs)
	}
	return contin.NewGrid(tau, gs)
}

// padFront aligns an array over lags first.. with the full lag axis; the
// channels before first (dropped by the minimum lag) are 0.
func padFront(v []float64, first int) []float64 {
	if first == 0 {
		return v
	}
	return append(make([]float64, first), v...)
}
