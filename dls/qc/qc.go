// Package qc raises quality-control flags on measurement results and
// aggregates the measurements of each sample.
//
// Every flag has a stable code (never renamed or reused), a one-line
// meaning listed by `dlsbatch flags`, and a threshold that is a documented
// setting. The default thresholds are common practice in DLS laboratories
// (marked so below; recalled, not taken from a cited standard) and are
// meant to be tuned by each site to its instruments and products: a site
// lists its own values in a thresholds file (package io/qcfile, read by
// `dlsbatch run --qc-thresholds`). Thresholds.Set takes a threshold by its
// key, the JSON name that results.json writes under qc_thresholds, and
// rejects a value outside the key's range (ThresholdKeys).
//
// Aggregation groups results by sample name, lot and temperature (to
// 0.1 °C; a sample measured at two temperatures is two samples). Results
// that could not be read carry no temperature and join the sample's first
// group. A run's z-average is
// an outlier when it lies more than OutlierK robust standard deviations from
// the sample's median, the robust standard deviation being 1.4826 times the
// median absolute deviation (normal-consistent MAD; Rousseeuw & Croux,
// "Alternatives to the median absolute deviation", J. Am. Stat. Assoc. 88,
// 1273, 1993), floored at 0.5 % of the median so that near-identical
// repeats do not make every small difference an outlier. The rule needs at
// least three analysed runs. Whether outliers are left out of the
// statistics is a setting, and is recorded on every sample.
package qc

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"dlsbatch/dls"
	"dlsbatch/dls/stats"
)

// Code is a flag code. It is dls.FlagCode (an alias, not a new type), the
// type of dls.Flag.Code, so that the constants below go into a flag as
// they are.
type Code = dls.FlagCode

// Flag codes. Stable: add new ones, never rename or reuse.
const (
	LowIntercept   Code = "LOW-INTERCEPT"
	HighIntercept  Code = "HIGH-INTERCEPT"
	NoBaseline     Code = "NO-BASELINE"
	BaselineOffset Code = "BASELINE-OFFSET"
	Dust           Code = "DUST"
	PoorFit        Code = "POOR-FIT"
	HighPDI        Code = "HIGH-PDI"
	OutsideWindow  Code = "OUTSIDE-WINDOW"
	Multimodal     Code = "MULTIMODAL"
	DistMismatch   Code = "DIST-MISMATCH"
	LowCountRate   Code = "LOW-COUNT-RATE"
	Failed         Code = "FAILED"
	Outlier        Code = "OUTLIER"
	FewRuns        Code = "FEW-RUNS"
	HighRSD        Code = "HIGH-RSD"
	NoValidRuns    Code = "NO-VALID-RUNS"
	// PeakNoiseMixed marks a run whose peak uncertainties came from its
	// residuals (the gate found them not correlated from lag to lag)
	// while at least half of its sample's runs with a distribution took
	// the correlator model: the noise is the instrument's, so this run's
	// peak uncertainties are likely understated (about eight times on
	// photon-level simulated correlator noise, DEVELOPERS.md "Peaks you
	// can believe").
	PeakNoiseMixed Code = "PEAK-NOISE-MIXED"
	// DuplicateRun marks a run of a sample whose data (lags and
	// correlation values, to the last bit) are those of an earlier run of
	// the same sample: a file copied, a column pasted twice. The copy is
	// left out of the sample's statistics, so that it cannot stand for a
	// repeat (a runs limit met by a copy, a repeatability too good).
	DuplicateRun Code = "DUPLICATE-RUN"
	// DuplicateData marks a sample one of whose runs has the data of a run
	// of another sample (or of another block of a reference): one set of
	// data under two names. A specification's verdict on the sample is
	// invalid (package dls/spec).
	DuplicateData Code = "DUPLICATE-DATA"
	// Blank marks every analysed run of role blank: what its fit calls a
	// size is the dispersant's own signal (solvent density fluctuations,
	// stray light, a few stray particles), not a particle size.
	Blank Code = "BLANK"
	// BlankScatter: a blank scatters more than clean dispersant should.
	BlankScatter Code = "BLANK-SCATTER"
)

// Thresholds are the settings behind the flags. Defaults: DefaultThresholds.
type Thresholds struct {
	MinIntercept     float64 `json:"min_intercept"`       // LOW-INTERCEPT below this coherence factor
	MaxIntercept     float64 `json:"max_intercept"`       // HIGH-INTERCEPT above
	MaxBaselineShift float64 `json:"max_baseline_shift"`  // BASELINE-OFFSET when |far baseline − nominal| / intercept exceeds this
	DustSizeFactor   float64 `json:"dust_size_factor"`    // DUST: intensity above this many z-averages …
	DustMinNm        float64 `json:"dust_min_nm"`         // … and above this diameter …
	DustMinPct       float64 `json:"dust_min_pct"`        // … holding more than this % of the intensity
	MaxReducedChi2   float64 `json:"max_reduced_chi2"`    // POOR-FIT when σ was given and χ²/ν exceeds this
	MaxRMSRatio      float64 `json:"max_rms_ratio"`       // POOR-FIT when the cumulant rms exceeds this multiple of the distribution fit's
	MaxPDI           float64 `json:"max_pdi"`             // HIGH-PDI above
	MinDecayLags     float64 `json:"min_decay_lags"`      // OUTSIDE-WINDOW when 1/Γ̄ is below this many first lags …
	MaxDecayFraction float64 `json:"max_decay_fraction"`  // … or above this fraction of the last lag
	MinPeakPct       float64 `json:"min_peak_pct"`        // MULTIMODAL: a second intensity peak holding at least this %
	MaxDistMismatch  float64 `json:"max_dist_mismatch"`   // DIST-MISMATCH when the distribution's z-average differs by more than this fraction
	MinCountRateKcps float64 `json:"min_count_rate_kcps"` // LOW-COUNT-RATE below (when the count rate is known)
	OutlierK         float64 `json:"outlier_k"`           // OUTLIER beyond this many robust SDs of the median
	MinRuns          int     `json:"min_runs"`            // FEW-RUNS below this number of analysed runs
	MaxRSDPct        float64 `json:"max_rsd_pct"`         // HIGH-RSD above this repeatability RSD of the z-average, %
	// BLANK-SCATTER above this count rate of a run of role blank; also the
	// blank's verdict limit where the specification sets no
	// count_rate_kcps for the blank's product (package dls/spec).
	MaxBlankCountRateKcps float64 `json:"max_blank_count_rate_kcps"`
}

// DefaultThresholds returns the defaults (common practice, from memory,
// to be tuned per site): intercept 0.1–1.0, baseline offset 0.5 % of the
// intercept, dust = over 5 % of the intensity above both 10 z-averages and
// 1 µm, χ²/ν
// above 3, cumulant rms over 2× the distribution fit's, PDI above 0.3,
// decay time below 5 first lags or above 10 % of the last lag, second peak
// of 5 %, distribution z-average off by 10 %, count rate below 10 kcps,
// outliers beyond 3 robust SDs, at least 3 runs, RSD above 5 %, a blank
// above 20 kcps (filtered water in a backscatter instrument with the
// attenuator open gives a few to about ten kcps; common practice, from
// memory: set it for the instrument and its attenuator).
func DefaultThresholds() Thresholds {
	return Thresholds{
		MinIntercept: 0.1, MaxIntercept: 1.0, MaxBaselineShift: 0.005,
		DustSizeFactor: 10, DustMinNm: 1000, DustMinPct: 5,
		MaxReducedChi2: 3, MaxRMSRatio: 2,
		MaxPDI:       0.3,
		MinDecayLags: 5, MaxDecayFraction: 0.1,
		MinPeakPct: 5, MaxDistMismatch: 0.10,
		MinCountRateKcps: 10,
		OutlierK:         3, MinRuns: 3, MaxRSDPct: 5,
		MaxBlankCountRateKcps: 20,
	}
}

// Definition describes one flag for listings.
type Definition struct {
	Code                      Code
	Level, Meaning, Threshold string
}

// Definitions lists every flag with the threshold of t, in a fixed order.
func Definitions(t Thresholds) []Definition {
	return []Definition{
		{LowIntercept, "run", "coherence factor low: stray light, multiple scattering, weak or fast signal", fmt.Sprintf("intercept < %g", t.MinIntercept)},
		{HighIntercept, "run", "coherence factor above 1: afterpulsing, number fluctuations or a bad normalisation", fmt.Sprintf("intercept > %g", t.MaxIntercept)},
		{NoBaseline, "run", "the correlation had not decayed by the last lag: dust, a slow component, or too short a lag window", "g1 ≥ 0.05 at the far channels"},
		{BaselineOffset, "run", "the far-channel baseline is off its nominal value: drift, dust or a slow process", fmt.Sprintf("|far baseline − nominal| > %g × intercept", t.MaxBaselineShift)},
		{Dust, "run", "intermittent large scatterers: intensity far above the main population", fmt.Sprintf("> %g %% of the intensity above %g × z-average and %g nm", t.DustMinPct, t.DustSizeFactor, t.DustMinNm)},
		{PoorFit, "run", "the cumulant fit does not describe the data within their noise", fmt.Sprintf("χ²/ν > %g (σ given) or rms > %g × the distribution fit's", t.MaxReducedChi2, t.MaxRMSRatio)},
		{HighPDI, "run", "too polydisperse for the cumulant mean to mean much: read the distribution", fmt.Sprintf("PDI > %g", t.MaxPDI)},
		{OutsideWindow, "run", "the decay time lies outside what the lag window resolves", fmt.Sprintf("1/Γ̄ < %g first lags or > %g × last lag", t.MinDecayLags, t.MaxDecayFraction)},
		{Multimodal, "run", "the intensity distribution has more than one population", fmt.Sprintf("second peak ≥ %g %%", t.MinPeakPct)},
		{DistMismatch, "run", "the distribution and the cumulants disagree on the mean size", fmt.Sprintf("|dist z-average / z-average − 1| > %g", t.MaxDistMismatch)},
		{LowCountRate, "run", "low count rate: noisy data, or too dilute a sample", fmt.Sprintf("count rate < %g kcps", t.MinCountRateKcps)},
		{Failed, "run", "the measurement could not be analysed (see its message)", "status error"},
		{Outlier, "sample", "a run's z-average is far from the sample's other runs", fmt.Sprintf("|z − median| > %g × 1.4826 × MAD (MAD ≥ 0.5 %% of the median), ≥ 3 runs", t.OutlierK)},
		{FewRuns, "sample", "fewer analysed runs than a repeatability statement needs", fmt.Sprintf("runs used < %d", t.MinRuns)},
		{HighRSD, "sample", "poor repeatability of the z-average", fmt.Sprintf("RSD > %g %%", t.MaxRSDPct)},
		{NoValidRuns, "sample", "no run of the sample could be analysed", "runs used = 0"},
		{PeakNoiseMixed, "sample", "peak uncertainties from the residuals, the sample's others from the model: likely too small", "residuals in a run, the model in ≥ half of those with a distribution"},
		{DuplicateRun, "sample", "a run is a copy of another run of the sample: left out of its statistics", "the same lags and correlation values to the last bit (data_sha256)"},
		{DuplicateData, "sample", "a run has the data of another sample's run: the verdict is invalid", "the same lags and correlation values to the last bit (data_sha256)"},
		{Blank, "run", "a blank (dispersant only): its fitted size is the dispersant's signal, not a particle size", "role blank, analysed"},
		{BlankScatter, "run", "a blank scatters more than clean dispersant: dirty solvent, cell or filter", fmt.Sprintf("role blank, count rate > %g kcps", t.MaxBlankCountRateKcps)},
	}
}

// Measurement returns the flags of one result.
func Measurement(r *dls.Result, tau []float64, t Thresholds) []dls.Flag {
	var f []dls.Flag
	add := func(code Code, format string, a ...any) {
		f = append(f, dls.Flag{Code: code, Message: fmt.Sprintf(format, a...)})
	}
	if r.Status == dls.StatusError {
		add(Failed, "%s", r.Message)
		return f
	}
	if !r.HasCumulants {
		return f
	}
	if r.Intercept < t.MinIntercept {
		add(LowIntercept, "intercept %.3f < %g", r.Intercept, t.MinIntercept)
	}
	if r.Intercept > t.MaxIntercept {
		add(HighIntercept, "intercept %.3f > %g", r.Intercept, t.MaxIntercept)
	}
	if !r.BaselineReached {
		add(NoBaseline, "the correlation had not decayed by the last lag")
	}
	nominal := 0.0
	if r.CorrelationKind == "" || r.CorrelationKind == "g2" {
		nominal = 1
	}
	if r.Intercept > 0 {
		if sh := math.Abs(r.FarBaseline-nominal) / r.Intercept; sh > t.MaxBaselineShift {
			add(BaselineOffset, "far baseline %.5f, %.2f %% of the intercept from %g", r.FarBaseline, 100*sh, nominal)
		}
	}
	if r.Intensity != nil && r.Distribution != nil {
		limit := math.Max(t.DustSizeFactor*r.ZAvgNm, t.DustMinNm)
		var above float64
		for j, d := range r.Distribution.DiameterNm {
			if d > limit {
				above += r.Distribution.Intensity[j]
			}
		}
		if 100*above > t.DustMinPct {
			add(Dust, "%.1f %% of the intensity above %.0f nm", 100*above, limit)
		}
		if len(r.Intensity.Peaks) > 1 && r.Intensity.Peaks[1].AreaPct >= t.MinPeakPct {
			add(Multimodal, "%d intensity peaks; second at %.0f nm holds %.1f %%", len(r.Intensity.Peaks), r.Intensity.Peaks[1].MeanNm, r.Intensity.Peaks[1].AreaPct)
		}
		if r.DistZAvgNm > 0 {
			if d := r.DistZAvgNm/r.ZAvgNm - 1; math.Abs(d) > t.MaxDistMismatch {
				add(DistMismatch, "distribution z-average %.1f nm vs cumulants %.1f nm (%+.0f %%)", r.DistZAvgNm, r.ZAvgNm, 100*d)
			}
		}
		if rms := r.DistFitRMS; rms > 0 && r.FitRMS > t.MaxRMSRatio*rms {
			add(PoorFit, "cumulant rms %.2g is %.1f × the distribution fit's", r.FitRMS, r.FitRMS/rms)
		}
	}
	if !r.SigmaEstimated && r.ReducedChi2 > t.MaxReducedChi2 {
		add(PoorFit, "reduced χ² %.2f > %g", r.ReducedChi2, t.MaxReducedChi2)
	}
	if r.PDI > t.MaxPDI {
		add(HighPDI, "PDI %.3f > %g", r.PDI, t.MaxPDI)
	}
	if len(tau) > 0 && r.GammaMeanPerS > 0 {
		dt := 1 / r.GammaMeanPerS
		if dt < t.MinDecayLags*tau[0] {
			add(OutsideWindow, "decay time %.3g s is under %g first lags (%.3g s): the size is near the lower limit of the window", dt, t.MinDecayLags, tau[0])
		}
		if dt > t.MaxDecayFraction*tau[len(tau)-1] {
			add(OutsideWindow, "decay time %.3g s exceeds %g of the last lag (%.3g s): the size is near the upper limit of the window", dt, t.MaxDecayFraction, tau[len(tau)-1])
		}
	}
	if r.HasCountRate && r.CountRateKcps < t.MinCountRateKcps && r.Role != dls.RoleBlank {
		add(LowCountRate, "count rate %.1f kcps < %g", r.CountRateKcps, t.MinCountRateKcps)
	}
	if r.Role == dls.RoleBlank {
		add(Blank, "a blank: the fitted %.1f nm is the dispersant's signal, not a particle size", r.ZAvgNm)
		if r.HasCountRate && r.CountRateKcps > t.MaxBlankCountRateKcps {
			add(BlankScatter, "blank count rate %.1f kcps > %g", r.CountRateKcps, t.MaxBlankCountRateKcps)
		}
	}
	return f
}

// Options control aggregation.
type Options struct {
	Thresholds      Thresholds
	ExcludeOutliers bool
}

// Aggregate groups results into samples (by sample name and lot, in the
// order of first appearance), flags outlier runs, and computes each
// sample's statistics over its analysed runs (less the outliers when
// ExcludeOutliers is set).
func Aggregate(results []*dls.Brief, o Options) []*dls.Sample {
	var order []string
	by := map[string]*dls.Sample{}
	first := map[string]string{} // sample+lot → key of its first group
	for i, r := range results {
		base := r.Sample + "\x00" + r.Lot
		key := base
		if r.HasConditions {
			key += fmt.Sprintf("\x00%.1f", r.TemperatureC)
		} else if k, ok := first[base]; ok {
			key = k
		}
		s := by[key]
		if s == nil {
			s = &dls.Sample{Name: r.Sample, Lot: r.Lot, Product: r.Product, Role: r.Role, Group: r.Group, OutliersExcluded: o.ExcludeOutliers}
			by[key] = s
			order = append(order, key)
			if _, ok := first[base]; !ok {
				first[base] = key
			}
		}
		s.Runs = append(s.Runs, i)
	}
	twins := dataTwins(results)
	out := make([]*dls.Sample, 0, len(order))
	for _, k := range order {
		s := by[k]
		aggregate(s, results, o, twins)
		out = append(out, s)
	}
	return out
}

// dataTwins groups the results that share their data (DataSHA256): it
// maps each member of a group to the group, its members in results order.
// Results with data of their own are in no group.
func dataTwins(results []*dls.Brief) map[int][]int {
	by := map[string][]int{}
	for i, r := range results {
		if r != nil && r.DataSHA256 != "" {
			by[r.DataSHA256] = append(by[r.DataSHA256], i)
		}
	}
	twins := map[int][]int{}
	for _, g := range by {
		if len(g) > 1 {
			for _, i := range g {
				twins[i] = g
			}
		}
	}
	return twins
}

// Block aggregates the given runs (indices into results, in any order) as
// one sample named after the first: the statistics of a block of reference
// measurements, judged on its own by the system suitability test (package
// dls/spec).
func Block(results []*dls.Brief, runs []int, o Options) *dls.Sample {
	r := results[runs[0]]
	s := &dls.Sample{Name: r.Sample, Lot: r.Lot, Product: r.Product, Role: r.Role, Group: r.Group,
		OutliersExcluded: o.ExcludeOutliers, Runs: append([]int(nil), runs...)}
	aggregate(s, results, o, dataTwins(results))
	return s
}

func aggregate(s *dls.Sample, results []*dls.Brief, o Options, twins map[int][]int) {
	t := o.Thresholds
	s.NRuns = len(s.Runs)
	var ok []int
	temps := map[float64]bool{}
	// Of each group of runs with the same data (dataTwins) the sample keeps
	// its first run; later ones are copies of it.
	mine := map[int]bool{}
	if len(twins) > 0 {
		for _, i := range s.Runs {
			mine[i] = true
		}
	}
	kept := map[int]int{} // a group, by its first member → the sample's run kept of it
	for _, i := range s.Runs {
		r := results[i]
		for _, f := range r.Flags {
			s.Flags = append(s.Flags, dls.Flag{Code: f.Code, Message: r.RunID() + ": " + f.Message})
		}
		if !r.HasCumulants {
			continue
		}
		if g := twins[i]; g != nil {
			if j, copied := kept[g[0]]; copied {
				s.Flags = append(s.Flags, dls.Flag{Code: DuplicateRun, Message: fmt.Sprintf("%s: the same data as %s: left out of the statistics", r.RunID(), results[j].RunID())})
				continue
			}
			kept[g[0]] = i
			if others := othersOf(g, results, mine); len(others) > 0 {
				s.Flags = append(s.Flags, dls.Flag{Code: DuplicateData, Message: fmt.Sprintf("%s: the same data as %s", r.RunID(), strings.Join(others, ", "))})
			}
		}
		ok = append(ok, i)
		temps[math.Round(r.TemperatureC*100)/100] = true
	}
	for tc := range temps {
		s.TemperaturesC = append(s.TemperaturesC, tc)
	}
	sort.Float64s(s.TemperaturesC)
	peakNoiseMixed(s, results)
	if len(ok) >= 3 {
		z := make([]float64, len(ok))
		for k, i := range ok {
			z[k] = results[i].ZAvgNm
		}
		med := stats.Median(z)
		dev := make([]float64, len(z))
		for k, v := range z {
			dev[k] = math.Abs(v - med)
		}
		sd := math.Max(1.4826*stats.Median(dev), 0.005*med)
		for k, i := range ok {
			if dev[k] > t.OutlierK*sd {
				s.Outliers = append(s.Outliers, i)
				s.Flags = append(s.Flags, dls.Flag{Code: Outlier, Message: fmt.Sprintf("%s: z-average %.2f nm vs median %.2f nm (%.1f robust SD)", results[i].RunID(), z[k], med, dev[k]/sd)})
			}
		}
	}
	for _, i := range ok {
		if o.ExcludeOutliers && contains(s.Outliers, i) {
			continue
		}
		s.Used = append(s.Used, i)
	}
	s.NUsed = len(s.Used)
	if s.NUsed == 0 {
		s.Flags = append(s.Flags, dls.Flag{Code: NoValidRuns, Message: "no run could be analysed"})
		return
	}
	var z, p, pk, d90 []float64
	var runPeaks [][]dls.Peak
	for _, i := range s.Used {
		r := results[i]
		if r.HasDistribution && r.Intensity != nil {
			runPeaks = append(runPeaks, r.Intensity.Peaks)
		}
		z = append(z, r.ZAvgNm)
		p = append(p, r.PDI)
		if r.Intensity != nil && len(r.Intensity.Peaks) > 0 {
			pk = append(pk, r.Intensity.Peaks[0].MeanNm)
			d90 = append(d90, r.Intensity.D90Nm)
		}
	}
	s.ZAvgMeanNm, s.ZAvgSDNm = stats.MeanSD(z)
	s.PDIMean, s.PDISD = stats.MeanSD(p)
	if s.ZAvgMeanNm != 0 {
		s.ZAvgRSDPct = 100 * s.ZAvgSDNm / s.ZAvgMeanNm
	}
	if s.PDIMean != 0 {
		s.PDIRSDPct = 100 * s.PDISD / math.Abs(s.PDIMean)
	}
	s.IntensityPeaks = dls.MatchPeaks(runPeaks)
	if len(pk) > 0 {
		s.Peak1MeanNm, _ = stats.MeanSD(pk)
		s.D90MeanNm, _ = stats.MeanSD(d90)
	}
	if s.NUsed < t.MinRuns {
		s.Flags = append(s.Flags, dls.Flag{Code: FewRuns, Message: fmt.Sprintf("%d run(s) used, %d wanted", s.NUsed, t.MinRuns)})
	}
	if s.NUsed >= 2 && s.ZAvgRSDPct > t.MaxRSDPct {
		s.Flags = append(s.Flags, dls.Flag{Code: HighRSD, Message: fmt.Sprintf("z-average RSD %.1f %% > %g %%", s.ZAvgRSDPct, t.MaxRSDPct)})
	}
}

// othersOf names the members of a group of data (dataTwins) that are not
// runs of the sample mine, with their sample and lot.
func othersOf(group []int, results []*dls.Brief, mine map[int]bool) []string {
	var out []string
	for _, j := range group {
		if mine[j] {
			continue
		}
		r := results[j]
		name := fmt.Sprintf("sample %q", r.Sample)
		if r.Lot != "" {
			name += ", lot " + r.Lot
		}
		out = append(out, r.RunID()+" ("+name+")")
	}
	return out
}

// peakNoiseMixed flags the runs of s whose peak uncertainties fell back to
// the residuals (dls.PeakNoiseIndependent) when at least half of its runs
// with a distribution took the correlator model (PeakNoiseMixed).
func peakNoiseMixed(s *dls.Sample, results []*dls.Brief) {
	var model, withDist int
	var fell []int
	for _, i := range s.Runs {
		r := results[i]
		if !r.HasDistribution {
			continue
		}
		withDist++
		switch {
		case strings.HasPrefix(r.PeakNoise, dls.PeakNoiseModel):
			model++
		case r.PeakNoise == dls.PeakNoiseIndependent:
			fell = append(fell, i)
		}
	}
	if len(fell) == 0 || 2*model < withDist {
		return
	}
	for _, i := range fell {
		s.Flags = append(s.Flags, dls.Flag{Code: PeakNoiseMixed, Message: fmt.Sprintf(
			"%s: peak uncertainties from the residuals, where %d of %d runs took the correlator model: likely understated (--peak-uncertainty correlator-model takes the model for every run)",
			results[i].RunID(), model, withDist)})
	}
}

func contains(v []int, x int) bool {
	for _, y := range v {
		if y == x {
			return true
		}
	}
	return false
}
