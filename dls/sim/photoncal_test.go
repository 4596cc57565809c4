package sim

import (
	"math"
	"testing"
)

// calibrationCase is one condition of the calibration of the fast Gaussian
// model (Simulate, Model.Sigma, Model.NeighbourCorrelation) against the
// photon-level simulator.
type calibrationCase struct {
	name    string
	pop     string
	angle   float64 // degrees
	beta    float64
	rateHz  float64
	dtS     float64
	subS    float64 // sub-run length, s
	subRuns int
	tauMaxS float64
	seed    uint64
	// baseHigh marks a mixture of rates far apart, where the fast model's
	// baseline σ is expected high (see TestCalibrateFastModel).
	baseHigh bool
}

var calibrationCases = []calibrationCase{
	{"100 nm, 173°, β 0.9, 200 kcps, Δt 1 µs, 1 s", "mono(100nm)", 173, 0.9, 2e5, 1e-6, 1, 400, 0.1, 31, false},
	{"70/30 % 30 + 300 nm (intensity), 173°, β 0.9, 100 kcps, Δt 1 µs, 1 s", "70%mono(30nm)+30%mono(300nm)@intensity", 173, 0.9, 1e5, 1e-6, 1, 400, 0.1, 32, true},
	{"lognormal 200 nm width 0.25, 90°, β 0.5, 50 kcps, Δt 2 µs, 2 s", "lognormal(200nm,0.25,intensity)", 90, 0.5, 5e4, 2e-6, 2, 300, 0.2, 33, false},
}

// Regions of a correlogram by g1²: the decay (g1² > 0.1), the tail
// (1e-3 … 0.1) and the baseline.
var calibrationRegions = [3]string{"decay g1² > 0.1", "tail 1e-3 … 0.1", "baseline g1² < 1e-3"}

func calibrationRegion(g1sq float64) int {
	switch {
	case g1sq > 0.1:
		return 0
	case g1sq > 1e-3:
		return 1
	}
	return 2
}

// calibrationStats are, per region, the mean over its channels of the ratio
// of the photon-level standard deviation to the fast model's σ, with its
// standard error from 8 groups of sub-runs (the channels of a region move
// together, so this is the honest spread), the range of the per-channel
// ratio over all sub-runs, and the mean neighbour correlation, photon-level
// and from NeighbourCorrelation.
type calibrationStats struct {
	n                  [3]int
	ratio, ratioSE     [3]float64
	ratioLo, ratioHi   [3]float64
	corrN              [3]int
	corrPhoton, corrAR [3]float64
	corrDiff           [3]float64 // mean |photon − model|
}

func calibrate(t *testing.T, c calibrationCase) calibrationStats {
	p, err := ParsePopulation(c.pop)
	if err != nil {
		t.Fatal(err)
	}
	m, err := NewModel(p, waterConditions(c.angle), nil)
	if err != nil {
		t.Fatal(err)
	}
	g, err := NewGrid(GridSpec{DtS: c.dtS, M: 8, TauMaxS: c.tauMaxS})
	if err != nil {
		t.Fatal(err)
	}
	cfg := PhotonConfig{Grid: g, Beta: c.beta, CountRateHz: c.rateHz, DurationS: c.subS * float64(c.subRuns), SubRuns: c.subRuns, Seed: c.seed}
	res, err := Photon(m, &cfg)
	if err != nil {
		t.Fatal(err)
	}
	fast := m.Sigma(g, c.beta, c.rateHz, c.subS)
	rho := m.NeighbourCorrelation(g, c.beta, c.rateHz, c.subS)
	const groups = 8
	per := len(res.SubRuns) / groups
	var st calibrationStats
	var grp [3][groups]float64
	for r := range st.ratioLo {
		st.ratioLo[r], st.ratioHi[r] = math.Inf(1), math.Inf(-1)
	}
	for i, tau := range res.TauS {
		g1 := m.G1(tau)
		reg := calibrationRegion(g1 * g1)
		_, v := channelVar(res.SubRuns, i)
		ratio := math.Sqrt(v) / fast[i]
		st.n[reg]++
		st.ratio[reg] += ratio
		st.ratioLo[reg], st.ratioHi[reg] = math.Min(st.ratioLo[reg], ratio), math.Max(st.ratioHi[reg], ratio)
		for k := range groups {
			_, vg := channelVar(res.SubRuns[k*per:(k+1)*per], i)
			grp[reg][k] += math.Sqrt(vg) / fast[i]
		}
		if i > 0 {
			cc := channelCorr(res.SubRuns, i-1, i)
			st.corrN[reg]++
			st.corrPhoton[reg] += cc
			st.corrAR[reg] += rho[i]
			st.corrDiff[reg] += math.Abs(cc - rho[i])
		}
	}
	for r := range st.n {
		if st.n[r] == 0 {
			continue
		}
		st.ratio[r] /= float64(st.n[r])
		var mean, ss float64
		for k := range groups {
			grp[r][k] /= float64(st.n[r])
			mean += grp[r][k] / groups
		}
		for k := range groups {
			ss += (grp[r][k] - mean) * (grp[r][k] - mean)
		}
		st.ratioSE[r] = math.Sqrt(ss / (groups - 1) / groups)
		if st.corrN[r] > 0 {
			st.corrPhoton[r] /= float64(st.corrN[r])
			st.corrAR[r] /= float64(st.corrN[r])
			st.corrDiff[r] /= float64(st.corrN[r])
		}
	}
	return st
}

// TestCalibrateFastModel calibrates the fast Gaussian model against the
// photon-level simulator (run with DLSBATCH_PHOTON_LONG=1; about 30 s per
// condition on one core, 1.5 minutes in all). It logs, per condition and region, the ratio
// of the photon-level channel standard deviation to Model.Sigma and the
// neighbour correlation (photon-level and NeighbourCorrelation), and checks
// the ratio against 1 within 4 standard errors (from 8 groups of sub-runs)
// plus 10 % (the agreement the fast model's documentation states for its
// variance), and the neighbour correlation within 0.1 on average over each
// region (TestNeighbourCorrelationAgainstPhotons has the per-pair bound).
//
// One deviation is expected: the fast model describes the field
// correlation on a stage's lattice by averaging each rate's exponential
// over the sample time separately, γ(m) = Σ_a w_a·f(Γ_a·Δt_s)·e^(−Γ_a·Δt_s·m)
// with f(x) = sinh(x)/x, so the cross terms of γ² carry f(x_a)·f(x_b)
// where the average of g1² over the sampling intervals has f((x_a + x_b)/2)²,
// which is smaller since ln f is convex. For rates far apart (30 and
// 300 nm) at the baseline stages, whose sample time exceeds the faster
// decay time, this overstates σ: there the ratio must lie in 0.7 … 1 (the
// direction, and a bound of 30 %).
func TestCalibrateFastModel(t *testing.T) {
	if !photonLong() {
		t.Skip("long calibration: set DLSBATCH_PHOTON_LONG=1")
	}
	for _, c := range calibrationCases {
		t.Run(c.name, func(t *testing.T) {
			st := calibrate(t, c)
			for r, name := range calibrationRegions {
				if st.n[r] == 0 {
					continue
				}
				t.Logf("| %s | %s | %d | %.3f ± %.3f | %.2f … %.2f | %.3f | %.3f | %.3f |",
					c.name, name, st.n[r], st.ratio[r], st.ratioSE[r], st.ratioLo[r], st.ratioHi[r], st.corrPhoton[r], st.corrAR[r], st.corrDiff[r])
				if c.baseHigh && r == 2 {
					if !(st.ratio[r] > 0.7 && st.ratio[r] < 1) {
						t.Errorf("%s: σ ratio %.3f ± %.3f, want 0.7 … 1", name, st.ratio[r], st.ratioSE[r])
					}
				} else if math.Abs(st.ratio[r]-1) > 4*st.ratioSE[r]+0.1 {
					t.Errorf("%s: σ ratio %.3f ± %.3f, want 1", name, st.ratio[r], st.ratioSE[r])
				}
				if st.corrDiff[r] > 0.1 {
					t.Errorf("%s: neighbour correlation off by %.3f on average", name, st.corrDiff[r])
				}
			}
		})
	}
}
