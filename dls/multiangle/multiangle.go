package multiangle

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/stat/distuv"

	"dlsbatch/dls"
	"dlsbatch/dls/linefit"
	"dlsbatch/dls/stats"
)

// Angle is the cumulant result of one measurement of the sample at one
// angle.
type Angle struct {
	AngleRad float64 // scattering angle, rad (reported; q is what enters the fit)
	QPerM    float64 // scattering vector q = 4π·n·sin(θ/2)/λ0, 1/m
	// GammaPerS is the mean decay rate Γ̄ and GammaSEPerS its standard
	// error (> 0), 1/s, e.g. cumulants.Result.GammaPerS and GammaSEPerS.
	GammaPerS   float64
	GammaSEPerS float64
}

// NewAngle returns the Angle of a measurement made with optics o.
func NewAngle(o dls.Optics, gammaPerS, gammaSEPerS float64) Angle {
	return Angle{AngleRad: o.AngleRad, QPerM: o.Q(), GammaPerS: gammaPerS, GammaSEPerS: gammaSEPerS}
}

// Settings control Analyze. The zero value (or nil) means the documented
// limits of 3 for both tests.
type Settings struct {
	// InterceptLimit is the |a|/u(a) above which the intercept of Γ̄
	// against q² is flagged; 0 means 3.
	InterceptLimit float64
	// TrendLimit is the |m|/u(m) above which the slope of the apparent size
	// against q² is flagged; 0 means 3.
	TrendLimit float64
}

// DefaultLimit is the default of both test limits: a 3-standard-
// uncertainty rule.
const DefaultLimit = 3

// AngleResult is one angle in the output.
type AngleResult struct {
	AngleDeg    float64 `json:"angle_deg"`
	QPerM       float64 `json:"q_per_m"`
	Q2PerM2     float64 `json:"q2_per_m2"`
	GammaPerS   float64 `json:"gamma_mean_per_s"`
	GammaSEPerS float64 `json:"gamma_se_per_s"`
	// FittedGammaPerS is a + D·q² and Normalized the residual over
	// u(Γ̄).
	FittedGammaPerS float64 `json:"fitted_gamma_per_s"`
	Normalized      float64 `json:"normalized_residual"`
	// Apparent diffusion coefficient Γ̄/q² and size, with standard
	// uncertainties from u(Γ̄).
	DAppM2PerS   float64 `json:"d_app_m2_per_s"`
	DAppSEM2PerS float64 `json:"d_app_se_m2_per_s"`
	SizeNm       float64 `json:"d_app_nm"`
	SizeSENm     float64 `json:"d_app_se_nm"`
}

// Result is the multi-angle analysis of one sample.
type Result struct {
	Angles   int `json:"angles"`
	Distinct int `json:"distinct_angles"`

	// Γ̄ = a + D·q².
	DiffusionM2PerS   float64 `json:"diffusion_m2_per_s"`
	DiffusionSEM2PerS float64 `json:"diffusion_se_m2_per_s"`
	InterceptPerS     float64 `json:"intercept_per_s"`
	InterceptSEPerS   float64 `json:"intercept_se_per_s"`
	// InterceptZ is a/u(a); InterceptP its two-sided normal p-value.
	InterceptZ       float64 `json:"intercept_z"`
	InterceptP       float64 `json:"intercept_p"`
	InterceptLimit   float64 `json:"intercept_limit"`
	InterceptFlagged bool    `json:"intercept_flagged"`
	ChiSquare        float64 `json:"chi_square"`
	DOF              int     `json:"dof"`
	ReducedChi2      float64 `json:"reduced_chi2"`
	// ScaleFactor is max(1, χ²/ν), applied to the covariance.
	ScaleFactor float64 `json:"scale_factor"`

	// Size from D by Stokes–Einstein and its regression uncertainty.
	DiameterNm   float64 `json:"diameter_nm"`
	DiameterSENm float64 `json:"diameter_se_nm"`

	// Trend of the apparent size: d_app = d_0 + m·q², m in nm·µm² (nm per
	// µm⁻²), TrendZ = m/u(m), TrendPct the change m·(q²_max − q²_min)/d_0
	// across the measured range in percent.
	TrendSlopeNmUm2   float64 `json:"trend_slope_nm_um2"`
	TrendSlopeSENmUm2 float64 `json:"trend_slope_se_nm_um2"`
	TrendZ            float64 `json:"trend_z"`
	TrendP            float64 `json:"trend_p"`
	TrendPct          float64 `json:"trend_pct"`
	TrendLimit        float64 `json:"trend_limit"`
	TrendFlagged      bool    `json:"trend_flagged"`

	// Homogeneity of the apparent sizes: χ² about their weighted mean on
	// n − 1 degrees of freedom and its p-value; flagged when p is below
	// the two-sided normal tail of TrendLimit (0.27 % for 3).
	SpreadMeanNm  float64 `json:"spread_mean_nm"`
	SpreadChi2    float64 `json:"spread_chi_square"`
	SpreadDOF     int     `json:"spread_dof"`
	SpreadP       float64 `json:"spread_p"`
	SpreadFlagged bool    `json:"spread_flagged"`

	// D_app extrapolated linearly in q² to q → 0, and its size.
	ZeroQDiffusionM2PerS   float64 `json:"zero_q_diffusion_m2_per_s"`
	ZeroQDiffusionSEM2PerS float64 `json:"zero_q_diffusion_se_m2_per_s"`
	ZeroQDiameterNm        float64 `json:"zero_q_diameter_nm"`
	ZeroQDiameterSENm      float64 `json:"zero_q_diameter_se_nm"`

	PerAngle []AngleResult `json:"per_angle"`
	// Warnings say what was flagged, and why in words.
	Warnings []string `json:"warnings"`
}

// ErrTooFewAngles reports fewer than three distinct angles. It wraps
// dls.ErrTooFewPoints.
var ErrTooFewAngles = fmt.Errorf("multi-angle analysis needs at least 3 distinct angles: %w", dls.ErrTooFewPoints)

// um2 converts q² from 1/m² to 1/µm² inside the fits, which keeps every
// sum near 1.
const um2 = 1e-12

// Analyze fits Γ̄ = a + D·q² over the angles, tests the intercept and the
// trend of the apparent size with q², and turns D into a size with the
// temperature tK (K) and the viscosity etaPaS (Pa·s) of the continuous
// phase. Errors: fewer than three distinct angles (ErrTooFewAngles); a q,
// Γ̄ or u(Γ̄) that is not a positive finite number, or a temperature or
// viscosity that is not (dls.ErrOutOfRange, dls.ErrNonFinite); a slope D
// that is not positive.
func Analyze(angles []Angle, tK, etaPaS float64, s *Settings) (*Result, error) {
	var set Settings
	if s != nil {
		set = *s
	}
	if set.InterceptLimit == 0 {
		set.InterceptLimit = DefaultLimit
	}
	if set.TrendLimit == 0 {
		set.TrendLimit = DefaultLimit
	}
	if !(set.InterceptLimit > 0) || !(set.TrendLimit > 0) {
		return nil, fmt.Errorf("test limits %g and %g must be positive", set.InterceptLimit, set.TrendLimit)
	}
	if !(tK > 0) || math.IsInf(tK, 0) || !(etaPaS > 0) || math.IsInf(etaPaS, 0) {
		return nil, fmt.Errorf("temperature %g K and viscosity %g Pa·s must be positive numbers: %w", tK, etaPaS, dls.ErrOutOfRange)
	}
	n := len(angles)
	if n < 3 {
		return nil, fmt.Errorf("%d angles: %w", n, ErrTooFewAngles)
	}
	x := make([]float64, n) // q² in 1/µm²
	y := make([]float64, n)
	w := make([]float64, n)
	for i, a := range angles {
		for _, v := range []float64{a.QPerM, a.GammaPerS, a.GammaSEPerS} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, fmt.Errorf("angle %d: %w", i+1, dls.ErrNonFinite)
			}
		}
		switch {
		case !(a.QPerM > 0):
			return nil, fmt.Errorf("angle %d: scattering vector %g 1/m is not positive: %w", i+1, a.QPerM, dls.ErrOutOfRange)
		case !(a.GammaPerS > 0):
			return nil, fmt.Errorf("angle %d: decay rate %g 1/s is not positive: %w", i+1, a.GammaPerS, dls.ErrOutOfRange)
		case !(a.GammaSEPerS > 0):
			return nil, fmt.Errorf("angle %d: standard error %g 1/s of the decay rate is not positive: %w", i+1, a.GammaSEPerS, dls.ErrOutOfRange)
		}
		x[i] = a.QPerM * a.QPerM * um2
		y[i] = a.GammaPerS
		w[i] = 1 / (a.GammaSEPerS * a.GammaSEPerS)
	}
	distinct := stats.CountDistinct(x, 0, 1e-6)
	if distinct < 3 {
		return nil, fmt.Errorf("%d distinct angles: %w", distinct, ErrTooFewAngles)
	}

	// Γ̄ against q².
	l := linefit.Fit(x, y, w, linefit.Options{KnownUncertainty: true, Birge: true})
	d := l.B * um2 // m²/s
	if !(d > 0) {
		return nil, fmt.Errorf("decay rate does not grow with q² (slope %.4g m²/s): not a diffusive sample, or angles mislabelled", d)
	}
	r := &Result{
		Angles: n, Distinct: distinct,
		DiffusionM2PerS: d, DiffusionSEM2PerS: math.Sqrt(l.VarB) * um2,
		InterceptPerS: l.A, InterceptSEPerS: math.Sqrt(l.VarA),
		InterceptLimit: set.InterceptLimit, TrendLimit: set.TrendLimit,
		ChiSquare: l.Chi2, DOF: l.DOF, ReducedChi2: l.Chi2 / float64(l.DOF), ScaleFactor: l.Scale,
	}
	r.InterceptZ = r.InterceptPerS / r.InterceptSEPerS
	r.InterceptP = 2 * distuv.UnitNormal.Survival(math.Abs(r.InterceptZ))
	r.InterceptFlagged = math.Abs(r.InterceptZ) > set.InterceptLimit
	r.DiameterNm = dls.DiameterFromDiffusion(tK, etaPaS, d) * 1e9
	r.DiameterSENm = r.DiameterNm * r.DiffusionSEM2PerS / d

	// Per angle, and the apparent size and D against q².
	sizes := make([]float64, n)
	wSize := make([]float64, n)
	dapp := make([]float64, n)
	wD := make([]float64, n)
	for i, a := range angles {
		q2 := a.QPerM * a.QPerM
		da := a.GammaPerS / q2
		rel := a.GammaSEPerS / a.GammaPerS
		size := dls.DiameterFromDiffusion(tK, etaPaS, da) * 1e9
		r.PerAngle = append(r.PerAngle, AngleResult{
			AngleDeg: a.AngleRad * 180 / math.Pi, QPerM: a.QPerM, Q2PerM2: q2,
			GammaPerS: a.GammaPerS, GammaSEPerS: a.GammaSEPerS,
			FittedGammaPerS: l.Fitted[i], Normalized: l.Residuals[i] / a.GammaSEPerS,
			DAppM2PerS: da, DAppSEM2PerS: da * rel, SizeNm: size, SizeSENm: size * rel,
		})
		sizes[i], wSize[i] = size, 1/((size*rel)*(size*rel))
		// D_app in µm²/s keeps the weights near 1.
		dapp[i] = da * 1e12
		wD[i] = 1 / ((dapp[i] * rel) * (dapp[i] * rel))
	}
	lt := linefit.Fit(x, sizes, wSize, linefit.Options{KnownUncertainty: true})
	r.TrendSlopeNmUm2 = lt.B
	r.TrendSlopeSENmUm2 = math.Sqrt(lt.VarB)
	r.TrendZ = lt.B / r.TrendSlopeSENmUm2
	r.TrendP = 2 * distuv.UnitNormal.Survival(math.Abs(r.TrendZ))
	r.TrendFlagged = math.Abs(r.TrendZ) > set.TrendLimit
	xmin, xmax := minMax(x)
	if lt.A != 0 {
		r.TrendPct = 100 * lt.B * (xmax - xmin) / lt.A
	}
	var sw, swd float64
	for i := range sizes {
		sw += wSize[i]
		swd += wSize[i] * sizes[i]
	}
	r.SpreadMeanNm = swd / sw
	for i := range sizes {
		dd := sizes[i] - r.SpreadMeanNm
		r.SpreadChi2 += wSize[i] * dd * dd
	}
	r.SpreadDOF = n - 1
	r.SpreadP = (distuv.ChiSquared{K: float64(r.SpreadDOF)}).Survival(r.SpreadChi2)
	r.SpreadFlagged = r.SpreadP < 2*distuv.UnitNormal.Survival(set.TrendLimit)
	lz := linefit.Fit(x, dapp, wD, linefit.Options{KnownUncertainty: true, Birge: true})
	r.ZeroQDiffusionM2PerS = lz.A * 1e-12
	r.ZeroQDiffusionSEM2PerS = math.Sqrt(lz.VarA) * 1e-12
	if r.ZeroQDiffusionM2PerS > 0 {
		r.ZeroQDiameterNm = dls.DiameterFromDiffusion(tK, etaPaS, r.ZeroQDiffusionM2PerS) * 1e9
		r.ZeroQDiameterSENm = r.ZeroQDiameterNm * r.ZeroQDiffusionSEM2PerS / r.ZeroQDiffusionM2PerS
	}

	vals := []float64{r.DiffusionSEM2PerS, r.InterceptPerS, r.InterceptSEPerS, r.InterceptZ, r.InterceptP, r.ChiSquare, r.ReducedChi2,
		r.ScaleFactor, r.DiameterNm, r.DiameterSENm, r.TrendSlopeNmUm2, r.TrendSlopeSENmUm2, r.TrendZ, r.TrendP, r.TrendPct,
		r.SpreadMeanNm, r.SpreadChi2, r.SpreadP, r.ZeroQDiffusionM2PerS, r.ZeroQDiffusionSEM2PerS, r.ZeroQDiameterNm, r.ZeroQDiameterSENm}
	for _, a := range r.PerAngle {
		vals = append(vals, a.Q2PerM2, a.FittedGammaPerS, a.Normalized, a.DAppM2PerS, a.DAppSEM2PerS, a.SizeNm, a.SizeSENm)
	}
	for _, v := range vals {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("inputs of extreme magnitude make the analysis numerically degenerate: %w", dls.ErrOutOfRange)
		}
	}

	warn := func(f string, args ...any) { r.Warnings = append(r.Warnings, fmt.Sprintf(f, args...)) }
	if r.TrendFlagged {
		warn("apparent size changes with angle: %.3g nm per µm⁻² (%.1f standard uncertainties, %+.1f %% across the angles measured): the intensity weighting depends on q (broad or large sample), so one size does not describe it; extrapolated to q → 0: %.4g nm", r.TrendSlopeNmUm2, r.TrendZ, r.TrendPct, r.ZeroQDiameterNm)
	}
	if r.SpreadFlagged && !r.TrendFlagged {
		warn("apparent sizes differ between angles beyond their uncertainties (χ² = %.3g on %d degrees of freedom, p = %.2g) without a linear trend in q²: Mie resonances of large particles, or a disturbed measurement", r.SpreadChi2, r.SpreadDOF, r.SpreadP)
	}
	if r.InterceptFlagged {
		why := "a q-independent relaxation (internal or rotational modes, drift) or an analysis artefact"
		if r.TrendFlagged || r.SpreadFlagged {
			why = "mostly the curvature of Γ̄(q²) that goes with the size trend"
		}
		warn("decay rate against q² has a non-zero intercept %.4g ± %.2g /s (%.1f standard uncertainties, limit %.3g): %s", r.InterceptPerS, r.InterceptSEPerS, r.InterceptZ, set.InterceptLimit, why)
	}
	if r.ScaleFactor > 1 && (distuv.ChiSquared{K: float64(l.DOF)}).Survival(l.Chi2) < 0.01 {
		warn("decay rates scatter about the line beyond their standard errors (χ²/ν = %.3g): uncertainties widened by √(χ²/ν)", r.ReducedChi2)
	}
	return r, nil
}

func minMax(x []float64) (lo, hi float64) {
	lo, hi = x[0], x[0]
	for _, v := range x {
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	return lo, hi
}
