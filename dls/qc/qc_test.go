package qc

import (
	"fmt"
	"math"
	"reflect"
	"strings"
	"testing"

	"dlsbatch/dls"
)

// clean is a result that raises no flag: a 100 nm latex, intercept 0.92,
// baseline reached at 1.0001, PDI 0.02, one intensity peak, distribution
// agreeing with the cumulants.
func clean() *dls.Result {
	tau := []float64{1e-6, 1e-5, 1e-4, 1e-3, 1e-2, 1e-1, 1}
	return &dls.Result{Identity: dls.Identity{File: "a.csv", Sample: "latex", Status: dls.StatusOK}, Conditions: dls.Conditions{HasConditions: true, TemperatureC: 25}, Cumulants: dls.Cumulants{HasCumulants: true, ZAvgNm: 100, PDI: 0.02, Intercept: 0.92, Baseline: 1, FarBaseline: 1.0001, BaselineReached: true, GammaMeanPerS: 3400, FitRMS: 1e-3, ReducedChi2: 1.1, SigmaEstimated: true, HasCountRate: true, CountRateKcps: 250}, DistSummary: dls.DistSummary{HasDistribution: true, DistZAvgNm: 101, Intensity: &dls.WeightSummary{Peaks: []dls.Peak{{MeanNm: 100, AreaPct: 100}}}, Distribution: &dls.SizeDistribution{DiameterNm: []float64{50, 100, 200, 2000}, Intensity: []float64{0.1, 0.8, 0.1, 0}}}, Curves: &dls.Curves{TauS: tau, Kind: "g2"}}
}

func TestFlagsFireAndStayQuiet(t *testing.T) {
	tau := clean().Curves.TauS
	th := DefaultThresholds()
	if f := Measurement(clean(), tau, th); len(f) != 0 {
		t.Fatalf("clean result raises %v", f)
	}
	// Each case changes the clean result just past one threshold (the
	// defaults of DefaultThresholds) and must raise that flag.
	cases := []struct {
		code Code
		edit func(r *dls.Result)
	}{
		{LowIntercept, func(r *dls.Result) { r.Intercept = 0.09 }},
		{HighIntercept, func(r *dls.Result) { r.Intercept = 1.02; r.FarBaseline = 1 }},
		{NoBaseline, func(r *dls.Result) { r.BaselineReached = false }},
		{BaselineOffset, func(r *dls.Result) { r.FarBaseline = 1.006 }}, // 0.65 % of 0.92 > 0.5 %
		{Dust, func(r *dls.Result) { r.Distribution.Intensity = []float64{0.1, 0.74, 0.1, 0.06} }},
		{PoorFit, func(r *dls.Result) { r.SigmaEstimated = false; r.ReducedChi2 = 3.5 }},
		{PoorFit, func(r *dls.Result) { r.DistFitRMS = 4.9e-4 }}, // cumulant rms 1e-3 > 2 × 4.9e-4
		{HighPDI, func(r *dls.Result) { r.PDI = 0.31 }},
		{OutsideWindow, func(r *dls.Result) { r.GammaMeanPerS = 1 / (4e-6) }}, // 4 µs < 5 first lags
		{OutsideWindow, func(r *dls.Result) { r.GammaMeanPerS = 1 / (0.11) }}, // > 10 % of 1 s
		{Multimodal, func(r *dls.Result) { r.Intensity.Peaks = append(r.Intensity.Peaks, dls.Peak{MeanNm: 400, AreaPct: 5}) }},
		{DistMismatch, func(r *dls.Result) { r.DistZAvgNm = 111 }},
		{LowCountRate, func(r *dls.Result) { r.CountRateKcps = 9 }},
		{Failed, func(r *dls.Result) { r.Status = dls.StatusError; r.Message = "x.csv:3: bad" }},
		{Blank, func(r *dls.Result) { r.Role = dls.RoleBlank; r.CountRateKcps = 12 }},
		{BlankScatter, func(r *dls.Result) { r.Role = dls.RoleBlank; r.CountRateKcps = 20.1 }}, // > 20 kcps
	}
	for _, c := range cases {
		r := clean()
		c.edit(r)
		f := Measurement(r, tau, th)
		found := false
		for _, x := range f {
			if x.Code == c.code {
				found = true
			}
		}
		if !found {
			t.Errorf("%s did not fire: %v", c.code, f)
		}
	}
	// Just inside every threshold: quiet.
	r := clean()
	r.Intercept, r.PDI, r.DistZAvgNm, r.CountRateKcps = 0.1, 0.3, 109.99, 10
	r.FarBaseline = 1 + 0.0049*0.1
	if f := Measurement(r, tau, th); len(f) != 0 {
		t.Errorf("values at the thresholds raise %v", f)
	}
}

// TestBlankFlags: a blank at the threshold raises BLANK only, and a blank's
// low count rate is expected, not LOW-COUNT-RATE (common practice: a clean
// dispersant scatters little).
func TestBlankFlags(t *testing.T) {
	cases := []struct {
		kcps float64
		want string
	}{{20, "BLANK"}, {3, "BLANK"}, {25, "BLANK BLANK-SCATTER"}}
	for _, c := range cases {
		r := clean()
		r.Role, r.CountRateKcps, r.ZAvgNm = dls.RoleBlank, c.kcps, 1.3
		var got []string
		for _, f := range Measurement(r, r.Curves.TauS, DefaultThresholds()) {
			if f.Code == Blank || f.Code == BlankScatter || f.Code == LowCountRate {
				got = append(got, string(f.Code))
			}
		}
		if strings.Join(got, " ") != c.want {
			t.Errorf("blank at %g kcps: %v, want %s", c.kcps, got, c.want)
		}
	}
}

func TestDefinitionsCoverCodes(t *testing.T) {
	seen := map[Code]bool{}
	for _, d := range Definitions(DefaultThresholds()) {
		if seen[d.Code] || d.Meaning == "" || d.Threshold == "" {
			t.Errorf("definition %+v duplicated or incomplete", d)
		}
		seen[d.Code] = true
	}
	for _, c := range []Code{LowIntercept, HighIntercept, NoBaseline, BaselineOffset, Dust, PoorFit, HighPDI, OutsideWindow,
		Multimodal, DistMismatch, LowCountRate, Failed, Outlier, FewRuns, HighRSD, NoValidRuns, PeakNoiseMixed, Blank, BlankScatter} {
		if !seen[c] {
			t.Errorf("%s has no definition", c)
		}
	}
}

func TestAggregateStatistics(t *testing.T) {
	// Hand-computed: z = 100, 102, 104 → mean 102, SD = 2 (n − 1),
	// RSD = 1.9608 %; PDI 0.02, 0.04, 0.06 → mean 0.04, SD 0.02.
	var rs []*dls.Result
	for i, z := range []float64{100, 102, 104} {
		r := clean()
		r.ZAvgNm, r.PDI = z, 0.02*float64(i+1)
		rs = append(rs, r)
	}
	other := clean()
	other.Sample = "gold"
	rs = append(rs, other)
	s := Aggregate(dls.Briefs(rs), Options{Thresholds: DefaultThresholds()})
	if len(s) != 2 || s[0].Name != "latex" || s[0].NUsed != 3 {
		t.Fatalf("samples %+v", s)
	}
	a := s[0]
	near := func(got, want, tol float64) bool { return math.Abs(got-want) <= tol }
	if !near(a.ZAvgMeanNm, 102, 1e-12) || !near(a.ZAvgSDNm, 2, 1e-12) || !near(a.ZAvgRSDPct, 100*2.0/102, 1e-12) {
		t.Errorf("z stats %+v", a)
	}
	if !near(a.PDIMean, 0.04, 1e-15) || !near(a.PDISD, 0.02, 1e-15) {
		t.Errorf("pdi stats %.17g %.17g", a.PDIMean, a.PDISD)
	}
	for _, f := range a.Flags {
		if f.Code == Outlier || f.Code == HighRSD || f.Code == FewRuns {
			t.Errorf("unexpected flag %v", f)
		}
	}
	if b := s[1]; b.NUsed != 1 || !hasFlag(b.Flags, FewRuns) {
		t.Errorf("single run: %+v", b)
	}
}

func TestOutlierRule(t *testing.T) {
	// z = 100, 100.4, 99.8, 100.2, 108: median 100.2, MAD 0.2 → robust SD
	// max(1.4826·0.2, 0.5 % of 100.2) = 0.501; 108 is 15.6 SD out, 99.8
	// is 0.8 SD: only 108 is an outlier. Excluding it gives mean 100.1.
	var rs []*dls.Result
	for _, z := range []float64{100, 100.4, 99.8, 100.2, 108} {
		r := clean()
		r.ZAvgNm = z
		rs = append(rs, r)
	}
	for _, excl := range []bool{false, true} {
		s := Aggregate(dls.Briefs(rs), Options{Thresholds: DefaultThresholds(), ExcludeOutliers: excl})[0]
		if len(s.Outliers) != 1 || s.Outliers[0] != 4 || s.OutliersExcluded != excl {
			t.Fatalf("outliers %v (excluded %v)", s.Outliers, s.OutliersExcluded)
		}
		want := (100 + 100.4 + 99.8 + 100.2 + 108) / 5
		if excl {
			want = 100.1
		}
		if math.Abs(s.ZAvgMeanNm-want) > 1e-9 {
			t.Errorf("exclude %v: mean %.6f, want %.6f", excl, s.ZAvgMeanNm, want)
		}
		if !hasFlag(s.Flags, Outlier) {
			t.Error("no OUTLIER flag")
		}
	}
}

func TestAggregateSplitsTemperatures(t *testing.T) {
	a, b := clean(), clean()
	b.TemperatureC = 37
	bad := &dls.Result{Identity: dls.Identity{File: "x.csv", Sample: "latex", Status: dls.StatusError, Message: "x.csv:1: empty", Flags: []dls.Flag{{Code: Failed, Message: "empty"}}}}
	s := Aggregate(dls.Briefs([]*dls.Result{a, b, bad}), Options{Thresholds: DefaultThresholds()})
	if len(s) != 2 || s[0].NRuns != 2 || s[1].NRuns != 1 {
		t.Fatalf("groups %+v", s)
	}
	if !hasFlag(s[0].Flags, Failed) || !strings.Contains(s[0].Flags[0].Message, "x.csv") {
		t.Errorf("failed run not carried to its sample: %+v", s[0].Flags)
	}
}

func hasFlag(f []dls.Flag, code Code) bool {
	for _, x := range f {
		if x.Code == code {
			return true
		}
	}
	return false
}

// TestPeakNoiseMixed: a run whose peak uncertainties fell back to the
// residuals is flagged when at least half of the sample's runs with a
// distribution took the correlator model, and only then; a run that asked
// for the residuals, or one without a distribution, is never flagged.
func TestPeakNoiseMixed(t *testing.T) {
	const m, ind, set = dls.PeakNoiseModel + " (model)", dls.PeakNoiseIndependent, dls.PeakNoiseResidualsSet
	for _, c := range []struct {
		name    string
		noise   []string // "" marks a run without a distribution
		flagged []int
	}{
		{"two of three took the model", []string{m, m, ind}, []int{2}},
		{"one of three took the model", []string{ind, ind, m}, nil},
		{"half, a run without a distribution aside", []string{m, ind, ""}, []int{1}},
		{"all took the model", []string{m, m, m}, nil},
		{"the residuals as set", []string{m, m, set}, nil},
	} {
		var rs []*dls.Result
		for k, n := range c.noise {
			r := clean()
			r.File = fmt.Sprintf("r%d.csv", k+1)
			r.HasDistribution, r.PeakNoise = n != "", n
			rs = append(rs, r)
		}
		s := Aggregate(dls.Briefs(rs), Options{Thresholds: DefaultThresholds()})[0]
		var got []string
		for _, f := range s.Flags {
			if f.Code == PeakNoiseMixed {
				got = append(got, f.Message)
			}
		}
		if len(got) != len(c.flagged) {
			t.Errorf("%s: flags %q, want runs %v", c.name, got, c.flagged)
			continue
		}
		for k, i := range c.flagged {
			if id := rs[i].Brief().RunID(); !strings.HasPrefix(got[k], id+": ") {
				t.Errorf("%s: flag %q, want it on %s", c.name, got[k], id)
			}
		}
	}
}

// TestDuplicateData: runs are told apart by their data (data_sha256), not
// by their files. In a sample of three runs whose third is a copy of the
// first, the copy is flagged DUPLICATE-RUN and left out: two runs used,
// FEW-RUNS at the default 3, the mean over the two. A run with the data of
// another sample's run flags DUPLICATE-DATA on both samples, naming the
// other, and both runs stay in their statistics. Runs without a digest
// (nothing read) are never twins.
func TestDuplicateData(t *testing.T) {
	mk := func(file, sample, data string, z float64) *dls.Result {
		r := clean()
		r.File, r.Sample, r.DataSHA256, r.ZAvgNm = file, sample, data, z
		return r
	}
	rs := []*dls.Result{
		mk("a.csv", "lot A", "d1", 100), mk("b.csv", "lot A", "d2", 102), mk("c.csv", "lot A", "d1", 100), // c copies a
		mk("x.csv", "lot B", "d3", 50), mk("y.csv", "lot B", "d2", 102), // y has b's data
		mk("p.csv", "lot C", "", 80), mk("q.csv", "lot C", "", 80), // no digests
		mk("e.csv", "lot E", "d4", 60), mk("f.csv", "lot F", "d4", 60), mk("g.csv", "lot F", "d4", 60), // F: E's data, twice
	}
	s := Aggregate(dls.Briefs(rs), Options{Thresholds: DefaultThresholds()})
	a, b, c, f := s[0], s[1], s[2], s[4]
	if f.NUsed != 1 || !hasMessage(f.Flags, DuplicateRun, "g.csv: the same data as f.csv") ||
		!hasMessage(f.Flags, DuplicateData, `f.csv: the same data as e.csv (sample "lot E")`) || !hasFlag(s[3].Flags, DuplicateData) {
		t.Errorf("lot F (E's data twice): used %d, flags %v; want g a copy of f, f and E flagged as the same data", f.NUsed, f.Flags)
	}
	if a.NUsed != 2 || !reflect.DeepEqual(a.Used, []int{0, 1}) || math.Abs(a.ZAvgMeanNm-101) > 1e-12 {
		t.Errorf("lot A: used %v (n %d), mean %g; want a and b, mean 101", a.Used, a.NUsed, a.ZAvgMeanNm)
	}
	if !hasMessage(a.Flags, DuplicateRun, "c.csv: the same data as a.csv") || !hasFlag(a.Flags, FewRuns) {
		t.Errorf("lot A flags %v: want DUPLICATE-RUN naming c.csv and a.csv, and FEW-RUNS", a.Flags)
	}
	if !hasMessage(a.Flags, DuplicateData, `b.csv: the same data as y.csv (sample "lot B")`) ||
		!hasMessage(b.Flags, DuplicateData, `y.csv: the same data as b.csv (sample "lot A")`) || b.NUsed != 2 {
		t.Errorf("lots A and B: flags %v / %v, B used %d; want DUPLICATE-DATA on both, naming the other", a.Flags, b.Flags, b.NUsed)
	}
	if hasFlag(c.Flags, DuplicateRun) || hasFlag(c.Flags, DuplicateData) || c.NUsed != 2 {
		t.Errorf("lot C without digests: flags %v, used %d", c.Flags, c.NUsed)
	}
}

func hasMessage(f []dls.Flag, code Code, msg string) bool {
	for _, x := range f {
		if x.Code == code && strings.Contains(x.Message, msg) {
			return true
		}
	}
	return false
}
