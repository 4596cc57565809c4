package dls

import (
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"math"
	"reflect"
)

// Status is the outcome class of one measurement.
type Status string

// Statuses of a result.
const (
	StatusOK    Status = "ok"    // analysed, nothing to remark
	StatusWarn  Status = "warn"  // analysed; Message says what to look at
	StatusError Status = "error" // could not be analysed; Message says why
)

// Result is everything dlsbatch reports for one measurement, built from
// parts that each hold one stage of the analysis and say whether they are
// valid (has_conditions, has_cumulants, has_distribution in JSON, so that a
// reader can tell a valid zero from a value never computed). A part that
// could not be computed (for an error, say) is zero and is written as
// empty cells. encoding/json flattens the embedded parts, so
// results.json keeps one flat object per measurement, in this field order.
type Result struct {
	Identity
	Conditions
	Cumulants
	DistSummary
	// Assumptions name defaults that a result leans on without changing
	// its status (e.g. an assumed particle refractive index, which only
	// the volume and number weightings depend on).
	Assumptions []string `json:"assumptions"`
	Corrections
	Uncertainty

	// Params lists every input value used, with its origin.
	Params []Param `json:"params"`
	// Warnings lists each remark behind a warn status.
	Warnings []string `json:"warnings"`
	// Curves holds the data and the fit for plotting and audit.
	Curves *Curves `json:"curves,omitempty"`
}

// Identity names a measurement and its outcome.
type Identity struct {
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
	// DataSHA256 is the SHA-256 of the measurement's lags and correlation
	// values as read (DataDigest): two measurements with the same one are
	// the same data, whatever their files are called. Empty when nothing
	// was read.
	DataSHA256 string `json:"data_sha256"`
	// Flags are the QC findings on this measurement (codes listed by
	// `dlsbatch flags`).
	Flags []Flag `json:"flags"`
}

// DataDigest is the SHA-256, in hex, of the lags tau and the correlation
// values y: the bits of each float64, little-endian, the lags first ("" for
// no values).
func DataDigest(tau, y []float64) string {
	if len(y) == 0 {
		return ""
	}
	h := sha256.New()
	buf := make([]byte, 0, 8*(len(tau)+len(y)))
	for _, v := range tau {
		buf = binary.LittleEndian.AppendUint64(buf, math.Float64bits(v))
	}
	for _, v := range y {
		buf = binary.LittleEndian.AppendUint64(buf, math.Float64bits(v))
	}
	h.Write(buf)
	return hex.EncodeToString(h.Sum(nil))
}

// Conditions are the measurement conditions used (valid when
// HasConditions): temperature, medium, optics and the sources of the
// medium's properties.
type Conditions struct {
	HasConditions   bool    `json:"has_conditions"`
	TemperatureC    float64 `json:"temperature_c"`
	Solvent         string  `json:"solvent"`
	ViscosityMPaS   float64 `json:"viscosity_mpas"`
	RefractiveIndex float64 `json:"refractive_index"`
	WavelengthNm    float64 `json:"wavelength_nm"`
	AngleDeg        float64 `json:"angle_deg"`
	QPerM           float64 `json:"q_per_m"`
	ViscositySource string  `json:"viscosity_source"`
	IndexSource     string  `json:"refractive_index_source"`
}

// Cumulants are the cumulant fit and what it gives through Stokes–Einstein
// (valid when HasCumulants), with the count rate and duration when the file
// states them.
type Cumulants struct {
	HasCumulants      bool    `json:"has_cumulants"`
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
	HasCountRate      bool    `json:"has_count_rate"`
	DurationS         float64 `json:"duration_s"`
	HasDuration       bool    `json:"has_duration"`
	CorrelationColumn string  `json:"correlation_column"`
	CorrelationKind   string  `json:"correlation_kind"` // g2, g2m1 or g1
}

// DistSummary is the size distribution of a measurement (valid when
// HasDistribution): the regularisation chosen, the summary of each
// weighting and the full distributions.
type DistSummary struct {
	HasDistribution  bool    `json:"has_distribution"`
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
	// PeakNoise is the noise covariance the peaks' uncertainties (and so
	// their significance) were computed with: PeakNoiseModel followed by
	// its basis, "correlator model (model)", "correlator model (sigma)"
	// or "correlator model (tail)" (see cumulants.ChannelNoise), or
	// PeakNoiseResiduals (contin.Sensitivity's Bartlett estimate, where no
	// model applies), PeakNoiseIndependent (the residuals were not
	// correlated enough for the model) or PeakNoiseResidualsSet (asked for
	// with batch.PeakNoiseResiduals).
	PeakNoise string `json:"peak_noise"`
	// Intensity, Volume and Number summarise each weighting: peaks by
	// decreasing area, percentiles and mean.
	Intensity *WeightSummary `json:"intensity,omitempty"`
	Volume    *WeightSummary `json:"volume,omitempty"`
	Number    *WeightSummary `json:"number,omitempty"`
	// Distribution holds the full distributions and the inversion's audit.
	Distribution *SizeDistribution `json:"distribution,omitempty"`
}

// Corrections are the concentration corrections applied.
type Corrections struct {
	// Correction is joined by "+": "none", "medium" (the continuous
	// phase's viscosity raised by a small colloid or excipient), "kd"
	// (collective diffusion of the sized particles corrected to infinite
	// dilution with a stated k_D), "dilution-series" (the measurement's
	// group was extrapolated to infinite dilution; see groups in
	// results.json).
	Correction string      `json:"correction"`
	Medium     *MediumNote `json:"medium,omitempty"`
	// ZAvgD0Nm is the size at infinite dilution when a k_D correction
	// applies (z_avg_nm stays the measured, collective value).
	ZAvgD0Nm float64 `json:"z_avg_d0_nm"`
	KD       float64 `json:"kd"`
	KDPhi    float64 `json:"kd_volume_fraction"`
	// ZAvgD0Budget is the GUM budget of ZAvgD0Nm (its z_avg_nm field holds
	// d0): the z-average's terms times 1 + k_D·φ, and those of k_D and φ.
	ZAvgD0Budget *Budget `json:"z_avg_d0_uncertainty_budget,omitempty"`
}

// Uncertainty is the GUM uncertainty of the z-average: combined standard
// and expanded (k = 2), with the budget.
type Uncertainty struct {
	ZAvgUcNm       float64 `json:"z_avg_uc_nm"`
	ZAvgExpandedNm float64 `json:"z_avg_expanded_nm"`
	Budget         *Budget `json:"uncertainty_budget,omitempty"`
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

// Curves are per-lag arrays of one measurement. A field tagged
// jsonenc:"shared" is a grid that many records share, whose encoding the
// records' encoder keeps (io/jsonenc).
type Curves struct {
	TauS      []float64 `json:"tau_s" jsonenc:"shared"`
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
	// MeanUNm and AreaUPct are the standard uncertainties of MeanNm and
	// AreaPct from the channel noise, propagated linearly through the
	// inversion with the noise covariance estimated from its residuals
	// (contin.Sensitivity); 0 when they could not be computed.
	MeanUNm  float64 `json:"mean_u_nm"`
	AreaUPct float64 `json:"area_u_pct"`
}

// WeightSummary summarises one weighting of a size distribution.
type WeightSummary struct {
	Peaks []Peak `json:"peaks"`
	// InsignificantPct is the share of the weighting, %, in peaks that the
	// rule found but did not report because the noise could have made them
	// (contin.Significant; intensity only).
	InsignificantPct float64 `json:"insignificant_pct"`
	MeanNm           float64 `json:"mean_nm"`
	D10Nm            float64 `json:"d10_nm"`
	D50Nm            float64 `json:"d50_nm"`
	D90Nm            float64 `json:"d90_nm"`
}

// SizeDistribution is the full output of the inversion for one
// measurement: the distributions on the diameter grid, the field
// correlation it fitted, and every regularisation strength tried.
type SizeDistribution struct {
	DiameterNm []float64 `json:"diameter_nm" jsonenc:"shared"`
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

// Finite reports whether every number of the result is finite, split into
// the size-distribution part (DistSummary) and everything else; JSON
// cannot carry NaN or Inf, and no output may hold one. It walks every
// float64 field, slice and pointer by reflection, so a field added later
// cannot escape it.
func (r *Result) Finite() (cumulantsOK, distributionOK bool) {
	distributionOK = finiteValue(reflect.ValueOf(r.DistSummary))
	rest := *r
	rest.DistSummary = DistSummary{}
	return finiteValue(reflect.ValueOf(rest)), distributionOK
}

// finiteValue reports whether every float reachable from v is finite.
func finiteValue(v reflect.Value) bool {
	switch v.Kind() {
	case reflect.Float32, reflect.Float64:
		f := v.Float()
		return !math.IsNaN(f) && !math.IsInf(f, 0)
	case reflect.Complex64, reflect.Complex128:
		c := v.Complex()
		return !math.IsNaN(real(c)) && !math.IsInf(real(c), 0) && !math.IsNaN(imag(c)) && !math.IsInf(imag(c), 0)
	case reflect.Pointer, reflect.Interface:
		return v.IsNil() || finiteValue(v.Elem())
	case reflect.Struct:
		for i := range v.NumField() {
			if !finiteValue(v.Field(i)) {
				return false
			}
		}
	case reflect.Slice, reflect.Array:
		if v.Kind() == reflect.Slice && v.Type().Elem().Kind() == reflect.Float64 {
			for _, x := range v.Interface().([]float64) {
				if math.IsNaN(x) || math.IsInf(x, 0) {
					return false
				}
			}
			return true
		}
		for i := range v.Len() {
			if !finiteValue(v.Index(i)) {
				return false
			}
		}
	case reflect.Map:
		for it := v.MapRange(); it.Next(); {
			if !finiteValue(it.Value()) {
				return false
			}
		}
	}
	return true
}

// Counts are the numbers of results by status.
type Counts struct {
	Total int `json:"total"`
	OK    int `json:"ok"`
	Warn  int `json:"warn"`
	Error int `json:"error"`
}

// CountResults counts results by status.
func CountResults(results []*Result) Counts {
	c := Counts{Total: len(results)}
	for _, r := range results {
		c.add(r.Status)
	}
	return c
}

func (c *Counts) add(s Status) {
	switch s {
	case StatusOK:
		c.OK++
	case StatusWarn:
		c.Warn++
	default:
		c.Error++
	}
}

// Values of Result.PeakNoise; the correlator model's is PeakNoiseModel
// followed by its basis in parentheses.
const (
	PeakNoiseModel        = "correlator model"
	PeakNoiseResiduals    = "residuals"
	PeakNoiseIndependent  = "residuals (independent from lag to lag)"
	PeakNoiseResidualsSet = "residuals (as set)"
)
