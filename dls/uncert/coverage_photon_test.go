package uncert_test

import (
	"math"
	"os"
	"sync"
	"testing"

	"dlsbatch/cumulants"
	"dlsbatch/dls"
	"dlsbatch/dls/medium"
	"dlsbatch/dls/sim"
	"dlsbatch/dls/uncert"
)

// Coverage of the k = 2 interval of the z-average on photon-level data
// (sim.Photon: Ornstein–Uhlenbeck fields, Poisson counts, a software
// multi-tau correlator with symmetric normalisation), whose channel noise
// is correlated along the lags as a real correlator's is. The Type B
// inputs are set to zero, so the interval is the Type A alone: the
// correlated-noise standard error of cumulants.FitCorrelated (basis
// "model": the files state duration and count rate, no σ). Each run of a
// condition is one sub-run of a single photon-level simulation (the field
// runs on between them; a sub-run lasts 10⁴–10⁵ coherence times, so they
// are independent). The truth is the simulator's exact z-average of the
// population (Rayleigh weights, full quadrature).
//
// Besides the model basis, each condition reports the fit's own standard
// error (independent channel noise, HC3), the σ basis with σ the standard
// deviation of groups of five runs (as `dlsbatch simulate --noise photon
// --runs 5 --sigma` writes it), and the mean of five runs with the Type A
// from their scatter (DecayRateOfRuns, ν = 4), whose interval needs the
// Student factor t_0.975(4) = 2.78 rather than 2.

// photonCondition is one condition of the photon-level coverage.
type photonCondition struct {
	name     string
	pop      string
	angleDeg float64
	durS     float64 // one run, s
	rateHz   float64 // count rate
	dtS      float64 // base bin
	runs     int
	seed     uint64
}

// photonCoverage is what one condition gives: coverage fractions of each
// Type A, the standard deviation of the z-scores (d − d_true)/u, and the
// mean relative standard uncertainty.
type photonCoverage struct {
	runs                                   int
	model, hc3, sigma5, mean5k2, mean5t    float64
	sdzModel, sdzHC3, sdzSigma5, relUModel float64
}

// photonDefaultsHz etc. are shared by every condition: β = 0.9, water at
// 25 °C (IAPWS viscosity, n = 1.33162 from IAPWS R9-97), 632.8 nm.
const (
	photonBeta = 0.9
	photonTK   = 298.15
	photonN    = 1.33162
	photonLamM = 632.8e-9
)

func runPhotonCoverage(t *testing.T, c photonCondition) photonCoverage {
	t.Helper()
	water, err := medium.Lookup("water")
	if err != nil {
		t.Fatal(err)
	}
	pop, err := sim.ParsePopulation(c.pop)
	if err != nil {
		t.Fatal(err)
	}
	eta := water.Viscosity.ViscosityPaS
	th := c.angleDeg * math.Pi / 180
	model, err := sim.NewModel(pop, sim.Conditions{TemperatureK: photonTK, ViscosityPaS: eta(photonTK),
		Optics: dls.Optics{WavelengthM: photonLamM, AngleRad: th, RefractiveIndex: photonN}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	// The lag grid reaches 3000 mean decay times (the far channels pin the
	// baseline), at most a tenth of a run.
	grid, err := sim.NewGrid(sim.GridSpec{DtS: c.dtS, M: 8, TauMaxS: math.Min(c.durS/10, 3000/model.Truth.GammaMeanPerS)})
	if err != nil {
		t.Fatal(err)
	}
	pr, err := sim.Photon(model, &sim.PhotonConfig{Grid: grid, Beta: photonBeta, CountRateHz: c.rateHz,
		DurationS: c.durS * float64(c.runs), SubRuns: c.runs, Seed: c.seed})
	if err != nil {
		t.Fatal(err)
	}
	dTrue := model.Truth.ZAvgM * 1e9
	acq := cumulants.Acquisition{DurationS: c.durS, CountRateHz: c.rateHz}
	budget := func(gamma, se, dof float64) *uncert.Budget {
		b, err := uncert.ZAverage(&uncert.Inputs{GammaPerS: gamma, GammaSEPerS: se, GammaDOF: dof, TemperatureK: photonTK,
			Viscosity: eta, RefractiveIndex: photonN, AngleRad: th, WavelengthM: photonLamM})
		if err != nil {
			t.Fatal(err)
		}
		return b
	}
	var out photonCoverage
	var zModel, zHC3, zSigma []float64
	var gammas []float64
	tau := pr.TauS
	for _, run := range pr.SubRuns {
		fit, err := cumulants.FitCorrelated(tau, run.G2, nil, cumulants.G2, nil, acq)
		if err != nil {
			t.Fatal(err)
		}
		if fit.Correlated == nil || fit.Correlated.Basis != cumulants.BasisModel {
			t.Fatalf("no model-basis standard error: %v", fit.Unavailable)
		}
		gammas = append(gammas, fit.GammaPerS)
		for _, e := range []struct {
			se  float64
			cov *float64
			z   *[]float64
		}{{fit.Correlated.GammaSEPerS, &out.model, &zModel}, {fit.GammaSEPerS, &out.hc3, &zHC3}} {
			b := budget(fit.GammaPerS, e.se, 0)
			if math.Abs(b.ZAvgNm-dTrue) <= b.ExpandedUNm {
				*e.cov++
			}
			*e.z = append(*e.z, (b.ZAvgNm-dTrue)/b.CombinedUNm)
		}
		out.relUModel += fit.Correlated.GammaSEPerS / fit.GammaPerS
	}
	// σ from groups of five runs, and the mean of five runs.
	const group = 5
	groups := len(pr.SubRuns) / group
	for g := range groups {
		runs := pr.SubRuns[g*group : (g+1)*group]
		sigma := make([]float64, len(tau))
		for k := range tau {
			var m, ss float64
			for _, r := range runs {
				m += r.G2[k] / group
			}
			for _, r := range runs {
				ss += (r.G2[k] - m) * (r.G2[k] - m)
			}
			sigma[k] = math.Sqrt(ss / (group - 1))
		}
		for _, r := range runs {
			fit, err := cumulants.FitCorrelated(tau, r.G2, sigma, cumulants.G2, nil, acq)
			if err != nil {
				t.Fatal(err)
			}
			if fit.Correlated == nil || fit.Correlated.Basis != cumulants.BasisSigma {
				t.Fatalf("no σ-basis standard error: %v", fit.Unavailable)
			}
			b := budget(fit.GammaPerS, fit.Correlated.GammaSEPerS, 0)
			if math.Abs(b.ZAvgNm-dTrue) <= b.ExpandedUNm {
				out.sigma5++
			}
			zSigma = append(zSigma, (b.ZAvgNm-dTrue)/b.CombinedUNm)
		}
		m, se, dof, err := uncert.DecayRateOfRuns(gammas[g*group : (g+1)*group])
		if err != nil {
			t.Fatal(err)
		}
		b := budget(m, se, dof)
		if d := math.Abs(b.ZAvgNm - dTrue); d <= b.ExpandedUNm {
			out.mean5k2++
		}
		if d := math.Abs(b.ZAvgNm - dTrue); d <= b.CoverageFactorT95*b.CombinedUNm {
			out.mean5t++
		}
	}
	n := float64(len(pr.SubRuns))
	out.runs = len(pr.SubRuns)
	out.model /= n
	out.hc3 /= n
	out.relUModel /= n
	out.sigma5 /= float64(groups * group)
	out.mean5k2 /= float64(groups)
	out.mean5t /= float64(groups)
	out.sdzModel, out.sdzHC3, out.sdzSigma5 = rms(zModel), rms(zHC3), rms(zSigma)
	return out
}

// rms is the root mean square of z (about the truth, not the mean: a bias
// counts).
func rms(z []float64) float64 {
	s := 0.0
	for _, v := range z {
		s += v * v
	}
	return math.Sqrt(s / float64(len(z)))
}

// TestCoveragePhotonShort is the short photon-level coverage check run by
// the suite: 40 runs of 2 s (100 nm at 173°, 200 kcps, base bin 4 µs; 2·10⁷
// bins, about a second).
// With 40 runs the coverage is known to ±3.3 % (binomial standard
// deviation at 95 %), so the test asks for at least 85 % (more than three
// standard deviations below 95.45 %; the fit's independent-noise standard
// error covers about 30 %) and an rms z-score within 0.7–1.4 (its
// relative standard error at 40 runs is 11 %; three of them either side),
// and that the independent-noise standard error fails the same check
// (rms z-score above 3: it understates the scatter about sixfold).
func TestCoveragePhotonShort(t *testing.T) {
	got := runPhotonCoverage(t, photonCondition{"100 nm, 173°, 2 s, 200 kcps", "mono(100nm)", 173, 2, 2e5, 4e-6, 40, 71})
	t.Logf("coverage %.1f %% (rms z %.2f); fit's own SE %.1f %% (rms z %.2f)", 100*got.model, got.sdzModel, 100*got.hc3, got.sdzHC3)
	if got.model < 0.85 || got.sdzModel < 0.7 || got.sdzModel > 1.4 {
		t.Errorf("correlated-noise Type A: coverage %.1f %%, rms z-score %.2f; want ≥ 85 %% and 0.7–1.4", 100*got.model, got.sdzModel)
	}
	if got.sdzHC3 < 3 {
		t.Errorf("the independent-noise standard error gives an rms z-score of %.2f; the data are not what this test is about", got.sdzHC3)
	}
}

// photonConditions are the conditions of the long coverage run: size,
// angle, duration and count rate varied (the first three are those at
// which the independent-noise Type A was found to cover 26–30 %).
var photonConditions = []photonCondition{
	{"100 nm, 173°, 10 s, 200 kcps", "mono(100nm)", 173, 10, 2e5, 2e-6, 300, 101},
	{"200 nm, 90°, 30 s, 200 kcps", "mono(200nm)", 90, 30, 2e5, 4e-6, 300, 102},
	{"lognormal 60 nm PDI 0.1, 173°, 30 s, 200 kcps", "lognormal(60nm,0.31,intensity)", 173, 30, 2e5, 2e-6, 300, 103},
	{"50 nm, 173°, 10 s, 20 kcps", "mono(50nm)", 173, 10, 2e4, 1e-6, 300, 104},
}

// TestCoveragePhotonLong runs the coverage table of DEVELOPERS.md: 300
// runs at each of four conditions (set DLSBATCH_LONG=1; 26 minutes on a
// shared two-core machine). It asks for 95 % ± 2 % with the correlated-noise Type A
// (the target; at 300 runs the binomial standard deviation is 1.2 %, so
// ±2 % is 1.7 of them) and prints the other rows of the table.
func TestCoveragePhotonLong(t *testing.T) {
	if os.Getenv("DLSBATCH_LONG") == "" {
		t.Skip("set DLSBATCH_LONG=1 for the long photon-level coverage run")
	}
	results := make([]photonCoverage, len(photonConditions))
	var wg sync.WaitGroup
	sem := make(chan struct{}, 2)
	for i, c := range photonConditions {
		wg.Add(1)
		go func() {
			defer wg.Done()
			sem <- struct{}{}
			defer func() { <-sem }()
			results[i] = runPhotonCoverage(t, c)
		}()
	}
	wg.Wait()
	t.Log("| condition | runs | u(d)/d | k = 2 coverage (rms z) | fit's own SE | σ from 5 runs | mean of 5, k = 2 | mean of 5, k = t(4) |")
	for i, c := range photonConditions {
		r := results[i]
		t.Logf("| %s | %d | %.2f %% | %.1f %% (%.2f) | %.1f %% (%.2f) | %.1f %% (%.2f) | %.1f %% | %.1f %% |",
			c.name, r.runs, 100*r.relUModel, 100*r.model, r.sdzModel, 100*r.hc3, r.sdzHC3, 100*r.sigma5, r.sdzSigma5, 100*r.mean5k2, 100*r.mean5t)
		if math.Abs(r.model-0.9545) > 0.02 {
			t.Errorf("%s: coverage %.1f %%, want 95 ± 2 %%", c.name, 100*r.model)
		}
	}
}
