package dls

import "math"

// Status is the outcome class of one measurement.
type Status string

// Statuses of a result.
const (
	StatusOK    Status = "ok"    // analysed, nothing to remark
	StatusWarn  Status = "warn"  // analysed; Message says what to look at
	StatusError Status = "error" // could not be analysed; Message says why
)

// Result is everything dlsbatch reports for one measurement. Fields that
// could not be computed (for an error, say) are zero and are written as
// empty cells; Has* flags say which groups are valid.
type Result struct {
	File    string `json:"file"`
	Sample  string `json:"sample"`
	Run     string `json:"run"`
	Status  Status `json:"status"`
	Message string `json:"message"`
	// Lot, Product, Role and Group come from the metadata (sample sheet
	// or file); Role is RoleSample unless given.
	Lot     string `json:"lot"`
	Product string `json:"product"`
	Role    Role   `json:"role"`
	Group   string `json:"group"`
	// Flags are the QC findings on this measurement (codes listed by
	// `dlsbatch flags`).
	Flags []Flag `json:"flags"`

	// Conditions (valid when HasConditions).
	HasConditions   bool    `json:"-"`
	TemperatureC    float64 `json:"temperature_c"`
	Solvent         string  `json:"solvent"`
	ViscosityMPaS   float64 `json:"viscosity_mpas"`
	RefractiveIndex float64 `json:"refractive_index"`
	WavelengthNm    float64 `json:"wavelength_nm"`
	AngleDeg        float64 `json:"angle_deg"`
	QPerM           float64 `json:"q_per_m"`
	ViscositySource string  `json:"viscosity_source"`
	IndexSource     string  `json:"refractive_index_source"`

	// Cumulant results (valid when HasCumulants).
	HasCumulants      bool    `json:"-"`
	Method            string  `json:"cumulant_method"`
	Order             int     `json:"cumulant_order"`
	GammaMeanPerS     float64 `json:"gamma_mean_per_s"`
	GammaSEPerS       float64 `json:"gamma_se_per_s"`
	Mu2PerS2          float64 `json:"mu2_per_s2"`
	Mu3PerS3          float64 `json:"mu3_per_s3"`
	DiffusionM2PerS   float64 `json:"diffusion_m2_per_s"`
	ZAvgNm            float64 `json:"z_avg_nm"`
	ZAvgSENm          float64 `json:"z_avg_se_nm"`
	PDI               float64 `json:"pdi"`
	PDISE             float64 `json:"pdi_se"`
	Intercept         float64 `json:"intercept"`
	Baseline          float64 `json:"baseline"`
	FarBaseline       float64 `json:"far_baseline"`
	BaselineReached   bool    `json:"baseline_reached"`
	FitRMS            float64 `json:"fit_rms"`
	ReducedChi2       float64 `json:"reduced_chi2"`
	SigmaEstimated    bool    `json:"sigma_estimated"`
	FitPoints         int     `json:"fit_points"`
	FitFirstTauS      float64 `json:"fit_first_tau_s"`
	FitLastTauS       float64 `json:"fit_last_tau_s"`
	RangeShiftPct     float64 `json:"range_shift_pct"`
	Iterations        int     `json:"iterations"`
	LinearZAvgNm      float64 `json:"linear_z_avg_nm"`
	LinearPDI         float64 `json:"linear_pdi"`
	CountRateKcps     float64 `json:"count_rate_kcps"`
	HasCountRate      bool    `json:"-"`
	DurationS         float64 `json:"duration_s"`
	HasDuration       bool    `json:"-"`
	CorrelationColumn string  `json:"correlation_column"`
	CorrelationKind   string  `json:"correlation_kind"` // g2, g2m1 or g1

	// Size distribution (valid when HasDistribution).
	HasDistribution  bool    `json:"-"`
	ParticleRI       string  `json:"particle_ri"`
	AlphaCriterion   string  `json:"alpha_criterion"`
	Alpha            float64 `json:"alpha"`
	Lambda           float64 `json:"alpha_lambda"`
	DegreesOfFreedom float64 `json:"dof"`
	ProbReject       float64 `json:"prob_reject"`
	DistMeanRatePerS float64 `json:"dist_mean_rate_per_s"`
	DistZAvgNm       float64 `json:"dist_z_avg_nm"`
	// DistFitRMS is the rms residual of the inversion's model, mapped back
	// to the correlogram's units, over the cumulant fit's range: comparable
	// with FitRMS.
	DistFitRMS float64 `json:"dist_fit_rms"`
	// Intensity, Volume and Number summarise each weighting: peaks by
	// decreasing area, percentiles and mean.
	Intensity *WeightSummary `json:"intensity,omitempty"`
	Volume    *WeightSummary `json:"volume,omitempty"`
	Number    *WeightSummary `json:"number,omitempty"`
	// Distribution holds the full distributions and the inversion's audit.
	Distribution *SizeDistribution `json:"distribution,omitempty"`

	// Assumptions name defaults that a result leans on without changing
	// its status (e.g. an assumed particle refractive index, which only
	// the volume and number weightings depend on).
	Assumptions []string `json:"assumptions"`

	// Correction names the concentration corrections applied, joined by
	// "+": "none", "medium" (the continuous phase's viscosity raised by a
	// small colloid or excipient), "kd" (collective diffusion of the sized
	// particles corrected to infinite dilution with a stated k_D),
	// "dilution-series" (the measurement's group was extrapolated to
	// infinite dilution; see groups in results.json).
	Correction string      `json:"correction"`
	Medium     *MediumNote `json:"medium,omitempty"`
	// ZAvgD0Nm is the size at infinite dilution when a k_D correction
	// applies (z_avg_nm stays the measured, collective value).
	ZAvgD0Nm float64 `json:"z_avg_d0_nm"`
	KD       float64 `json:"kd"`
	KDPhi    float64 `json:"kd_volume_fraction"`

	// Uncertainty of the z-average (GUM): combined standard and expanded
	// (k = 2), with the budget.
	ZAvgUcNm       float64 `json:"z_avg_uc_nm"`
	ZAvgExpandedNm float64 `json:"z_avg_expanded_nm"`
	Budget         any     `json:"uncertainty_budget,omitempty"`

	// Params lists every input value used, with its origin.
	Params []Param `json:"params"`
	// Warnings lists each remark behind a warn status.
	Warnings []string `json:"warnings"`
	// Curves holds the data and the fit for plotting and audit.
	Curves *Curves `json:"curves,omitempty"`
}

// MediumNote records a medium correction: the relation used, φ, the
// relative viscosity and, when both a φ and a viscometer reading are
// given, the consistency check between them.
type MediumNote struct {
	Model             string  `json:"model"`
	VolumeFraction    float64 `json:"volume_fraction"`
	RelativeViscosity float64 `json:"relative_viscosity"`
	SolventMPaS       float64 `json:"solvent_viscosity_mpas"`
	Check             string  `json:"check"`
}

// Curves are per-lag arrays of one measurement.
type Curves struct {
	TauS      []float64 `json:"tau_s"`
	Data      []float64 `json:"data"`
	Fitted    []float64 `json:"fitted"`
	Residuals []float64 `json:"residuals"`
	Kind      string    `json:"kind"`
}

// Peak is one population of a size distribution.
type Peak struct {
	ModeNm  float64 `json:"mode_nm"`  // diameter of the maximum (parabolic refinement in ln d)
	MeanNm  float64 `json:"mean_nm"`  // weighted mean diameter over the peak
	SDNm    float64 `json:"sd_nm"`    // weighted standard deviation of the diameter over the peak
	AreaPct float64 `json:"area_pct"` // share of the weighting, %
	LowNm   float64 `json:"low_nm"`   // first bin of the peak
	HighNm  float64 `json:"high_nm"`  // last bin of the peak
}

// WeightSummary summarises one weighting of a size distribution.
type WeightSummary struct {
	Peaks  []Peak  `json:"peaks"`
	MeanNm float64 `json:"mean_nm"`
	D10Nm  float64 `json:"d10_nm"`
	D50Nm  float64 `json:"d50_nm"`
	D90Nm  float64 `json:"d90_nm"`
}

// SizeDistribution is the full output of the inversion for one
// measurement: the distributions on the diameter grid, the field
// correlation it fitted, and every regularisation strength tried.
type SizeDistribution struct {
	DiameterNm []float64 `json:"diameter_nm"`
	Intensity  []float64 `json:"intensity"`
	Volume     []float64 `json:"volume"`
	Number     []float64 `json:"number"`
	MieMasked  []bool    `json:"mie_masked"`
	// G1 is the field correlation derived from the data (signed square
	// root of (g2 − B)/β), G1Sigma its propagated uncertainty, G1Fitted
	// the inversion's model and G1Residuals their difference, all at the
	// lags of Curves.TauS.
	G1          []float64  `json:"g1"`
	G1Sigma     []float64  `json:"g1_sigma"`
	G1Fitted    []float64  `json:"g1_fitted"`
	G1Residuals []float64  `json:"g1_residuals"`
	Scan        []AlphaRow `json:"alpha_scan"`
}

// AlphaRow is one regularisation strength tried.
type AlphaRow struct {
	Lambda           float64 `json:"lambda"`
	Alpha            float64 `json:"alpha"`
	ChiSquare        float64 `json:"chi_square"`
	DegreesOfFreedom float64 `json:"dof"`
	NormLx           float64 `json:"norm_lx"`
	ProbReject       float64 `json:"prob_reject"`
	GCV              float64 `json:"gcv"`
	Chosen           bool    `json:"chosen"`
}

// Finite reports whether every number of the result's cumulant part
// (conditions, fit, curves) and of its distribution part is finite; JSON
// cannot carry NaN or Inf, and no output may hold one.
func (r *Result) Finite() (cumulantsOK, distributionOK bool) {
	ok := func(vs ...[]float64) bool {
		for _, v := range vs {
			for _, x := range v {
				if math.IsNaN(x) || math.IsInf(x, 0) {
					return false
				}
			}
		}
		return true
	}
	scalars := []float64{r.TemperatureC, r.ViscosityMPaS, r.RefractiveIndex, r.WavelengthNm, r.AngleDeg, r.QPerM,
		r.GammaMeanPerS, r.GammaSEPerS, r.Mu2PerS2, r.Mu3PerS3, r.DiffusionM2PerS, r.ZAvgNm, r.ZAvgSENm, r.PDI, r.PDISE,
		r.Intercept, r.Baseline, r.FarBaseline, r.FitRMS, r.ReducedChi2, r.FitFirstTauS, r.FitLastTauS, r.RangeShiftPct,
		r.LinearZAvgNm, r.LinearPDI, r.CountRateKcps, r.DurationS, r.ZAvgD0Nm, r.KD, r.KDPhi, r.ZAvgUcNm, r.ZAvgExpandedNm}
	cumulantsOK = ok(scalars)
	if r.Curves != nil {
		cumulantsOK = cumulantsOK && ok(r.Curves.Fitted, r.Curves.Residuals)
	}
	distributionOK = ok([]float64{r.Alpha, r.Lambda, r.DegreesOfFreedom, r.ProbReject, r.DistMeanRatePerS, r.DistZAvgNm, r.DistFitRMS})
	for _, w := range []*WeightSummary{r.Intensity, r.Volume, r.Number} {
		if w == nil {
			continue
		}
		distributionOK = distributionOK && ok([]float64{w.MeanNm, w.D10Nm, w.D50Nm, w.D90Nm})
		for _, p := range w.Peaks {
			distributionOK = distributionOK && ok([]float64{p.ModeNm, p.MeanNm, p.SDNm, p.AreaPct, p.LowNm, p.HighNm})
		}
	}
	if d := r.Distribution; d != nil {
		distributionOK = distributionOK && ok(d.DiameterNm, d.Intensity, d.Volume, d.Number, d.G1, d.G1Sigma, d.G1Fitted, d.G1Residuals)
		for _, s := range d.Scan {
			distributionOK = distributionOK && ok([]float64{s.Lambda, s.Alpha, s.ChiSquare, s.DegreesOfFreedom, s.NormLx, s.ProbReject, s.GCV})
		}
	}
	return cumulantsOK, distributionOK
}
