package batch

import (
	"math"
	"os"
	"reflect"
	"strconv"
	"strings"
	"sync"
	"testing"

	"dlsbatch/contin"
	"dlsbatch/dls"
	"dlsbatch/dls/stats"
)

// TestMeanMeasurementWorkedExample checks the mean correlogram against
// the duration-weighted mean of the runs, worked by hand: runs of 10 s and
// 30 s have weights 1/4 and 3/4, so at the first lag (1.8 + 3·1.6)/4 =
// 1.65 and at the second (1.4 + 3·1.2)/4 = 1.25; the mean states the
// summed duration (40 s) and the weighted count rate ((100 + 3·200)/4 =
// 175 kcps), temperature ((25 + 3·25.4)/4 = 25.3 °C) and viscosity
// ((0.89 + 3·0.88)/4 = 0.8825 mPa·s), and the first run's particle index
// without its source; with one duration missing the weights are equal.
// Tolerance 1e-15 relative: a few roundings of double arithmetic.
func TestMeanMeasurementWorkedExample(t *testing.T) {
	runs := []*dls.FieldRun{
		{TemperatureC: 25, ViscosityMPaS: 0.89, RefractiveIndex: 1.332, WavelengthNm: 632.8, AngleDeg: 173, ParticleRI: "1.59+0i (polystyrene)",
			DurationS: 10, HasDuration: true, CountRateKcps: 100, HasCountRate: true, Kind: "g2",
			TauS: []float64{1e-6, 2e-6}, Data: []float64{1.8, 1.4}},
		{TemperatureC: 25.4, ViscosityMPaS: 0.88, RefractiveIndex: 1.332, WavelengthNm: 632.8, AngleDeg: 173, ParticleRI: "1.59+0i (polystyrene)",
			DurationS: 30, HasDuration: true, CountRateKcps: 200, HasCountRate: true, Kind: "g2",
			TauS: []float64{1e-6, 2e-6}, Data: []float64{1.6, 1.2}},
	}
	m, err := meanMeasurement(runs)
	if err != nil {
		t.Fatal(err)
	}
	near := func(got, want float64) bool { return math.Abs(got/want-1) <= 1e-15 }
	if !near(m.Corr[0], 1.65) || !near(m.Corr[1], 1.25) {
		t.Errorf("mean %v, want [1.65 1.25]", m.Corr)
	}
	for key, want := range map[string]float64{dls.KeyDurationS: 40, dls.KeyCountRateKcps: 175, dls.KeyTemperatureC: 25.3,
		dls.KeyViscosityMPaS: 0.8825, dls.KeyRefractiveIndex: 1.332, dls.KeyAngleDeg: 173} {
		got, ok := m.Meta.Get(key)
		v, err := strconv.ParseFloat(got.Value, 64)
		if !ok || err != nil || !near(v, want) {
			t.Errorf("%s = %q, want %g", key, got.Value, want)
		}
	}
	if got, _ := m.Meta.Get(dls.KeyParticleRI); got.Value != "1.59+0i" {
		t.Errorf("particle index %q, want 1.59+0i", got.Value)
	}
	runs[1].HasDuration = false
	if m, err = meanMeasurement(runs); err != nil {
		t.Fatal(err)
	}
	if !near(m.Corr[0], 1.7) {
		t.Errorf("without every duration: mean %v at the first lag, want the plain mean 1.7", m.Corr[0])
	}
	if _, ok := m.Meta.Get(dls.KeyDurationS); ok {
		t.Error("without every duration the mean states one")
	}
}

// simulatedRuns analyses n runs of durS seconds each of one population
// (independent seeds from seed0) and returns their results.
func simulatedRuns(t *testing.T, population string, seed0 uint64, n int, durS float64) []*dls.Result {
	t.Helper()
	s := DefaultSettings()
	out := make([]*dls.Result, n)
	for k := range n {
		out[k] = Analyze(simulatedFor(t, population, seed0+uint64(k), durS), &s)
		if dls.FieldRunOf(out[k]) == nil {
			t.Fatalf("run %d: no field run: %s", k, out[k].Message)
		}
	}
	return out
}

// jointOfResults is the joint distribution of results with the default
// settings.
func jointOfResults(rs []*dls.Result) *dls.JointDistribution {
	s := DefaultSettings()
	var fr []*dls.FieldRun
	var idx []int
	for i, r := range rs {
		fr = append(fr, dls.FieldRunOf(r))
		idx = append(idx, i)
	}
	return jointOf(fr, idx, &s)
}

// TestJointMonodisperse: K runs of one population analysed together carry
// the noise of their mean, about 1/√K of one run's, so the joint peak's
// uncertainty must fall below the runs' median one (its exact ratio also
// depends on the regularisation each solve chooses: the bound is the
// factor 1/√K with room of 2 either way), and its mode must stay at the
// population's median: 100 nm within 5 %, as for one run
// (TestDistributionMonomodal).
func TestJointMonodisperse(t *testing.T) {
	const k = 4
	rs := simulatedRuns(t, "lognormal(100nm,0.15,intensity)", 40, k, 20)
	j := jointOfResults(rs)
	if j.Note != "" || j.Intensity == nil || len(j.Intensity.Peaks) != 1 {
		t.Fatalf("joint: note %q, intensity %+v", j.Note, j.Intensity)
	}
	p := j.Intensity.Peaks[0]
	if math.Abs(p.ModeNm/100-1) > 0.05 {
		t.Errorf("joint mode %.2f nm, want 100 ± 5 %%", p.ModeNm)
	}
	var us []float64
	for _, r := range rs {
		us = append(us, r.Intensity.Peaks[0].MeanUNm)
	}
	med := stats.Median(us)
	ratio := p.MeanUNm / med
	if lo, hi := 0.5/math.Sqrt(k), 2/math.Sqrt(k); !(ratio > lo && ratio < hi) {
		t.Errorf("joint peak u %.3f nm vs runs' median %.3f nm: ratio %.3f, want in (%.3f, %.3f)", p.MeanUNm, med, ratio, lo, hi)
	}
	t.Logf("joint u %.3f nm, runs %v, ratio %.3f", p.MeanUNm, us, ratio)
}

// resolvesPair reports whether peaks resolve two populations of diameters
// a and b (nm): a peak mean within ±25 % of each, the criterion of
// DEVELOPERS.md "Resolution on correlator noise".
func resolvesPair(ps []dls.Peak, a, b float64) bool {
	var hasA, hasB bool
	for _, p := range ps {
		hasA = hasA || math.Abs(p.MeanNm/a-1) <= 0.25
		hasB = hasB || math.Abs(p.MeanNm/b-1) <= 0.25
	}
	return hasA && hasB
}

// TestJointResolvesWhatRunsCannot: two populations at diameter ratio 3
// (50 + 150 nm, equal intensity) in runs of 100 s on the fast simulator.
// A run alone rarely separates them; the joint analysis of ten runs is the
// analysis of their mean, a correlogram of 1,000 s, which does more often
// (one 1,000 s run of these seeds: 2 of 6). A pair counts as resolved with
// a reported peak within ±25 % of each diameter (the criterion of
// DEVELOPERS.md "Resolution on correlator noise"). Eight sets of ten
// runs, measured: the joint analyses resolve 7 of 8 at the joint target
// 0.02 (4 of 8 at the runs' 0.5), the runs alone 7 of 80; the bounds (at
// least 5, at most 12) leave two sets and five runs of room for changes
// that move single seeds.
func TestJointResolvesWhatRunsCannot(t *testing.T) {
	resolved := func(ps []dls.Peak) bool { return resolvesPair(ps, 50, 150) }
	single, joint := 0, 0
	for set := range 8 {
		rs := simulatedRuns(t, "50%mono(50nm)+50%mono(150nm)@intensity", uint64(1000+100*set), 10, 100)
		for _, r := range rs {
			if resolved(r.Intensity.Peaks) {
				single++
			}
		}
		if j := jointOfResults(rs); j.Intensity != nil && resolved(j.Intensity.Peaks) {
			joint++
		}
	}
	t.Logf("joint analyses resolve %d of 8 sets, single runs %d of 80", joint, single)
	if joint < 5 || single > 12 {
		t.Errorf("joint analyses resolve the pair in %d of 8 sets (want ≥ 5), single runs in %d of 80 (want ≤ 12)", joint, single)
	}
}

// TestJointTarget: a sample's joint analysis takes the joint target with
// the probability-to-reject criterion, the runs' target when none is set
// (0), and leaves other criteria alone. On the same runs the weaker target
// must choose a smaller strength: the probability to reject grows with
// the strength (contin's doc), so a lower target is reached earlier.
func TestJointTarget(t *testing.T) {
	for _, c := range []struct {
		name        string
		crit        contin.Criterion
		runs, joint float64
		want        float64
	}{
		{"joint target", contin.ProbReject, 0.5, 0.02, 0.02},
		{"none: the runs' target", contin.ProbReject, 0.3, 0, 0.3},
		{"gcv untouched", contin.GCV, 0.5, 0.02, 0.5},
	} {
		s := DefaultSettings()
		s.Distribution.Contin.Criterion, s.Distribution.Contin.TargetProbReject = c.crit, c.runs
		s.Distribution.JointTargetProbReject = c.joint
		s.Overrides = []dls.Param{{Key: "temperature_c", Value: "30"}}
		js := jointSettings(&s)
		if got := js.Distribution.Contin.TargetProbReject; got != c.want || js.Overrides != nil {
			t.Errorf("%s: target %g, overrides %v; want %g and none", c.name, got, js.Overrides, c.want)
		}
		if s.Distribution.Contin.TargetProbReject != c.runs {
			t.Errorf("%s: the runs' settings changed", c.name)
		}
	}
	rs := simulatedRuns(t, "50%mono(50nm)+50%mono(150nm)@intensity", 1200, 3, 100)
	var fr []*dls.FieldRun
	for _, r := range rs {
		fr = append(fr, dls.FieldRunOf(r))
	}
	alpha := func(target float64) float64 {
		s := DefaultSettings()
		s.Distribution.JointTargetProbReject = target
		j := jointOf(fr, []int{0, 1, 2}, &s)
		if j.Note != "" {
			t.Fatalf("target %g: %s", target, j.Note)
		}
		return j.Alpha
	}
	if weak, runs := alpha(0.02), alpha(0); !(weak < runs) {
		t.Errorf("joint α at target 0.02 is %g, at the runs' 0.5 %g: want the weaker target's smaller", weak, runs)
	}
}

// TestJointMismatch: runs that are not one condition are not joined, and
// the note says why.
func TestJointMismatch(t *testing.T) {
	base := func() *dls.FieldRun {
		return &dls.FieldRun{TemperatureC: 25, ViscosityMPaS: 0.89, RefractiveIndex: 1.332, WavelengthNm: 632.8, AngleDeg: 173,
			QPerM: 2.64e7, ParticleRI: "1.59+0i", Kind: "g2",
			TauS: []float64{1e-6, 2e-6, 4e-6}, Data: []float64{1.8, 1.6, 1.3}}
	}
	for _, c := range []struct {
		name   string
		change func(f *dls.FieldRun)
		want   string
	}{
		{"angle", func(f *dls.FieldRun) { f.AngleDeg = 90 }, "different angles"},
		{"wavelength", func(f *dls.FieldRun) { f.WavelengthNm = 532 }, "different wavelengths"},
		{"lags", func(f *dls.FieldRun) { f.TauS = []float64{1e-6, 2e-6, 5e-6} }, "different lag channels"},
		{"channels", func(f *dls.FieldRun) { f.TauS, f.Data = f.TauS[1:], f.Data[1:] }, "different lag channels"},
		{"kind", func(f *dls.FieldRun) { f.Kind = "g2m1" }, "different kinds"},
		{"index", func(f *dls.FieldRun) { f.ParticleRI = "1.45+0i" }, "particle indices"},
		{"q", func(f *dls.FieldRun) { f.QPerM *= 1.01 }, "scattering vectors"},
		{"temperature", func(f *dls.FieldRun) { f.TemperatureC = 25.6 }, "temperatures span 0.60 K"},
	} {
		t.Run(c.name, func(t *testing.T) {
			b := base()
			c.change(b)
			s := DefaultSettings()
			j := jointOf([]*dls.FieldRun{base(), b}, []int{0, 1}, &s)
			if !strings.Contains(j.Note, c.want) || j.Intensity != nil {
				t.Errorf("note %q (intensity %v), want one saying %q", j.Note, j.Intensity, c.want)
			}
		})
	}
	if why := jointMismatch([]*dls.FieldRun{base(), base()}); why != "" {
		t.Errorf("identical runs: %q, want no mismatch", why)
	}
}

// TestJointDistributionsSamples: blanks and samples with fewer than two
// used runs get no joint distribution; the others get the same one
// whatever the number of workers.
func TestJointDistributionsSamples(t *testing.T) {
	rs := simulatedRuns(t, "lognormal(100nm,0.15,intensity)", 60, 4, 20)
	field := func(i int) (*dls.FieldRun, error) { return dls.FieldRunOf(rs[i]), nil }
	mk := func() []*dls.Sample {
		return []*dls.Sample{
			{Name: "a", Role: dls.RoleSample, Used: []int{0, 1, 2}, NUsed: 3},
			{Name: "blank", Role: dls.RoleBlank, Used: []int{0, 1}, NUsed: 2},
			{Name: "one", Role: dls.RoleSample, Used: []int{3}, NUsed: 1},
			{Name: "b", Role: dls.RoleReference, Used: []int{1, 3}, NUsed: 2},
		}
	}
	s := DefaultSettings()
	one, two := mk(), mk()
	if err := JointDistributions(one, field, &s, 1); err != nil {
		t.Fatal(err)
	}
	if err := JointDistributions(two, field, &s, 2); err != nil {
		t.Fatal(err)
	}
	for k, want := range []bool{true, false, false, true} {
		if got := one[k].Joint != nil; got != want {
			t.Errorf("sample %s: joint %v, want %v", one[k].Name, got, want)
		}
		if !reflect.DeepEqual(one[k].Joint, two[k].Joint) {
			t.Errorf("sample %s: joint differs between 1 and 2 workers", one[k].Name)
		}
	}
	if j := one[0].Joint; j != nil && !reflect.DeepEqual(j.Runs, []int{0, 1, 2}) {
		t.Errorf("runs %v, want [0 1 2]", j.Runs)
	}
}

// TestJointPeakUncertaintyPhoton: the joint analysis's peak takes the
// noise of the mean of its runs from the correlator model of the mean (as
// one run's analysis does), so its stated uncertainty matches the scatter
// of joint peaks across samples: 12 samples of three photon-level runs of
// 1 s (100 nm, 173°, 300 kcps; each run's channels correlated as a
// correlator's). The rms of (mean − average)/u over the samples is 1 for a
// right uncertainty, and for 12 standard normal values lies in 0.55–1.8
// with probability above 0.99 (χ² with 11 degrees of freedom, quantiles
// 2.6 and 35.6 of Pearson and Hartley, Biometrika Tables for
// Statisticians, 1966, Table 8); measured 1.41 (one run alone: 1.1–1.4,
// TestPeakUncertaintyPhotonShort), and the bound 0.55–2.0 holds it within
// a factor of 2 of right. The residual-based uncertainty must show the
// fault (rms above 2.5; measured 7.4), so that the test is about
// something.
func TestJointPeakUncertaintyPhoton(t *testing.T) {
	const samples, runs = 12, 3
	ms := peakRuns(t, peakCondition{pop: "mono(100nm)", angleDeg: 173, durS: 1, rateHz: 3e5, runs: samples * runs, seed: 23, photon: true})
	s := DefaultSettings()
	field := make([]*dls.FieldRun, len(ms))
	for i, m := range ms {
		field[i] = dls.FieldRunOf(Analyze(m, &s))
		if field[i] == nil {
			t.Fatalf("%s: no field run", m.File)
		}
	}
	rmsZ := func(model bool) (z float64, n int) {
		js := s
		if !model {
			js.Distribution.PeakNoise = PeakNoiseResiduals // the residual-based uncertainty for every peak
		}
		var means, us []float64
		for k := range samples {
			j := jointOf(field[k*runs:(k+1)*runs], []int{0, 1, 2}, &js)
			if j.Intensity == nil || len(j.Intensity.Peaks) == 0 {
				t.Fatalf("sample %d: no joint peak: %s", k, j.Note)
			}
			if model != strings.HasPrefix(j.PeakNoise, dls.PeakNoiseModel) {
				continue // a mean whose residuals fell below the gate
			}
			p := j.Intensity.Peaks[0]
			for _, q := range j.Intensity.Peaks[1:] {
				if q.AreaPct > p.AreaPct {
					p = q
				}
			}
			means, us = append(means, p.MeanNm), append(us, p.MeanUNm)
		}
		return scatterZ(means, us), len(means)
	}
	zm, n := rmsZ(true)
	t.Logf("correlator model: rms z %.2f over %d samples", zm, n)
	if n < 8 || !(zm >= 0.55 && zm <= 2) {
		t.Errorf("joint peak, correlator model: rms z %.2f over %d samples; want 0.55–2 over at least 8", zm, n)
	}
	zr, nr := rmsZ(false)
	t.Logf("residuals: rms z %.2f over %d samples", zr, nr)
	if !(zr > 2.5) {
		t.Errorf("joint peak, residual-based: rms z %.2f; the runs do not show what the test is about", zr)
	}
}

// TestJointResolutionPhotonLong checks the joint target on photon-level
// samples of three runs each (set DLSBATCH_LONG=1; about three minutes
// on two cores), with seeds of their own, apart from the sets that set the
// target: two populations at diameter ratio 3 (50 + 150 nm, 50/50 and
// 20/80 by intensity, 30 s runs at 300 kcps, 173°), resolved by the joint
// analysis when it shows a peak within ±25 % of each diameter, and 40
// monodisperse samples of 100 nm (10 s runs), counted when they show a
// second joint peak. On the two sets that set the target the pairs were
// resolved in 32 of 40 samples at both shares (80 %; the goal is 70 %)
// and 4 of 160 monodisperse samples had a second peak (2.5 %; the goal
// at most 5 %). Twenty samples per pair cannot tell 70 % from 80 %
// (binomial SD 9–10 points), so the bounds guard against a regression,
// two binomial SDs from the measured rates: at least 12 of 20 resolved,
// at most 4 of 40 with a second peak. The counts measured here go into
// DEVELOPERS.md's pooled figures.
func TestJointResolutionPhotonLong(t *testing.T) {
	if testing.Short() || os.Getenv("DLSBATCH_LONG") == "" {
		t.Skip("set DLSBATCH_LONG=1 for the long photon-level joint resolution check")
	}
	s := DefaultSettings()
	joint := func(c peakCondition) *dls.JointDistribution {
		ms := peakRuns(t, c)
		field := make([]*dls.FieldRun, len(ms))
		for i, m := range ms {
			if field[i] = dls.FieldRunOf(Analyze(m, &s)); field[i] == nil {
				t.Fatalf("%s seed %d run %d: no field run", c.pop, c.seed, i)
			}
		}
		return jointOf(field, []int{0, 1, 2}, &s)
	}
	// Samples in parallel, each result in its own slot.
	each := func(n int, cond func(k int) peakCondition) []*dls.JointDistribution {
		out := make([]*dls.JointDistribution, n)
		var wg sync.WaitGroup
		next := make(chan int)
		for range 2 {
			wg.Go(func() {
				for k := range next {
					out[k] = joint(cond(k))
				}
			})
		}
		for k := range n {
			next <- k
		}
		close(next)
		wg.Wait()
		return out
	}
	for i, pop := range []string{"50%mono(50nm)+50%mono(150nm)@intensity", "20%mono(50nm)+80%mono(150nm)@intensity"} {
		js := each(20, func(k int) peakCondition {
			return peakCondition{pop: pop, angleDeg: 173, durS: 30, rateHz: 3e5, runs: 3, seed: uint64(61000 + 1000*i + k), photon: true}
		})
		resolved := 0
		for _, j := range js {
			if j.Intensity != nil && resolvesPair(j.Intensity.Peaks, 50, 150) {
				resolved++
			}
		}
		t.Logf("%s: the joint analysis resolves %d of 20 samples", pop, resolved)
		if resolved < 12 {
			t.Errorf("%s: the joint analysis resolves %d of 20 samples, want at least 12", pop, resolved)
		}
	}
	js := each(40, func(k int) peakCondition {
		return peakCondition{pop: "mono(100nm)", angleDeg: 173, durS: 10, rateHz: 3e5, runs: 3, seed: uint64(63000 + k), photon: true}
	})
	second := 0
	for _, j := range js {
		if j.Intensity != nil && len(j.Intensity.Peaks) > 1 {
			second++
		}
	}
	t.Logf("mono 100 nm: a second joint peak in %d of 40 samples", second)
	if second > 4 {
		t.Errorf("mono 100 nm: a second joint peak in %d of 40 samples, want at most 4", second)
	}
}
