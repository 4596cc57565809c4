package batch

import (
	"fmt"
	"math"
	"strings"
	"sync"

	"dlsbatch/contin"
	"dlsbatch/cumulants"
	"dlsbatch/dls"
	"dlsbatch/dls/mie"
	"dlsbatch/dls/sizedist"
)

// Tolerances within which the runs of a sample count as one condition for
// the joint inversion (common practice: a repeat on one instrument and
// cell differs in temperature by its control's stability, and not at all
// in angle, wavelength or lag grid). Runs outside them are not joined.
const (
	jointMaxTempSpreadK = 0.5
	jointMaxAngleDeg    = 0.05
	jointMaxRelQ        = 1e-3
)

// JointDistributions gives every sample with at least two used runs that
// have a size distribution the joint distribution of those runs
// (Sample.Joint): their field correlations averaged with inverse-variance
// weights, channel by channel, and inverted once (jointOf). Blanks are
// left out (no size is reported for them). field loads the field run of
// result i, nil when it has none; workers (at least 1) samples are worked
// on at once. Each sample's joint distribution depends on its own runs
// only, so the outcome does not depend on workers. An error of field
// stops the work and is returned.
func JointDistributions(samples []*dls.Sample, field func(i int) (*dls.FieldRun, error), s *DistributionSettings, workers int) error {
	if !s.Enabled {
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

// jointOfSample loads the field runs of the sample's used runs and inverts
// them together; nil when fewer than two of them have a distribution.
func jointOfSample(smp *dls.Sample, field func(i int) (*dls.FieldRun, error), s *DistributionSettings) (*dls.JointDistribution, error) {
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

// jointOf inverts the field runs together. The runs must share the lag
// channels, angle, wavelength and particle index, and lie within
// jointMaxTempSpreadK and jointMaxRelQ of one another; otherwise the
// result holds only a note saying why. The mean field correlation at each
// channel k is
//
//	ḡ_k = Σ_r g_rk/σ_rk² / Σ_r 1/σ_rk²,   σ̄_k = (Σ_r 1/σ_rk²)^(−1/2),
//
// the maximum-likelihood estimate from independent runs with Gaussian
// noise (runs are independent measurements; the correlation of the noise
// along the lag axis within a run stays as it is in each run's σ). It is
// inverted with the runs' mean temperature, viscosity and q, and the
// settings of the runs' second pass (whose targets the field runs hold).
func jointOf(runs []*dls.FieldRun, idx []int, s *DistributionSettings) *dls.JointDistribution {
	j := &dls.JointDistribution{Runs: idx}
	if why := jointMismatch(runs); why != "" {
		j.Note = why + ": no joint inversion"
		return j
	}
	g1, sg := meanField(runs)
	var tC, etaMPaS, nMed, gamma, pdi float64
	for _, r := range runs {
		tC += r.TemperatureC
		etaMPaS += r.ViscosityMPaS
		nMed += r.RefractiveIndex
		gamma += r.GammaMeanPerS
		pdi += r.PDI
	}
	m := float64(len(runs))
	tC, etaMPaS, nMed, gamma, pdi = tC/m, etaMPaS/m, nMed/m, gamma/m, pdi/m
	tK, etaPaS := dls.KelvinFromCelsius(tC), etaMPaS*1e-3
	optics := dls.Optics{WavelengthM: runs[0].WavelengthNm * 1e-9, AngleRad: runs[0].AngleDeg * math.Pi / 180, RefractiveIndex: nMed}
	mPart, err := runIndex(runs[0].ParticleRI)
	if err != nil {
		j.Note = "particle index: " + err.Error() + ": no joint inversion"
		return j
	}
	tau := runs[0].TauS
	gs := sizeBoundedGrid(s.Grid, tau, tK, etaPaS, optics.Q())
	grid, err := s.grid(tau, &gs)
	if err != nil {
		j.Note = err.Error() + ": no joint inversion"
		return j
	}
	// The free constant column stays (when the settings have it) even where
	// every run reached its baseline, unlike a run's inversion: the mean's
	// σ is √n times smaller than a run's, while what the runs' far-channel
	// baselines share of their error is not, so without the column it
	// would be fitted by the grid's slowest rates (measured on photon-level
	// monodisperse samples of three runs, 100 nm for 10 s and 200 nm at 90°
	// for 30 s: a second peak in 2 of 50 joint inversions without it, none
	// with it; the ratio-3 pairs of DEVELOPERS.md lose 1 of 40).
	cs := s.Contin
	cs.Start = cumulantStart(grid.GammaPerS(), &cumulants.Result{GammaPerS: gamma, PDI: pdi})
	inv, err := contin.Invert(grid, g1, sg, &cs)
	if err != nil {
		j.Note = err.Error() + ": no joint inversion"
		return j
	}
	d, err := sizedist.New(sizedist.Input{
		GammaPerS: inv.GammaPerS, Amplitude: inv.Amplitude, TempK: tK, ViscosityPaS: etaPaS,
		Optics: optics, ParticleIndex: mPart, Polarization: s.Polarization, Cache: s.MieCache,
	})
	if err != nil {
		j.Note = err.Error() + ": no joint inversion"
		return j
	}
	j.Alpha, j.ProbReject, j.DegreesOfFreedom = inv.Alpha, inv.ProbReject, inv.DegreesOfFreedom
	if mean := contin.PeaksMeanPerS(contin.Peaks(inv.GammaPerS, inv.Amplitude, &s.Peaks)); mean > 0 {
		j.DistZAvgNm = dls.DiameterFromDiffusion(tK, etaPaS, dls.DiffusionFromRate(mean, optics.Q())) * 1e9
	}
	sens, _ := contin.NewSensitivity(grid, inv, sg, &cs) // nil: peaks without uncertainties
	if sens != nil {
		j.PeakNoise = "residuals"
		if sens.ResidualCorrelation() < minCorrelatorRho {
			j.PeakNoise = "residuals (independent from lag to lag)"
		} else if noise := meanNoise(runs); noise != nil {
			sens.Noise = noise
			j.PeakNoise = "correlator model (mean of the runs)"
		}
	}
	j.Intensity, j.Volume, j.Number = summariseWeightings(d, inv.Amplitude, sens, &s.Peaks)
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

// meanNoise returns the quadratic form g ↦ g'·C̄·g of the noise
// covariance of meanField's mean under the runs' correlator models, nil
// unless every run has one (dls.FieldNoise). The runs' noises are
// independent, and the mean at channel k is Σ_r a_rk·g_rk with
// a_rk = σ_rk⁻²/Σ_s σ_sk⁻², so C̄ = Σ_r A_r·C_r·A_r (A_r = diag(a_r)) and
// g'·C̄·g = Σ_r (a_r∘g)'·C_r·(a_r∘g): each run's model rebuilt
// (cumulants.NewChannelNoise) and evaluated at its share of g. jointOf
// takes it, as a run's inversion takes its own, when the joint
// inversion's standardised residuals are correlated from lag to lag.
// Without it the joint peaks took the residual-based uncertainty, which
// the channels' correlated noise makes too small: at GCV the joint
// inversion of three 10 s photon-level runs showed a second peak in 9 of
// 60 monodisperse samples, with it in 2 (DEVELOPERS.md, "Joint inversion
// of a sample's runs").
func meanNoise(runs []*dls.FieldRun) func([]float64) float64 {
	n := len(runs[0].TauS)
	cns := make([]*cumulants.ChannelNoise, len(runs))
	for i, r := range runs {
		nz := r.Noise
		if nz == nil || len(nz.G1Sigma) != n || len(r.TauS) != n {
			return nil
		}
		tau, from := r.TauS, 0
		if nz.PrevLagS > 0 {
			tau, from = append([]float64{nz.PrevLagS}, r.TauS...), 1
		}
		cn, err := cumulants.NewChannelNoise(tau, from, nz.GammaPerS, nz.Beta, nz.CountRatePerS, nz.G1Sigma)
		if err != nil {
			return nil
		}
		cns[i] = cn
	}
	share := make([][]float64, len(runs))
	for i := range share {
		share[i] = make([]float64, n)
	}
	for k := range n {
		var w float64
		for _, r := range runs {
			w += 1 / (r.G1Sigma[k] * r.G1Sigma[k])
		}
		for i, r := range runs {
			if w > 0 {
				share[i][k] = 1 / (r.G1Sigma[k] * r.G1Sigma[k]) / w
			}
		}
	}
	v := make([]float64, n)
	return func(g []float64) float64 {
		q := 0.0
		for i, cn := range cns {
			for k, x := range g {
				v[k] = share[i][k] * x
			}
			q += cn.Quad(v)
		}
		return q
	}
}

// meanField is the inverse-variance weighted mean of the runs' field
// correlations at each channel and its standard deviation (the runs share
// their channels: jointMismatch).
func meanField(runs []*dls.FieldRun) (g1, sigma []float64) {
	n := len(runs[0].TauS)
	g1 = make([]float64, n)
	sigma = make([]float64, n)
	for k := range n {
		var w, wg float64
		for _, r := range runs {
			wk := 1 / (r.G1Sigma[k] * r.G1Sigma[k])
			w += wk
			wg += wk * r.G1[k]
		}
		g1[k], sigma[k] = wg/w, 1/math.Sqrt(w)
	}
	return g1, sigma
}

// jointMismatch says how the runs differ beyond one condition; "" when
// they can be joined.
func jointMismatch(runs []*dls.FieldRun) string {
	r0 := runs[0]
	tMin, tMax := r0.TemperatureC, r0.TemperatureC
	for _, r := range runs[1:] {
		switch {
		case len(r.TauS) != len(r0.TauS):
			return "the runs' inversions used different lag channels"
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
				return "the runs' inversions used different lag channels"
			}
		}
		tMin, tMax = math.Min(tMin, r.TemperatureC), math.Max(tMax, r.TemperatureC)
	}
	if tMax-tMin > jointMaxTempSpreadK {
		return fmt.Sprintf("the runs' temperatures span %.2f K, more than %g K", tMax-tMin, jointMaxTempSpreadK)
	}
	return ""
}

// runIndex reads the particle index as a result states it: the complex
// index, followed for a material of the Mie table by its name and source
// in parentheses.
func runIndex(text string) (complex128, error) {
	if i := strings.Index(text, " ("); i >= 0 {
		text = text[:i]
	}
	return mie.ParseComplexIndex(text)
}
