package dls

import "reflect"

// FieldRun is what the joint analysis of a sample's runs takes of one
// run: the correlogram it analysed (its lags and correlation values, as
// Curves holds them) and its conditions as its analysis resolved them. It
// is built from the result alone (FieldRunOf), so a run resumed from the
// journal or merged from shards gives the same one.
type FieldRun struct {
	TemperatureC    float64
	ViscosityMPaS   float64
	RefractiveIndex float64
	WavelengthNm    float64
	AngleDeg        float64
	QPerM           float64
	// ParticleRI is the particle index as the result states it.
	ParticleRI string
	// DurationS and CountRateKcps are the run's, when HasDuration and
	// HasCountRate.
	DurationS, CountRateKcps  float64
	HasDuration, HasCountRate bool
	// Kind is the kind of the correlation values (Curves.Kind).
	Kind string
	// TauS and Data are the lags and correlation values the run analysed.
	TauS, Data []float64
}

// FieldRunOf returns the field run of r; nil when r has no size
// distribution or keeps no curves.
func FieldRunOf(r *Result) *FieldRun {
	c := r.Curves
	if !r.HasDistribution || r.Distribution == nil || c == nil || len(c.TauS) == 0 || len(c.Data) != len(c.TauS) {
		return nil
	}
	return &FieldRun{
		TemperatureC: r.TemperatureC, ViscosityMPaS: r.ViscosityMPaS, RefractiveIndex: r.RefractiveIndex,
		WavelengthNm: r.WavelengthNm, AngleDeg: r.AngleDeg, QPerM: r.QPerM, ParticleRI: r.ParticleRI,
		DurationS: r.DurationS, CountRateKcps: r.CountRateKcps, HasDuration: r.HasDuration, HasCountRate: r.HasCountRate,
		Kind: c.Kind, TauS: c.TauS, Data: c.Data,
	}
}

// JointDistribution is the size distribution of one analysis of all the
// used runs of a sample together: the mean of their correlograms
// (weighted by duration), analysed as one correlogram of their summed
// duration with the runs' own settings and metadata. Its peaks carry the
// uncertainty of that mean, so close populations that each run alone
// cannot separate may show here; the per-run results stand beside it.
// Note says why it was not computed when Intensity is nil.
type JointDistribution struct {
	// Runs indexes the runs analysed together in the batch's result list.
	Runs []int `json:"runs"`
	// Note says why there is no joint distribution (runs at different
	// angles, lag grids or optics, or the inversion's error); "" when there
	// is one.
	Note string `json:"note"`
	// PeakNoise says where the peaks' uncertainties come from, as a run's
	// peak_noise does (the mean's analysis chooses as a run's does).
	PeakNoise string `json:"peak_noise"`
	// Alpha, ProbReject and DegreesOfFreedom describe the chosen
	// regularisation, as a run's alpha, prob_reject and dof do.
	Alpha            float64 `json:"alpha"`
	ProbReject       float64 `json:"prob_reject"`
	DegreesOfFreedom float64 `json:"dof"`
	// DistZAvgNm is the z-average of the joint distribution's peaks.
	DistZAvgNm float64        `json:"dist_z_avg_nm"`
	Intensity  *WeightSummary `json:"intensity"`
	Volume     *WeightSummary `json:"volume"`
	Number     *WeightSummary `json:"number"`
	// DiameterNm and IntensityPct are the intensity distribution over the
	// span of bins that hold any of it (the grid's empty ends left out).
	DiameterNm   []float64 `json:"diameter_nm"`
	IntensityPct []float64 `json:"intensity_pct"`
}

// JointFinite reports whether every number of j is finite (results.json
// holds no NaN or Inf).
func JointFinite(j *JointDistribution) bool { return finiteValue(reflect.ValueOf(j)) }
