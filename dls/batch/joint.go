package batch

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"sync"

	"dlsbatch/contin"
	"dlsbatch/dls"
)

// Tolerances within which the runs of a sample count as one condition for
// the joint analysis (common practice: a repeat on one instrument and
// cell differs in temperature by its control's stability, and not at all
// in angle, wavelength or lag grid). Runs outside them are not joined.
const (
	jointMaxTempSpreadK = 0.5
	jointMaxAngleDeg    = 0.05
	jointMaxRelQ        = 1e-3
)

// JointDistributions gives every sample with at least two used runs that
// have a size distribution the joint distribution of those runs
// (Sample.Joint): the mean of their correlograms analysed as one
// measurement (jointOf). Blanks are
// left out (no size is reported for them). field loads the field run of
// result i, nil when it has none; workers (at least 1) samples are worked
// on at once. Each sample's joint distribution depends on its own runs
// only, so the outcome does not depend on workers. An error of field
// stops the work and is returned.
func JointDistributions(samples []*dls.Sample, field func(i int) (*dls.FieldRun, error), s *Settings, workers int) error {
	if !s.Distribution.Enabled {
		return nil
	}
	workers = max(workers, 1)
	var (
		wg    sync.WaitGroup
		mu    sync.Mutex
		first error
		next  = make(chan *dls.Sample)
	)
	for range workers {
		wg.Go(func() {
			for smp := range next {
				j, err := jointOfSample(smp, field, s)
				mu.Lock()
				if err != nil && first == nil {
					first = err
				}
				mu.Unlock()
				smp.Joint = j
			}
		})
	}
	for _, smp := range samples {
		mu.Lock()
		stop := first != nil
		mu.Unlock()
		if stop {
			break
		}
		if smp.Role == dls.RoleBlank || smp.NUsed < 2 {
			continue
		}
		next <- smp
	}
	close(next)
	wg.Wait()
	return first
}

// jointOfSample loads the field runs of the sample's used runs and analyses
// them together; nil when fewer than two of them have a distribution.
func jointOfSample(smp *dls.Sample, field func(i int) (*dls.FieldRun, error), s *Settings) (*dls.JointDistribution, error) {
	var runs []*dls.FieldRun
	var idx []int
	for _, i := range smp.Used {
		f, err := field(i)
		if err != nil {
			return nil, fmt.Errorf("joint inversion of sample %s: %w", smp.Name, err)
		}
		if f != nil {
			runs = append(runs, f)
			idx = append(idx, i)
		}
	}
	if len(runs) < 2 {
		return nil, nil
	}
	return jointOf(runs, idx, s), nil
}

// jointOf analyses the runs together: the mean of their correlograms at
// each lag, weighted by duration (equal weights unless every run states
// one),
//
//	ȳ_k = Σ_r T_r·y_rk / Σ_r T_r,
//
// is analysed as one measurement (Analyze, with the runs' settings and the
// joint target: jointSettings) of
// the summed duration and the runs' conditions (meanMeasurement). The runs
// must share their lags, angle, wavelength
// and particle index, and lie within jointMaxTempSpreadK and jointMaxRelQ
// of one another; otherwise the result holds only a note saying why.
//
// The correlograms are averaged before the analysis, as one long run
// averages, rather than the runs' field correlations after each became g1
// (the square root of a noisy (g2 − B)/β, whose bias where the signal is
// small an average keeps, with each run's own β and baseline): on
// photon-level samples of three 30 s runs of 50 + 150 nm this resolved
// the pair in 9, 15 and 16 of 20 samples at 50/50 and 10, 16 and 17 at
// 20/80 (default, probability to reject 0.02, GCV), the mean of the field
// correlations in 5, 13 and 15 and 4, 9 and 12, with a second peak in 0, 0
// and 2 of 60 monodisperse samples (DEVELOPERS.md, "Joint inversion of a
// sample's runs"). A σ given with the runs' data is not carried over: the
// mean's is estimated as for data without one. (A σ from the runs'
// scatter, channel by channel and averaged over nine lags, made it worse
// on those samples: 13 and 11 of 20 at 0.02, and a second peak in 2 of 20
// of 200 nm at 90°, against 15, 16 and none.)
func jointOf(runs []*dls.FieldRun, idx []int, s *Settings) *dls.JointDistribution {
	j := &dls.JointDistribution{Runs: idx}
	if why := jointMismatch(runs); why != "" {
		j.Note = why + ": no joint inversion"
		return j
	}
	m, err := meanMeasurement(runs)
	if err != nil {
		j.Note = err.Error() + ": no joint inversion"
		return j
	}
	r := Analyze(m, jointSettings(s))
	switch {
	case r.Status == dls.StatusError:
		j.Note = r.Message + ": no joint inversion"
		return j
	case !r.HasDistribution || r.Distribution == nil:
		why := "no size distribution"
		for _, w := range r.Warnings {
			if strings.HasPrefix(w, "size distribution not computed") {
				why = w
			}
		}
		j.Note = why + ": no joint inversion"
		return j
	}
	j.PeakNoise = r.PeakNoise
	j.Alpha, j.ProbReject, j.DegreesOfFreedom = r.Alpha, r.ProbReject, r.DegreesOfFreedom
	j.DistZAvgNm = r.DistZAvgNm
	j.Intensity, j.Volume, j.Number = r.Intensity, r.Volume, r.Number
	d := r.Distribution
	lo, hi := -1, -1
	for k, v := range d.Intensity {
		if v > 0 {
			if lo < 0 {
				lo = k
			}
			hi = k
		}
	}
	if lo >= 0 {
		j.DiameterNm = append([]float64(nil), d.DiameterNm[lo:hi+1]...)
		for _, v := range d.Intensity[lo : hi+1] {
			j.IntensityPct = append(j.IntensityPct, 100*v)
		}
	}
	if !dls.JointFinite(j) {
		return &dls.JointDistribution{Runs: idx, Note: "the joint inversion gave a value that is not a finite number: no joint inversion"}
	}
	return j
}

// jointSettings is s for the analysis of the runs' mean, which states
// every condition itself (meanMeasurement): no overrides or defaults, and
// with the ProbReject criterion the joint target
// (DistributionSettings.JointTargetProbReject) where one is set.
func jointSettings(s *Settings) *Settings {
	js := *s
	js.Overrides, js.Defaults = nil, nil
	if d := &js.Distribution; d.Contin.Criterion == contin.ProbReject && d.JointTargetProbReject > 0 {
		d.Contin.TargetProbReject = d.JointTargetProbReject
	}
	return &js
}

// meanMeasurement is the measurement jointOf analyses: the mean
// correlogram, with the runs' conditions as their analyses resolved them
// (weighted means of temperature, viscosity and medium index; the first
// run's wavelength, angle and particle index, which jointMismatch found
// shared), the summed duration and the mean count rate, each stated as
// given.
func meanMeasurement(runs []*dls.FieldRun) (*dls.Measurement, error) {
	r0 := runs[0]
	kind, err := dls.ParseCorrKind(r0.Kind)
	if err != nil {
		return nil, fmt.Errorf("correlation kind %q: %w", r0.Kind, err)
	}
	timed, rated := true, true
	for _, r := range runs {
		timed = timed && r.HasDuration && r.DurationS > 0
		rated = rated && r.HasCountRate
	}
	w := make([]float64, len(runs))
	var sw, tC, eta, nMed, dur, rate float64
	for i, r := range runs {
		w[i] = 1 // without every duration, equal weights
		if timed {
			w[i] = r.DurationS
		}
		sw += w[i]
		tC += w[i] * r.TemperatureC
		eta += w[i] * r.ViscosityMPaS
		nMed += w[i] * r.RefractiveIndex
		dur += r.DurationS
		rate += w[i] * r.CountRateKcps
	}
	n := len(r0.TauS)
	m := &dls.Measurement{File: "joint of the sample's runs", Kind: kind, TauS: r0.TauS, Corr: make([]float64, n)}
	for k := range n {
		v := 0.0
		for i, r := range runs {
			v += w[i] * r.Data[k]
		}
		m.Corr[k] = v / sw
	}
	const where = "joint analysis of the sample's runs"
	set := func(key, value string) {
		m.Meta.Set(dls.Param{Key: key, Value: value, Origin: dls.OriginFlag, Where: where})
	}
	num := func(key string, v float64) { set(key, strconv.FormatFloat(v, 'g', -1, 64)) }
	num(dls.KeyTemperatureC, tC/sw)
	num(dls.KeyViscosityMPaS, eta/sw)
	num(dls.KeyRefractiveIndex, nMed/sw)
	num(dls.KeyWavelengthNm, r0.WavelengthNm)
	num(dls.KeyAngleDeg, r0.AngleDeg)
	if ri, _, _ := strings.Cut(r0.ParticleRI, " ("); ri != "" {
		set(dls.KeyParticleRI, ri)
	}
	if timed {
		num(dls.KeyDurationS, dur)
	}
	if rated {
		num(dls.KeyCountRateKcps, rate/sw)
	}
	return m, nil
}

// jointMismatch says how the runs differ beyond one condition; "" when
// they can be joined.
func jointMismatch(runs []*dls.FieldRun) string {
	r0 := runs[0]
	tMin, tMax := r0.TemperatureC, r0.TemperatureC
	for _, r := range runs[1:] {
		switch {
		case len(r.TauS) != len(r0.TauS) || len(r.Data) != len(r.TauS):
			return "the runs have different lag channels"
		case r.Kind != r0.Kind:
			return "the runs' correlation values are of different kinds"
		case math.Abs(r.AngleDeg-r0.AngleDeg) > jointMaxAngleDeg:
			return fmt.Sprintf("the runs were measured at different angles (%g° and %g°)", r0.AngleDeg, r.AngleDeg)
		case r.WavelengthNm != r0.WavelengthNm:
			return fmt.Sprintf("the runs were measured at different wavelengths (%g nm and %g nm)", r0.WavelengthNm, r.WavelengthNm)
		case r.ParticleRI != r0.ParticleRI:
			return "the runs state different particle indices"
		case math.Abs(r.QPerM-r0.QPerM) > jointMaxRelQ*r0.QPerM:
			return "the runs' scattering vectors differ by more than 0.1 % (medium index)"
		}
		for k, t := range r.TauS {
			if t != r0.TauS[k] {
				return "the runs have different lag channels"
			}
		}
		tMin, tMax = math.Min(tMin, r.TemperatureC), math.Max(tMax, r.TemperatureC)
	}
	if tMax-tMin > jointMaxTempSpreadK {
		return fmt.Sprintf("the runs' temperatures span %.2f K, more than %g K", tMax-tMin, jointMaxTempSpreadK)
	}
	return ""
}
