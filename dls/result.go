package dls

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

	// Params lists every input value used, with its origin.
	Params []Param `json:"params"`
	// Warnings lists each remark behind a warn status.
	Warnings []string `json:"warnings"`
	// Curves holds the data and the fit for plotting and audit.
	Curves *Curves `json:"curves,omitempty"`
}

// Curves are per-lag arrays of one measurement.
type Curves struct {
	TauS      []float64 `json:"tau_s"`
	Data      []float64 `json:"data"`
	Fitted    []float64 `json:"fitted"`
	Residuals []float64 `json:"residuals"`
	Kind      string    `json:"kind"`
}
