package dls

import "reflect"

// FieldRun is what a joint inversion takes of one run: its conditions and
// the field correlation its own (second-pass) inversion fitted, over the
// channels that inversion used (those with a positive σ), as a Result
// records them. It
// is built from the result alone (FieldRunOf), so a run resumed from the
// journal or merged from shards gives the same one.
type FieldRun struct {
	TemperatureC    float64
	ViscosityMPaS   float64
	RefractiveIndex float64
	WavelengthNm    float64
	AngleDeg        float64
	QPerM           float64
	// GammaMeanPerS and PDI are the cumulant fit's, for the solver's start.
	GammaMeanPerS float64
	PDI           float64
	// ParticleRI is the particle index as the result states it.
	ParticleRI string
	// TauS, G1 and G1Sigma are the lags, field correlation and its σ of
	// the channels the run's inversion used.
	TauS, G1, G1Sigma []float64
	// Noise is the run's correlator model of the noise of G1
	// (SizeDistribution.NoiseModel), nil when the record has none or when
	// the run's channels are not the contiguous lags the model describes.
	Noise *FieldNoise
}

// FieldNoise is a run's correlator noise model over the channels of its
// field run: NoiseModel's parameters, the model's σ of g1 at each of
// TauS, and the lag before the first of them (0 for none), from which the
// model takes the first channel's sample time.
type FieldNoise struct {
	GammaPerS, Beta, CountRatePerS float64
	PrevLagS                       float64
	G1Sigma                        []float64
}

// FieldRunOf returns the field run of r; nil when r has no size
// distribution or no channel with a positive σ.
func FieldRunOf(r *Result) *FieldRun {
	d := r.Distribution
	if !r.HasDistribution || d == nil || r.Curves == nil || len(d.G1) != len(r.Curves.TauS) || len(d.G1Sigma) != len(d.G1) {
		return nil
	}
	f := &FieldRun{
		TemperatureC: r.TemperatureC, ViscosityMPaS: r.ViscosityMPaS, RefractiveIndex: r.RefractiveIndex,
		WavelengthNm: r.WavelengthNm, AngleDeg: r.AngleDeg, QPerM: r.QPerM,
		GammaMeanPerS: r.GammaMeanPerS, PDI: r.PDI, ParticleRI: r.ParticleRI,
	}
	for k, s := range d.G1Sigma {
		if s > 0 {
			f.TauS = append(f.TauS, r.Curves.TauS[k])
			f.G1 = append(f.G1, d.G1[k])
			f.G1Sigma = append(f.G1Sigma, s)
		}
	}
	if len(f.TauS) == 0 {
		return nil
	}
	if nm := d.NoiseModel; nm != nil && len(nm.G1Sigma) == len(d.G1) {
		// The model describes the lags from the inversion's first on,
		// all of them: the field run must hold exactly those.
		k0 := len(d.G1) - len(f.TauS)
		contiguous := true
		for _, s := range d.G1Sigma[k0:] {
			contiguous = contiguous && s > 0
		}
		if contiguous {
			fn := &FieldNoise{GammaPerS: nm.GammaPerS, Beta: nm.Beta, CountRatePerS: nm.CountRatePerS,
				G1Sigma: append([]float64(nil), nm.G1Sigma[k0:]...)}
			if k0 > 0 {
				fn.PrevLagS = r.Curves.TauS[k0-1]
			}
			f.Noise = fn
		}
	}
	return f
}

// JointDistribution is the size distribution of one inversion of all the
// used runs of a sample together: the inverse-variance weighted mean of
// their field correlations, inverted as one correlogram of their summed
// duration. Its peaks carry the uncertainty of that mean, so close
// populations that each run alone cannot separate may show here; the
// per-run results stand beside it. Note says why it was not computed when
// Intensity is nil.
type JointDistribution struct {
	// Runs indexes the runs inverted together in the batch's result list.
	Runs []int `json:"runs"`
	// Note says why there is no joint distribution (runs at different
	// angles, lag grids or optics, or the inversion's error); "" when there
	// is one.
	Note string `json:"note"`
	// PeakNoise says where the peaks' uncertainties come from, as a run's
	// peak_noise does: "correlator model (mean of the runs)" when every run
	// kept its correlator model and the joint inversion's residuals are
	// correlated from lag to lag, "residuals (independent from lag to
	// lag)" when they are not, else "residuals".
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
