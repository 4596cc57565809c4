package conc

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"

	"dlsbatch/dls"
	"dlsbatch/dls/linefit"
	"dlsbatch/dls/stats"
)

// Point is one measurement of a dilution series.
type Point struct {
	// Concentration of the sized particles, ≥ 0, in the series' unit (a
	// volume fraction, or e.g. mg/mL); k_D comes out in its reciprocal.
	Concentration float64
	// DiffusionM2PerS is the measured (collective) diffusion coefficient
	// and DiffusionSEM2PerS its standard uncertainty (> 0), m²/s.
	DiffusionM2PerS   float64
	DiffusionSEM2PerS float64
	// CountRateKcps is the mean count rate in kcounts/s at the same
	// attenuation and laser power for every point (or normalised to them);
	// HasCountRate says it is given.
	CountRateKcps float64
	HasCountRate  bool
	// PDI is the polydispersity index and PDISE its standard uncertainty
	// (0: not known); HasPDI says it is given.
	PDI    float64
	PDISE  float64
	HasPDI bool
	// Intercept is the coherence factor β of the fit and InterceptSE its
	// standard uncertainty (0: not known); HasIntercept says it is given.
	Intercept    float64
	InterceptSE  float64
	HasIntercept bool
	// TemperatureK and ViscosityPaS are the temperature and the viscosity
	// of the continuous phase at which D was measured. When every point
	// gives them (both > 0), D and u(D) are brought to the series'
	// reference state (SeriesSettings.TemperatureK, ViscosityPaS) by
	// D·(η/η_ref)·(T_ref/T) before the fit; zero in every point means the
	// points were measured at the reference state.
	TemperatureK float64
	ViscosityPaS float64
}

// Scaling says how the covariance of the series fit treats the stated
// uncertainties of D.
type Scaling int

// Covariance scalings.
const (
	// ScaleBirge multiplies the covariance by max(1, χ²/ν): scatter beyond
	// the stated uncertainties widens the result (default).
	ScaleBirge Scaling = iota
	// ScaleNone takes the stated uncertainties as exact.
	ScaleNone
)

// String returns "birge" or "none".
func (s Scaling) String() string {
	switch s {
	case ScaleBirge:
		return "birge"
	case ScaleNone:
		return "none"
	}
	return fmt.Sprintf("Scaling(%d)", int(s))
}

// SeriesSettings control FitDilutionSeries. The zero value (or nil) means:
// no unit label, no size, ScaleBirge, QC level 0.01, count-rate tolerance
// 0.2.
type SeriesSettings struct {
	// Unit names the concentration unit (e.g. "mg/mL", "volume fraction")
	// for messages and output; k_D is in its reciprocal.
	Unit string
	// TemperatureK and ViscosityPaS (of the continuous phase) are the
	// reference state of the series: points that give their own
	// temperature and viscosity are brought to it (D·η/T is what
	// Stokes–Einstein keeps constant), and D0 at it becomes the size at
	// infinite dilution. Zero leaves the size out, and then no point may
	// give its own state.
	TemperatureK float64
	ViscosityPaS float64
	Scaling      Scaling
	// Level is the two-sided significance level of the QC slope tests;
	// 0 means 0.01.
	Level float64
	// CountRateTolerance is the largest relative deviation of a count rate
	// from proportionality to c before the series is flagged; 0 means 0.2
	// (an assumption of this package, not a published limit).
	CountRateTolerance float64
}

// Residual is one point of the series fit.
type Residual struct {
	Concentration float64 `json:"concentration"`
	// DiffusionM2PerS is D at the reference state, as fitted;
	// MeasuredM2PerS is D as measured and ToReference the factor
	// (η/η_ref)·(T_ref/T) between them (1 for a point at the reference
	// state).
	DiffusionM2PerS float64 `json:"diffusion_m2_per_s"`
	MeasuredM2PerS  float64 `json:"measured_diffusion_m2_per_s"`
	ToReference     float64 `json:"to_reference"`
	FittedM2PerS    float64 `json:"fitted_m2_per_s"`
	ResidualM2PerS  float64 `json:"residual_m2_per_s"`
	// Normalized is the residual over the point's stated uncertainty.
	Normalized float64 `json:"normalized"`
}

// Proportionality is the count-rate check: I = s·c fitted through the
// origin.
type Proportionality struct {
	SlopeKcpsPerUnit float64   `json:"slope_kcps_per_unit"`
	Deviations       []float64 `json:"relative_deviations"` // (I − s·c)/(s·c) per point; 0 at c = 0
	MaxDeviation     float64   `json:"max_relative_deviation"`
	Tolerance        float64   `json:"tolerance"`
	Flagged          bool      `json:"flagged"`
}

// Trend is a test of a quantity's slope against concentration.
type Trend struct {
	Quantity string  `json:"quantity"`
	Slope    float64 `json:"slope_per_unit"`
	SlopeSE  float64 `json:"slope_se_per_unit"`
	// Test is "z" (stated uncertainties, Birge-scaled) or "t" (n − 2
	// degrees of freedom, from the scatter).
	Test      string  `json:"test"`
	Statistic float64 `json:"statistic"`
	PValue    float64 `json:"p_value"`
	// RelativeSpread is (max − min)/mean of the quantity.
	RelativeSpread float64 `json:"relative_spread"`
	Flagged        bool    `json:"flagged"`
}

// Series is the outcome of a dilution series fit D = D0 + D0·k_D·c.
type Series struct {
	Unit     string `json:"unit"`
	Points   int    `json:"points"`
	Distinct int    `json:"distinct_concentrations"`
	// ReferenceTemperatureK and ReferenceViscosityPaS are the state every
	// D was brought to (0 when the settings gave none).
	ReferenceTemperatureK float64 `json:"reference_temperature_k"`
	ReferenceViscosityPaS float64 `json:"reference_viscosity_pa_s"`

	D0M2PerS       float64 `json:"diffusion0_m2_per_s"`
	D0SEM2PerS     float64 `json:"diffusion0_se_m2_per_s"`
	SlopeM2PerS    float64 `json:"slope_m2_per_s_per_unit"` // D0·k_D
	SlopeSEM2PerS  float64 `json:"slope_se_m2_per_s_per_unit"`
	CovD0Slope     float64 `json:"cov_diffusion0_slope"` // (m²/s)²/unit
	KD             float64 `json:"k_d"`
	KDSE           float64 `json:"k_d_se"`
	Scaling        string  `json:"scaling"`
	ScaleFactor    float64 `json:"scale_factor"` // factor applied to the covariance
	ChiSquare      float64 `json:"chi_square"`
	DOF            int     `json:"dof"`
	ReducedChi2    float64 `json:"reduced_chi2"`
	ChiSquarePProb float64 `json:"chi_square_p"` // P(χ²_ν ≥ observed)
	// MaxKDC is |k_D·c| at the highest concentration.
	MaxKDC float64 `json:"max_kd_c"`

	// DiameterNm is the Stokes–Einstein size at infinite dilution and
	// DiameterSENm its standard uncertainty from the regression alone
	// (0 when no temperature and viscosity were given).
	DiameterNm   float64 `json:"diameter0_nm"`
	DiameterSENm float64 `json:"diameter0_se_nm"`

	Residuals []Residual       `json:"residuals"`
	CountRate *Proportionality `json:"count_rate,omitempty"`
	PDI       *Trend           `json:"pdi_trend,omitempty"`
	Intercept *Trend           `json:"intercept_trend,omitempty"`

	// Flagged is set when any QC check failed; Warnings say which, and
	// name other doubts (few points, short span, first-order range).
	Flagged  bool     `json:"flagged"`
	Warnings []string `json:"warnings"`
	// Notes say what was done to the data without casting doubt on the
	// result (D brought to the reference state).
	Notes []string `json:"notes"`
}

// ErrTooFewConcentrations reports a dilution series with fewer than three
// distinct concentrations. It wraps dls.ErrTooFewPoints.
var ErrTooFewConcentrations = fmt.Errorf("dilution series needs at least 3 distinct concentrations: %w", dls.ErrTooFewPoints)

// FitDilutionSeries fits D_i = D0 + D0·k_D·c_i by weighted least squares
// (w_i = 1/u(D_i)²) and runs the series' QC checks. Points may repeat a
// concentration; at least three distinct ones are needed. Errors: fewer
// than three distinct concentrations (ErrTooFewConcentrations), a negative
// or non-finite concentration, a D or u(D) that is not positive (ErrRange,
// dls.ErrNonFinite), or an intercept D0 ≤ 0.
func FitDilutionSeries(pts []Point, s *SeriesSettings) (*Series, error) {
	var set SeriesSettings
	if s != nil {
		set = *s
	}
	if set.Level == 0 {
		set.Level = 0.01
	}
	if set.CountRateTolerance == 0 {
		set.CountRateTolerance = 0.2
	}
	switch {
	case !(set.Level > 0 && set.Level < 1):
		return nil, fmt.Errorf("significance level %g is outside (0, 1)", set.Level)
	case !(set.CountRateTolerance > 0) || math.IsInf(set.CountRateTolerance, 0):
		return nil, fmt.Errorf("count-rate tolerance %g is not a positive number", set.CountRateTolerance)
	case set.Scaling != ScaleBirge && set.Scaling != ScaleNone:
		return nil, fmt.Errorf("unknown covariance scaling %d", int(set.Scaling))
	}
	unit := set.Unit
	label := func(x float64) string {
		if unit == "" {
			return fmt.Sprintf("%.4g", x)
		}
		return fmt.Sprintf("%.4g %s", x, unit)
	}
	n := len(pts)
	if n < 3 {
		return nil, fmt.Errorf("%d points: %w", n, ErrTooFewConcentrations)
	}
	hasRef := set.TemperatureK != 0 || set.ViscosityPaS != 0
	if hasRef && (!(set.TemperatureK > 0) || !(set.ViscosityPaS > 0) || math.IsInf(set.TemperatureK, 0) || math.IsInf(set.ViscosityPaS, 0)) {
		return nil, fmt.Errorf("temperature %g K and viscosity %g Pa·s must both be positive numbers for the size", set.TemperatureK, set.ViscosityPaS)
	}
	factor, err := toReference(pts, set)
	if err != nil {
		return nil, err
	}
	x := make([]float64, n)
	y := make([]float64, n)
	for i, p := range pts {
		for _, v := range []float64{p.Concentration, p.DiffusionM2PerS, p.DiffusionSEM2PerS} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, fmt.Errorf("point %d: %w", i+1, dls.ErrNonFinite)
			}
		}
		switch {
		case p.Concentration < 0:
			return nil, fmt.Errorf("point %d: concentration %g is negative: %w", i+1, p.Concentration, ErrRange)
		case !(p.DiffusionM2PerS > 0):
			return nil, fmt.Errorf("point %d: diffusion coefficient %g m²/s is not positive: %w", i+1, p.DiffusionM2PerS, ErrRange)
		case !(p.DiffusionSEM2PerS > 0):
			return nil, fmt.Errorf("point %d: standard uncertainty %g m²/s of D is not positive: %w", i+1, p.DiffusionSEM2PerS, ErrRange)
		}
		for _, v := range []float64{p.CountRateKcps, p.PDI, p.PDISE, p.Intercept, p.InterceptSE} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, fmt.Errorf("point %d: count rate, PDI or intercept: %w", i+1, dls.ErrNonFinite)
			}
		}
		if p.CountRateKcps < 0 || p.PDISE < 0 || p.InterceptSE < 0 {
			return nil, fmt.Errorf("point %d: negative count rate or standard uncertainty: %w", i+1, ErrRange)
		}
		x[i], y[i] = p.Concentration, p.DiffusionM2PerS*factor[i]
	}
	distinct := stats.CountDistinct(x, 1e-9*floats.Norm(x, math.Inf(1)), 0)
	if distinct < 3 {
		return nil, fmt.Errorf("%d distinct concentrations: %w", distinct, ErrTooFewConcentrations)
	}
	// Weights 1/u² of order 1e26 /(m²/s)² would scale the covariance sums;
	// work in units of a middle D (the upper middle for an even count) to
	// keep every sum near 1.
	ref := stats.MedianHigh(y)
	ys := make([]float64, n)
	ws := make([]float64, n)
	for i := range y {
		ys[i] = y[i] / ref
		r := ref / (pts[i].DiffusionSEM2PerS * factor[i])
		ws[i] = r * r
		if math.IsInf(ws[i], 0) || ws[i] == 0 {
			return nil, fmt.Errorf("point %d: standard uncertainty %g m²/s of D is out of proportion to D: %w", i+1, pts[i].DiffusionSEM2PerS, ErrRange)
		}
	}
	l := linefit.Fit(x, ys, ws, linefit.Options{KnownUncertainty: true, Birge: set.Scaling == ScaleBirge})
	a, b := l.A*ref, l.B*ref
	if !(a > 0) {
		return nil, fmt.Errorf("dilution series extrapolates to D0 = %.4g m²/s at c = 0, not positive: %w", a, ErrRange)
	}
	varA, varB, cov := l.VarA*ref*ref, l.VarB*ref*ref, l.Cov*ref*ref
	kd := b / a
	// k_D = b/a: ∂/∂a = −b/a², ∂/∂b = 1/a.
	ga, gb := -b/(a*a), 1/a
	varKD := ga*ga*varA + gb*gb*varB + 2*ga*gb*cov
	r := &Series{
		Unit: unit, Points: n, Distinct: distinct, ReferenceTemperatureK: set.TemperatureK, ReferenceViscosityPaS: set.ViscosityPaS,
		D0M2PerS: a, D0SEM2PerS: math.Sqrt(varA), SlopeM2PerS: b, SlopeSEM2PerS: math.Sqrt(varB),
		CovD0Slope: cov, KD: kd, KDSE: math.Sqrt(math.Max(0, varKD)),
		Scaling: set.Scaling.String(), ScaleFactor: l.Scale,
		ChiSquare: l.Chi2, DOF: l.DOF, ReducedChi2: l.Chi2 / float64(l.DOF),
		ChiSquarePProb: distuv.ChiSquared{K: float64(l.DOF)}.Survival(l.Chi2),
	}
	for i, p := range pts {
		res := y[i] - l.Fitted[i]*ref
		r.Residuals = append(r.Residuals, Residual{
			Concentration: p.Concentration, DiffusionM2PerS: y[i], MeasuredM2PerS: p.DiffusionM2PerS, ToReference: factor[i],
			FittedM2PerS: l.Fitted[i] * ref, ResidualM2PerS: res, Normalized: res / (p.DiffusionSEM2PerS * factor[i]),
		})
	}
	if lo, hi := minMax(factor); hi-lo > 1e-6 {
		tlo, thi := minMax(pointField(pts, func(p Point) float64 { return p.TemperatureK }))
		r.Notes = append(r.Notes, fmt.Sprintf("D brought to %.2f °C and %.5g mPa·s by D·(η/η_ref)·(T_ref/T) before the fit (points at %.2f–%.2f °C; factors %.5f–%.5f)",
			set.TemperatureK-dls.ZeroCelsiusK, set.ViscosityPaS*1e3, tlo-dls.ZeroCelsiusK, thi-dls.ZeroCelsiusK, lo, hi))
	}
	cmax := x[0]
	cmin := math.Inf(1)
	for _, c := range x {
		cmax = math.Max(cmax, c)
		if c > 0 {
			cmin = math.Min(cmin, c)
		}
	}
	r.MaxKDC = math.Abs(kd * cmax)
	if hasRef {
		d := dls.DiameterFromDiffusion(set.TemperatureK, set.ViscosityPaS, a)
		r.DiameterNm = d * 1e9
		r.DiameterSENm = r.DiameterNm * r.D0SEM2PerS / a
	}

	warn := func(f string, args ...any) { r.Warnings = append(r.Warnings, fmt.Sprintf(f, args...)) }
	if r.ChiSquarePProb < set.Level {
		how := "the covariance is scaled by χ²/ν"
		if set.Scaling == ScaleNone {
			how = "the covariance is not scaled (ScaleNone): the uncertainties are too small"
		}
		warn("D scatters about the line more than its stated uncertainties allow (χ²/ν = %.3g on %d degrees of freedom, p = %.2g); %s", r.ReducedChi2, l.DOF, r.ChiSquarePProb, how)
	}
	if r.MaxKDC > FirstOrderLimit {
		warn("|k_D·c| reaches %.3g at %s, beyond the first-order range (%.2g): curvature may bias D0", r.MaxKDC, label(cmax), FirstOrderLimit)
	}
	if distinct < 4 {
		warn("only %d distinct concentrations (4 or more recommended)", distinct)
	}
	if cmin < math.Inf(1) && cmax/cmin < 5 {
		warn("the concentrations span a factor %.3g (5 or more recommended): k_D is poorly determined", cmax/cmin)
	}

	if all(pts, func(p Point) bool { return p.HasCountRate }) {
		r.CountRate = countRateCheck(pts, set.CountRateTolerance)
		if r.CountRate.Flagged {
			r.Flagged = true
			warn("count rate departs from proportionality to concentration by up to %.0f %% (tolerance %.0f %%): aggregation, dissociation, multiple scattering or a changed attenuator", 100*r.CountRate.MaxDeviation, 100*r.CountRate.Tolerance)
		}
	}
	if all(pts, func(p Point) bool { return p.HasPDI }) {
		v, u := make([]float64, n), make([]float64, n)
		for i, p := range pts {
			v[i], u[i] = p.PDI, p.PDISE
		}
		r.PDI = trendCheck("pdi", x, v, u, set)
		if r.PDI.Flagged {
			r.Flagged = true
			warn("PDI drifts with concentration (slope %.3g per unit, %s = %.2f, p = %.2g): aggregation or interaction", r.PDI.Slope, r.PDI.Test, r.PDI.Statistic, r.PDI.PValue)
		}
	}
	if all(pts, func(p Point) bool { return p.HasIntercept }) {
		v, u := make([]float64, n), make([]float64, n)
		for i, p := range pts {
			v[i], u[i] = p.Intercept, p.InterceptSE
		}
		r.Intercept = trendCheck("intercept", x, v, u, set)
		if r.Intercept.Flagged {
			r.Flagged = true
			warn("coherence factor β changes with concentration (slope %.3g per unit, %s = %.2f, p = %.2g): multiple scattering or number fluctuations", r.Intercept.Slope, r.Intercept.Test, r.Intercept.Statistic, r.Intercept.PValue)
		}
	}
	if !finite(r.D0SEM2PerS, r.SlopeM2PerS, r.SlopeSEM2PerS, r.CovD0Slope, r.KD, r.KDSE, r.ChiSquare, r.ReducedChi2, r.ChiSquarePProb, r.MaxKDC, r.DiameterNm, r.DiameterSENm) {
		return nil, fmt.Errorf("dilution series is numerically degenerate (concentrations or uncertainties of extreme magnitude): %w", ErrRange)
	}
	for _, t := range []*Trend{r.PDI, r.Intercept} {
		if t != nil && !finite(t.Slope, t.SlopeSE, t.Statistic, t.PValue, t.RelativeSpread) {
			return nil, fmt.Errorf("%s trend is numerically degenerate: %w", t.Quantity, ErrRange)
		}
	}
	for _, res := range r.Residuals {
		if !finite(res.FittedM2PerS, res.ResidualM2PerS, res.Normalized) {
			return nil, fmt.Errorf("dilution series residuals are numerically degenerate: %w", ErrRange)
		}
	}
	if r.CountRate != nil && !(finite(r.CountRate.SlopeKcpsPerUnit, r.CountRate.MaxDeviation) && finite(r.CountRate.Deviations...)) {
		return nil, fmt.Errorf("count-rate check is numerically degenerate: %w", ErrRange)
	}
	return r, nil
}

// toReference returns, for each point, the factor (η/η_ref)·(T_ref/T)
// that brings its D to the reference state of s: all ones when no point
// gives its state. A point that gives a state when others do not, or when
// the series has no reference, is an error, and so is a state that is not
// a pair of positive finite numbers.
func toReference(pts []Point, s SeriesSettings) ([]float64, error) {
	f := make([]float64, len(pts))
	given := 0
	for i, p := range pts {
		f[i] = 1
		if p.TemperatureK == 0 && p.ViscosityPaS == 0 {
			continue
		}
		given++
		if !(p.TemperatureK > 0) || !(p.ViscosityPaS > 0) || math.IsInf(p.TemperatureK, 0) || math.IsInf(p.ViscosityPaS, 0) {
			return nil, fmt.Errorf("point %d: temperature %g K and viscosity %g Pa·s must both be positive numbers: %w", i+1, p.TemperatureK, p.ViscosityPaS, ErrRange)
		}
		f[i] = (p.ViscosityPaS / s.ViscosityPaS) * (s.TemperatureK / p.TemperatureK)
	}
	switch {
	case given == 0:
		return f, nil
	case given < len(pts):
		return nil, fmt.Errorf("%d of %d points give their temperature and viscosity: give them for every point or for none", given, len(pts))
	case s.TemperatureK == 0:
		return nil, fmt.Errorf("the points give their temperature and viscosity but the series has no reference state (SeriesSettings.TemperatureK, ViscosityPaS)")
	}
	return f, nil
}

func minMax(v []float64) (lo, hi float64) {
	lo, hi = v[0], v[0]
	for _, x := range v {
		lo, hi = math.Min(lo, x), math.Max(hi, x)
	}
	return lo, hi
}

func pointField(pts []Point, f func(Point) float64) []float64 {
	out := make([]float64, len(pts))
	for i, p := range pts {
		out[i] = f(p)
	}
	return out
}

// finite reports whether every value is a finite number.
func finite(v ...float64) bool {
	for _, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}

// countRateCheck fits I = s·c through the origin (unweighted) and reports
// the relative deviations.
func countRateCheck(pts []Point, tol float64) *Proportionality {
	c := make([]float64, len(pts))
	iv := make([]float64, len(pts))
	for i, p := range pts {
		c[i], iv[i] = p.Concentration, p.CountRateKcps
	}
	_, s := stat.LinearRegression(c, iv, nil, true)
	pr := &Proportionality{SlopeKcpsPerUnit: s, Tolerance: tol, Deviations: make([]float64, len(pts))}
	if !(s > 0) {
		// No count rate at all: nothing is proportional; flag it.
		pr.MaxDeviation, pr.Flagged = 1, true
		return pr
	}
	for i := range pts {
		if c[i] == 0 {
			continue
		}
		pr.Deviations[i] = (iv[i] - s*c[i]) / (s * c[i])
		pr.MaxDeviation = math.Max(pr.MaxDeviation, math.Abs(pr.Deviations[i]))
	}
	pr.Flagged = pr.MaxDeviation > tol
	return pr
}

// trendCheck tests the slope of v against x: with every u > 0 a weighted
// z-test (Birge-scaled, or as stated with ScaleNone), else an unweighted
// t-test.
func trendCheck(name string, x, v, u []float64, set SeriesSettings) *Trend {
	known := true
	for _, ui := range u {
		if !(ui > 0) || math.IsInf(ui, 0) {
			known = false
		}
	}
	var w []float64
	if known {
		w = make([]float64, len(u))
		for i, ui := range u {
			w[i] = 1 / (ui * ui)
			if math.IsInf(w[i], 0) {
				known, w = false, nil // an uncertainty too small to weigh by
				break
			}
		}
	}
	l := linefit.Fit(x, v, w, linefit.Options{KnownUncertainty: known, Birge: set.Scaling == ScaleBirge})
	st, p := linefit.SlopeTest(l)
	t := &Trend{Quantity: name, Slope: l.B, SlopeSE: math.Sqrt(l.VarB), Statistic: st, PValue: p, Test: "t"}
	if known {
		t.Test = "z"
	}
	lo, hi, mean := v[0], v[0], 0.0
	for _, vi := range v {
		lo, hi = math.Min(lo, vi), math.Max(hi, vi)
		mean += vi
	}
	mean /= float64(len(v))
	if mean != 0 {
		t.RelativeSpread = (hi - lo) / math.Abs(mean)
	}
	t.Flagged = p < set.Level
	if math.IsNaN(t.Statistic) || math.IsNaN(t.PValue) || math.IsNaN(t.SlopeSE) {
		// A perfect line (zero residual, no stated u) has no test; keep the
		// record JSON-safe.
		t.Statistic, t.PValue, t.SlopeSE = 0, 1, 0
		if l.B != 0 && !known {
			t.PValue = 0
			t.Flagged = true
		}
	}
	return t
}

func all(pts []Point, f func(Point) bool) bool {
	for _, p := range pts {
		if !f(p) {
			return false
		}
	}
	return len(pts) > 0
}
