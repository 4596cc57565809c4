package sim

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
)

// Photon-level simulation. Photon draws the scattered field, the photon
// counts and the correlator's estimate step by step, so the noise has the
// structure a real correlator's has (strongly correlated from channel to
// channel, non-Gaussian at low counts), where Simulate draws independent
// Gaussian noise per channel.
//
// Field. Every discrete rate Γ_i of the population (see below) carries a
// complex Gaussian (Ornstein–Uhlenbeck) field z_i with E|z_i|² = w_i, its
// intensity weight, advanced exactly on a time step h: for the real and the
// imaginary part separately
//
//	x(t+h) = a·x(t) + √((1 − a²)·w_i/2)·ξ,   a = exp(−Γ_i·h),  ξ ~ N(0, 1)
//
// which gives E[z_i(t)·z_i*(t+τ)] = w_i·exp(−Γ_i·τ) exactly. The fields of
// the rates are independent and add, E = Σ z_i, so g1(τ) = Σ w_i·exp(−Γ_i·τ)
// is the intensity-weighted mixture. The state is drawn from the stationary
// distribution at the start and runs on through all sub-runs.
//
// Coherence. β < 1 is realised by A = ⌈1/β⌉ independent speckle (coherence)
// areas seen at once: I = Σ_a c_a·|E_a|² with Σ c_a = 1, each E_a an
// independent copy of the field above. Then ⟨I⟩ = 1 and, by the moment
// theorem for Gaussian fields, ⟨I(t)I(t+τ)⟩ = 1 + Σ c_a²·g1(τ)², so
// β = Σ c_a². For β = 1/A the areas are equal; otherwise A − 1 of them carry
// c = (1 − √(1 − A(1−β)/(A−1)))/A each and the last the rest (β = 0.9: two
// areas, 0.947 and 0.053). This keeps the speckle noise of a detector that
// sees several coherence areas; the cost grows with A. The higher
// cumulants of I are 2·Σc_a³ and 6·Σc_a⁴ times the cyclic products of g1:
// for β = 1/A those of the gamma law with M = 1/β degrees of freedom
// (Goodman's approximation for integrated speckle, assumed by the fast
// model); otherwise slightly larger (β = 0.9: Σc³/β² = 1.05, Σc⁴/β³ = 1.10),
// which raises the speckle noise in the decay by a few per cent. A second, separate
// way to lower the intercept is BackgroundHz, an incoherent constant
// intensity (dark counts, stray or fluorescent light): the measured
// intercept is then β·(r/(r + b))².
//
// Polydispersity. A monodisperse component is one rate. A lognormal
// component is replaced by K discrete rates: the K-point Gauss quadrature
// rule of the intensity-weighted distribution of ln Γ, computed from the
// model's 161 size nodes by the Stieltjes procedure and the eigenvalues of
// the Jacobi matrix (Golub & Welsch 1969); the rule reproduces
// Σ w·(ln Γ)^j for j < 2K. By default K is the smallest in 2 … 12 whose g1
// stays within 1e-4 of the full quadrature's (NodesPerComponent forces a
// K). Measured (see the tests), K = 6 gives g1 within 1e-7 for a lognormal
// of width 0.31 (PDI 0.1), 4e-5 for PDI 0.43 and 1e-3 for the widest
// allowed (width 1.0 by intensity, PDI 1.7), with Γ̄ within 1e-6; a Gauss
// rule in Γ itself would keep Γ̄ and μ2 exact but misses g1 by 1e-2 on the
// wide ones, because exp(−Γτ) is far from a polynomial in Γ over a wide
// spread. The cost grows with the number of rates.
//
// Detection. The intensity is sampled once per field step (Substeps steps
// per base bin, default 1) and averaged over the bin; within a bin the
// photon arrivals are a Poisson process of rate r·I + b (r = CountRateHz,
// b = BackgroundHz). The arrivals are drawn one by one by the time change
// of a unit-rate Poisson process (an arrival when the integrated mean count
// reaches the next standard exponential deviate, so an empty bin draws no
// random number), which allows the two detector artefacts:
//
//   - dead time (DeadTimeS = τ_d, non-paralysable): after a recorded count
//     the detector ignores arrivals for τ_d, also across bin boundaries. For
//     a constant rate λ the recorded rate is λ/(1 + λ·τ_d); with the
//     intensity constant within a bin (the approximation of this model) the
//     mean recorded rate is E[λ/(1 + λ·τ_d)] over the intensity
//     distribution, and the compression of the intensity fluctuations
//     lowers the intercept, for β = 1 by the factor 1 − 4·r·τ_d to first
//     order.
//   - afterpulsing (AfterpulseProb = p, AfterpulseDelayS = τ_a): every
//     recorded primary count is followed, with probability p, by one extra
//     count after an exponentially distributed delay of mean τ_a, in the
//     same bin or a later one (delays beyond 1024 bins are dropped).
//     Afterpulses are not blocked by the dead time and have no afterpulses
//     of their own. They add p·q_k/(ν·(1 + p)²) to g2 at lag k base bins,
//     with ν the mean primary counts per bin and
//     q_k = (τ_a/Δt)·4·sinh²(Δt/(2τ_a))·exp(−k·Δt/τ_a) the chance that an
//     afterpulse lands k bins after its primary.
//
// Correlation. The counts go through a Correlator on the lag grid (its DtS
// is the base bin); the duration is split into SubRuns equal sub-runs, the
// correlator is reset between them, and each gives a correlogram.
//
// Exact. The expected g2 of the ideal detector (no dead time, no
// afterpulsing) for this discretisation: a stage-s channel at lag index k
// averages L = 2^s·Substeps intensity samples h apart per bin, so
//
//	g2 − 1 = β_eff·Σ_ij w_i w_j·y^(kL−L+1)·[(1 − y^L)/(1 − y)]²/L²,  y = exp(−(Γ_i+Γ_j)·h)
//
// the average of g1² over the pair of bins (it tends to β_eff·g1(τ)² as
// Γ·2^s·Δt → 0). Not included is the bias of the ratio estimator itself
// over a sub-run of length T, of order ∫g1²/T: for one rate and β = 1
// about −2/(ΓT) at the first lags and −1/(ΓT) at the baseline (its
// second-order form is in the tests), negligible for Γ·T ≳ 10⁴ but
// several standard errors when many short sub-runs are averaged.
//
// Randomness. Three PCG streams (math/rand/v2) seeded from Seed: the
// field, the photon arrivals and the afterpulses. Runs that differ only in
// the detector (dead time, afterpulsing, background) therefore see the same
// intensity, and with the same arrivals runs that differ only in dead time
// or afterpulsing see the same primary photons. All counting is in
// integers; the same config and seed give the same bytes on one GOARCH
// (compilers for some other architectures may fuse multiply-adds).
//
// Cost. Per base bin 2·A·(rates)·Substeps normal deviates (buffered
// ziggurat), one exponential deviate per arrival and the correlator's
// update; nothing is allocated per bin. BenchmarkPhoton (1e6 bins at
// Δt = 1 µs, 200 kcps, GOMAXPROCS=1, 2-core EPYC VM shared with other work,
// so ±20 %): 39 ns per base bin for one rate and one area (β = 1), 40 with
// dead time and afterpulsing, 55 for β = 0.9 (two areas), 60–70 for a
// lognormal of width 0.31 (3 rates), 75–100 for two rates at β = 0.9. A
// 10 s run at Δt = 1 µs thus takes 0.4–0.6 s for a monodisperse sample, and
// 200 runs of 20 s about 3–4 minutes on one core (half that at Δt = 2 µs).
//
// References: J. W. Goodman, Statistical Optics, Wiley, 1985 (moment theorem,
// speckle statistics; from memory); B. J. Berne, R. Pecora, Dynamic Light
// Scattering, Wiley, 1976 (Siegert relation); G. H. Golub, J. H. Welsch,
// "Calculation of Gauss quadrature rules", Math. Comp. 23, 221–230 (1969);
// K. Schätzel, "Noise on photon correlation data. I. Autocorrelation
// functions", Quantum Opt. 2, 287–305 (1990) (from memory); G. F. Knoll,
// Radiation Detection and Measurement, Wiley, 2000 (non-paralysable dead
// time; from memory).

// PhotonConfig holds the settings of a photon-level simulation. Start from
// DefaultPhotonConfig; zero fields take the defaults in brackets.
type PhotonConfig struct {
	// Grid is the lag grid; its DtS is the base bin Δt of the counts. nil
	// means Δt = 1 µs, 8 channels per stage and the longest lag at most a
	// tenth of a sub-run.
	Grid *Grid
	// Beta is the coherence factor β of the scattered light, in [1/64, 1].
	Beta float64
	// CountRateHz is the mean rate of scattered photons reaching the
	// detector, before dead time, counts/s.
	CountRateHz float64
	// BackgroundHz is the rate of incoherent background counts (dark
	// counts, stray light), counts/s [0].
	BackgroundHz float64
	// DurationS is the whole measurement, s; it is split into SubRuns equal
	// sub-runs, each longer than the longest lag.
	DurationS float64
	// SubRuns is the number of sub-runs [1].
	SubRuns int
	// DeadTimeS is the non-paralysable dead time of the detector, s [0].
	DeadTimeS float64
	// AfterpulseProb is the probability that a recorded count is followed
	// by an afterpulse [0].
	AfterpulseProb float64
	// AfterpulseDelayS is the mean delay of an afterpulse, s [Δt/2].
	AfterpulseDelayS float64
	// NodesPerComponent is the number of discrete rates that stand for one
	// lognormal component [0: the fewest, 2 … 12, whose g1 is within 1e-4
	// of the full quadrature's].
	NodesPerComponent int
	// Substeps is the number of field steps per base bin [1]; more make the
	// bin's intensity an integral rather than a sample, at a proportional
	// cost, which matters only when Γ·Δt is not small.
	Substeps int
	// Seed seeds the generators.
	Seed uint64
}

// DefaultPhotonConfig is β = 0.9, 200 kcps, one run of 10 s at Δt = 1 µs
// (the default grid), an ideal detector and seed 1.
func DefaultPhotonConfig() PhotonConfig {
	return PhotonConfig{Beta: 0.9, CountRateHz: 2e5, DurationS: 10, SubRuns: 1, Seed: 1}
}

// PhotonRun is one sub-run of a photon-level simulation.
type PhotonRun struct {
	G2          []float64 // symmetrically normalised g2, one value per lag
	Counts      int64     // recorded counts (scattered, background and afterpulses)
	CountRateHz float64   // Counts over the sub-run's duration, counts/s
}

// PhotonRate is one discrete decay rate of the simulated field.
type PhotonRate struct {
	RatePerS  float64 // field decay rate Γ, 1/s
	Intensity float64 // intensity weight; all rates add up to 1
	Component int     // index of the population component
}

// PhotonResult is the result of Photon.
type PhotonResult struct {
	TauS    []float64   // lag times, s
	SubRuns []PhotonRun // one correlogram per sub-run
	// Mean is the mean g2 of the sub-runs and SEM its standard error (the
	// standard deviation over the sub-runs divided by √R); SEM is nil for
	// a single sub-run.
	Mean, SEM []float64
	// Exact is the expected g2 of an ideal detector (no dead time or
	// afterpulsing) for this discretisation, with the background.
	Exact []float64
	// BetaEff is the intercept of Exact: β·(r/(r + b))².
	BetaEff float64
	// Rates are the discrete rates the field was built from.
	Rates []PhotonRate
	// Areas are the intensity shares of the coherence areas (Σ c² = β).
	Areas []float64
	// BinS is the base bin and BinsPerSubRun the bins of one sub-run.
	BinS          float64
	BinsPerSubRun int64
	Truth         Truth // exact cumulants of the population (full quadrature)
}

// Limits of the photon simulation.
const (
	photonMaxSubRuns     = 10000
	photonMaxNodes       = 16
	photonMaxSubsteps    = 64
	photonMaxCountsBin   = 1000 // mean counts per base bin
	photonMaxCountsRun   = 1e9  // mean counts per sub-run (int64 products stay exact)
	photonMaxBins        = 1e11
	photonAfterpulseRing = 1024 // bins; a power of two
	photonMinBeta        = 1.0 / 64
)

// photonDefaults returns c with its zero fields filled in and the grid.
func photonDefaults(c PhotonConfig) (PhotonConfig, *Grid, error) {
	if c.SubRuns == 0 {
		c.SubRuns = 1
	}
	if c.Substeps == 0 {
		c.Substeps = 1
	}
	switch {
	case c.SubRuns < 1 || c.SubRuns > photonMaxSubRuns:
		return c, nil, fmt.Errorf("sub-run count %d is outside 1…%d", c.SubRuns, photonMaxSubRuns)
	case !(c.DurationS > 0) || math.IsInf(c.DurationS, 0):
		return c, nil, fmt.Errorf("duration %g s is not a positive number", c.DurationS)
	}
	g := c.Grid
	if g == nil {
		var err error
		g, err = NewGrid(GridSpec{DtS: 1e-6, M: 8, TauMaxS: c.DurationS / float64(c.SubRuns) / 10})
		if err != nil {
			return c, nil, err
		}
	}
	if c.AfterpulseDelayS == 0 {
		c.AfterpulseDelayS = g.DtS / 2
	}
	return c, g, nil
}

// validate reports settings that cannot be simulated.
func (c *PhotonConfig) validate(g *Grid) error {
	dt := g.DtS
	sub := c.DurationS / float64(c.SubRuns)
	rate := c.CountRateHz + c.BackgroundHz
	switch {
	case g.Len() == 0:
		return errors.New("lag grid has no channel")
	case !(c.Beta >= photonMinBeta && c.Beta <= 1):
		return fmt.Errorf("coherence factor %g is outside [1/64, 1] (one coherence area per 1/β)", c.Beta)
	case !(c.CountRateHz > 0) || math.IsInf(c.CountRateHz, 0):
		return fmt.Errorf("count rate %g /s is not a positive number", c.CountRateHz)
	case c.BackgroundHz < 0 || math.IsNaN(c.BackgroundHz) || math.IsInf(c.BackgroundHz, 0):
		return fmt.Errorf("background rate %g /s is not a non-negative number", c.BackgroundHz)
	case c.DeadTimeS < 0 || math.IsNaN(c.DeadTimeS) || c.DeadTimeS > 1e-3:
		return fmt.Errorf("dead time %g s is outside 0 … 1 ms", c.DeadTimeS)
	case c.AfterpulseProb < 0 || !(c.AfterpulseProb < 1):
		return fmt.Errorf("afterpulse probability %g is outside [0, 1)", c.AfterpulseProb)
	case !(c.AfterpulseDelayS > 0) || c.AfterpulseDelayS > photonAfterpulseRing/16*dt:
		return fmt.Errorf("afterpulse delay %g s is outside (0, %g s] (64 base bins)", c.AfterpulseDelayS, photonAfterpulseRing/16*dt)
	case c.NodesPerComponent < 0 || c.NodesPerComponent > photonMaxNodes:
		return fmt.Errorf("rates per component %d is outside 1…%d", c.NodesPerComponent, photonMaxNodes)
	case c.Substeps < 1 || c.Substeps > photonMaxSubsteps:
		return fmt.Errorf("substeps %d is outside 1…%d", c.Substeps, photonMaxSubsteps)
	case rate*dt > photonMaxCountsBin:
		return fmt.Errorf("%.4g counts per base bin of %g s: more than %d; use a shorter bin", rate*dt, dt, photonMaxCountsBin)
	case rate*sub*(1+c.AfterpulseProb) > photonMaxCountsRun:
		return fmt.Errorf("%.4g counts per sub-run: more than %g; use more sub-runs", rate*sub, float64(photonMaxCountsRun))
	case c.DurationS/dt > photonMaxBins:
		return fmt.Errorf("%.4g base bins: more than %g", c.DurationS/dt, float64(photonMaxBins))
	case g.TauS[len(g.TauS)-1] >= sub:
		return fmt.Errorf("longest lag %.4g s is not shorter than a sub-run (%.4g s)", g.TauS[len(g.TauS)-1], sub)
	}
	return nil
}

// coherenceAreas returns the intensity shares c_a of ⌈1/β⌉ areas with
// Σ c_a = 1 and Σ c_a² = β.
func coherenceAreas(beta float64) []float64 {
	n := int(math.Ceil(1/beta - 1e-9))
	if n <= 1 {
		return []float64{1}
	}
	a := (1 - math.Sqrt(math.Max(0, 1-float64(n)*(1-beta)/float64(n-1)))) / float64(n)
	out := make([]float64, n)
	for i := range n - 1 {
		out[i] = a
	}
	out[n-1] = 1 - float64(n-1)*a
	return out
}

// photonRates reduces the model's size nodes to the discrete rates of the
// field: a monodisperse component as it is, a lognormal one by its k-point
// Gauss rule.
func photonRates(m *Model, k int) ([]PhotonRate, error) {
	var out []PhotonRate
	for ci := range m.Population.Components {
		var r, w []float64
		for _, nd := range m.Nodes {
			if nd.Component == ci && nd.Intensity > 0 {
				r, w = append(r, nd.RatePerS), append(w, nd.Intensity)
			}
		}
		if len(r) == 0 {
			continue
		}
		if len(r) == 1 {
			out = append(out, PhotonRate{RatePerS: r[0], Intensity: w[0], Component: ci})
			continue
		}
		x, v, err := componentRates(r, w, k)
		if err != nil {
			return nil, fmt.Errorf("component %d: %w", ci+1, err)
		}
		for i := range x {
			out = append(out, PhotonRate{RatePerS: x[i], Intensity: v[i], Component: ci})
		}
	}
	s := 0.0
	for _, p := range out {
		s += p.Intensity
	}
	if !(s > 0) {
		return nil, errors.New("population has no intensity")
	}
	for i := range out {
		out[i].Intensity /= s
	}
	return out, nil
}

// Automatic choice of the number of rates per lognormal component.
const (
	photonAutoMinRates = 2
	photonAutoMaxRates = 12
	photonAutoG1Tol    = 1e-4
)

// componentRates returns the discrete rates and weights standing for one
// component given by rates r and intensity weights w: the k-point Gauss
// rule in ln Γ, or for k = 0 the smallest k in 2…12 whose g1 is within 1e-4
// of the component's (relative to its weight) at every lag from 1e-3/Γ̄
// (in steps of 5 %) until the component's g1 falls below 1e-4.
func componentRates(r, w []float64, k int) (x, v []float64, err error) {
	lr := make([]float64, len(r))
	var sw, mean float64
	for i, g := range r {
		lr[i] = math.Log(g)
		sw += w[i]
		mean += w[i] * g
	}
	mean /= sw
	rule := func(k int) ([]float64, []float64, error) {
		x, v, err := gaussRule(lr, w, k)
		for i := range x {
			x[i] = math.Exp(x[i])
		}
		return x, v, err
	}
	if k > 0 {
		return rule(k)
	}
	for k = photonAutoMinRates; ; k++ {
		x, v, err = rule(k)
		if err != nil || k == photonAutoMaxRates {
			return x, v, err
		}
		ok := true
		for tau := 1e-3 / mean; ok; tau *= 1.05 {
			var full, disc float64
			for i, g := range r {
				full += w[i] * math.Exp(-g*tau)
			}
			for i, g := range x {
				disc += v[i] * math.Exp(-g*tau)
			}
			if math.Abs(full-disc) > photonAutoG1Tol*sw {
				ok = false
			}
			if full < photonAutoG1Tol*sw {
				break
			}
		}
		if ok {
			return x, v, nil
		}
	}
}

// Exact fills, for grid g, the expected g2 of the ideal detector (see the
// file comment) for rates with intensity weights, intercept beta, field
// step h and substeps samples per base bin.
func photonExact(g *Grid, rates []PhotonRate, beta, h float64, substeps int) []float64 {
	out := make([]float64, g.Len())
	for c := range g.TauS {
		L := float64(int64(substeps) << g.Stage[c])
		k := float64(g.Index[c])
		s := 0.0
		for _, p := range rates {
			for _, q := range rates {
				G := (p.RatePerS + q.RatePerS) * h
				// ln[(1 − y^L)/(1 − y)] with y = e^(−G)
				lr := math.Log(math.Expm1(-G*L) / math.Expm1(-G))
				s += p.Intensity * q.Intensity * math.Exp(-G*(k*L-L+1)+2*lr-2*math.Log(L))
			}
		}
		out[c] = 1 + beta*s
	}
	return out
}

// Photon simulates the measurement of the model's population photon by
// photon: c.SubRuns correlograms of c.DurationS/c.SubRuns each. nil c means
// DefaultPhotonConfig. The same model, config and seed give the same
// numbers. It panics on a nil model.
func Photon(m *Model, c *PhotonConfig) (*PhotonResult, error) {
	if m == nil {
		panic("sim: Photon needs a model")
	}
	if c == nil {
		d := DefaultPhotonConfig()
		c = &d
	}
	cfg, g, err := photonDefaults(*c)
	if err != nil {
		return nil, fmt.Errorf("photon simulation: %w", err)
	}
	if err := cfg.validate(g); err != nil {
		return nil, fmt.Errorf("photon simulation: %w", err)
	}
	cr, err := NewCorrelator(g)
	if err != nil {
		return nil, fmt.Errorf("photon simulation: %w", err)
	}
	rates, err := photonRates(m, cfg.NodesPerComponent)
	if err != nil {
		return nil, fmt.Errorf("photon simulation: %w", err)
	}
	areas := coherenceAreas(cfg.Beta)
	dt := g.DtS
	h := dt / float64(cfg.Substeps)
	frac := cfg.CountRateHz / (cfg.CountRateHz + cfg.BackgroundHz)
	res := &PhotonResult{
		TauS:          append([]float64(nil), g.TauS...),
		Rates:         rates,
		Areas:         areas,
		BinS:          dt,
		BinsPerSubRun: int64(math.Round(cfg.DurationS / float64(cfg.SubRuns) / dt)),
		Truth:         m.Truth,
	}
	betaTrue := 0.0
	for _, a := range areas {
		betaTrue += a * a
	}
	res.BetaEff = betaTrue * frac * frac
	res.Exact = photonExact(g, rates, res.BetaEff, h, cfg.Substeps)

	// Field processes: area-major, one per (area, rate).
	np := len(areas) * len(rates)
	coef, kick := make([]float64, np), make([]float64, np)
	xr, xi := make([]float64, np), make([]float64, np)
	rngF := newNormalSource(rand.NewPCG(cfg.Seed, 0x9e3779b97f4a7c15), 2*np)
	rngD := rand.New(rand.NewPCG(cfg.Seed, 0xbf58476d1ce4e5b9))
	rngA := rand.New(rand.NewPCG(cfg.Seed, 0x94d049bb133111eb))
	for a, ca := range areas {
		for i, p := range rates {
			j := a*len(rates) + i
			v := ca * p.Intensity / 2 // variance of the real and of the imaginary part
			r := math.Exp(-p.RatePerS * h)
			coef[j] = r
			kick[j] = math.Sqrt(v * -math.Expm1(-2*p.RatePerS*h))
			sd := math.Sqrt(v)
			xi0 := rngF.take(2)
			xr[j], xi[j] = sd*xi0[0], sd*xi0[1]
		}
	}
	fld := &photonField{areas: len(areas), rates: len(rates), coef: coef, kick: kick, xr: xr, xi: xi}

	// Detector state, in units of base bins.
	scatBin := cfg.CountRateHz * dt
	backBin := cfg.BackgroundHz * dt
	dead := cfg.DeadTimeS / dt
	hasDead := dead > 0
	pAP := cfg.AfterpulseProb
	hasAP := pAP > 0
	tauAP := cfg.AfterpulseDelayS / dt
	var ring []int64
	if hasAP {
		ring = make([]int64, photonAfterpulseRing)
	}
	var bin int64
	deadUntil := 0.0 // time from the start of the current bin until the detector is live
	invSub := 1 / float64(cfg.Substeps)

	// The arrivals follow from the time change of a unit-rate Poisson
	// process: the next arrival comes when the integrated mean count
	// reaches the next standard exponential deviate (budget), so a bin
	// without an arrival draws no random number.
	budget := rngD.ExpFloat64()
	res.SubRuns = make([]PhotonRun, cfg.SubRuns)
	for r := range res.SubRuns {
		cr.Reset()
		for b := int64(0); b < res.BinsPerSubRun; b++ {
			in := 0.0
			if cfg.Substeps == 1 {
				in = fld.step(rngF)
			} else {
				for range cfg.Substeps {
					in += fld.step(rngF)
				}
				in *= invSub
			}
			mu := scatBin*in + backBin
			var n int64
			if hasAP {
				slot := bin & (photonAfterpulseRing - 1)
				n, ring[slot] = ring[slot], 0
			}
			if budget >= mu {
				budget -= mu
			} else {
				inv := 1 / mu
				t := budget * inv // arrival time within the bin, in bins
				for {
					if !hasDead || t >= deadUntil {
						deadUntil = t + dead
						n++
						if hasAP && rngA.Float64() < pAP {
							off := int64(t + rngA.ExpFloat64()*tauAP)
							switch {
							case off == 0:
								n++
							case off < photonAfterpulseRing:
								ring[(bin+off)&(photonAfterpulseRing-1)]++
							}
						}
					}
					e := rngD.ExpFloat64()
					if t+e*inv >= 1 {
						budget = e - (1-t)*mu
						break
					}
					t += e * inv
				}
			}
			if hasDead {
				deadUntil = math.Max(deadUntil-1, 0)
			}
			cr.Push(n)
			bin++
		}
		g2, err := cr.G2(nil)
		if err != nil {
			return nil, fmt.Errorf("photon simulation: sub-run %d: %w", r+1, err)
		}
		counts := cr.Counts()
		res.SubRuns[r] = PhotonRun{G2: g2, Counts: counts, CountRateHz: float64(counts) / (float64(res.BinsPerSubRun) * dt)}
	}
	res.Mean, res.SEM = subRunStats(res.SubRuns, g.Len())
	return res, nil
}

// subRunStats returns the mean over the sub-runs and its standard error
// (nil for one sub-run).
func subRunStats(runs []PhotonRun, n int) (mean, sem []float64) {
	mean = make([]float64, n)
	for _, r := range runs {
		for i, v := range r.G2 {
			mean[i] += v
		}
	}
	R := float64(len(runs))
	for i := range mean {
		mean[i] /= R
	}
	if len(runs) < 2 {
		return mean, nil
	}
	sem = make([]float64, n)
	for _, r := range runs {
		for i, v := range r.G2 {
			d := v - mean[i]
			sem[i] += d * d
		}
	}
	for i := range sem {
		sem[i] = math.Sqrt(sem[i] / (R - 1) / R)
	}
	return mean, sem
}

// Output returns the result in the form Simulate returns: one Run per
// sub-run with its G2, Exact (the same for all) and Sigma, the standard
// deviation of one sub-run's g2 over the sub-runs (nil for a single
// sub-run). Dust is empty.
func (p *PhotonResult) Output() *Output {
	out := &Output{TauS: append([]float64(nil), p.TauS...), Truth: p.Truth}
	var sd []float64
	if p.SEM != nil {
		sd = make([]float64, len(p.SEM))
		for i, s := range p.SEM {
			sd[i] = s * math.Sqrt(float64(len(p.SubRuns)))
		}
	}
	for _, r := range p.SubRuns {
		run := Run{G2: append([]float64(nil), r.G2...), Exact: append([]float64(nil), p.Exact...)}
		if sd != nil {
			run.Sigma = append([]float64(nil), sd...)
		}
		out.Runs = append(out.Runs, run)
	}
	return out
}

// photonField holds the Ornstein–Uhlenbeck processes of the field, area
// by area.
type photonField struct {
	areas, rates       int
	coef, kick, xr, xi []float64
}

// step advances every process by one field step, with the normal
// deviates of rng, and returns the intensity Σ_a |Σ_i z_ai|².
func (f *photonField) step(rng *normalSource) float64 {
	nr := f.rates
	xi := rng.take(2 * f.areas * nr)
	if f.areas == 1 {
		cs, ks, rs, is := f.coef, f.kick[:len(f.coef)], f.xr[:len(f.coef)], f.xi[:len(f.coef)]
		ns := xi[:2*len(cs)]
		var er, ei float64
		for j := range cs {
			rs[j] = cs[j]*rs[j] + ks[j]*ns[2*j]
			is[j] = cs[j]*is[j] + ks[j]*ns[2*j+1]
			er += rs[j]
			ei += is[j]
		}
		return er*er + ei*ei
	}
	in := 0.0
	for a := range f.areas {
		cs, ks := f.coef[a*nr:(a+1)*nr], f.kick[a*nr:(a+1)*nr]
		rs, is := f.xr[a*nr:(a+1)*nr], f.xi[a*nr:(a+1)*nr]
		ns := xi[2*a*nr : 2*(a+1)*nr]
		var er, ei float64
		for j := range cs {
			rs[j] = cs[j]*rs[j] + ks[j]*ns[2*j]
			is[j] = cs[j]*is[j] + ks[j]*ns[2*j+1]
			er += rs[j]
			ei += is[j]
		}
		in += er*er + ei*ei
	}
	return in
}
