package multiangle

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"dlsbatch/cumulants"
	"dlsbatch/dls"
	"dlsbatch/dls/mie"
	"dlsbatch/dls/sim"
)

// Conditions of the simulated goniometer: water at 25 °C (η = 0.890022
// mPa·s, IAPWS 2008; n = 1.33162 at 632.8 nm, IAPWS R9-97), He–Ne laser,
// polystyrene particles (n = 1.58753 at 632.8 nm, Sultanova et al. 2009).
const (
	tK      = 298.15
	etaPaS  = 0.890022e-3
	nWater  = 1.33162
	lambdaM = 632.8e-9
)

var mPS = complex(1.58753, 0)

// eightAngles returns 30°, 47.1°, …, 150° in radians.
func eightAngles() []float64 {
	out := make([]float64, 8)
	for k := range out {
		out[k] = (30 + float64(k)*120/7) * math.Pi / 180
	}
	return out
}

func optics(th float64) dls.Optics {
	return dls.Optics{WavelengthM: lambdaM, AngleRad: th, RefractiveIndex: nWater}
}

// measure simulates one 60 s measurement (200 kcps, β = 0.9; a usual
// goniometer run) of population pop at angle th, with Mie intensity weights
// when useMie, fits second-order cumulants with the simulator's σ, and
// returns the Angle and the model (for its exact cumulants).
func measure(t *testing.T, pop string, th float64, useMie bool, seed uint64) (Angle, *sim.Model) {
	t.Helper()
	p, err := sim.ParsePopulation(pop)
	if err != nil {
		t.Fatal(err)
	}
	var scatter func(float64) float64
	if useMie {
		scatter = func(d float64) float64 {
			v, err := mie.Intensity(d, lambdaM, nWater, mPS, th, mie.Vertical)
			if err != nil {
				panic(err)
			}
			return v
		}
	}
	m, err := sim.NewModel(p, sim.Conditions{TemperatureK: tK, ViscosityPaS: etaPaS, Optics: optics(th)}, scatter)
	if err != nil {
		t.Fatal(err)
	}
	cfg := sim.DefaultConfig()
	cfg.DurationS = 60
	cfg.Seed = seed
	out, err := sim.Simulate(m, &cfg)
	if err != nil {
		t.Fatal(err)
	}
	r, err := cumulants.Fit(out.TauS, out.Runs[0].G2, out.Runs[0].Sigma, cumulants.G2, nil)
	if err != nil {
		t.Fatal(err)
	}
	return NewAngle(optics(th), r.GammaPerS, r.GammaSEPerS), m
}

// TestExact: Γ̄ = D·q² exactly (D of a 100 nm sphere, 4.90734e-12 m²/s,
// Stokes–Einstein check value) at the eight angles with 0.5 % standard
// errors gives back D to 1e-9, an intercept of zero (below 1e-9 of the
// smallest Γ̄), the size 100 nm to 1e-9, per-angle sizes of 100 nm and no
// flag. Exact arithmetic up to rounding.
func TestExact(t *testing.T) {
	d := dls.DiffusionFromDiameter(tK, etaPaS, 100e-9)
	var angs []Angle
	for _, th := range eightAngles() {
		q := optics(th).Q()
		g := d * q * q
		angs = append(angs, Angle{AngleRad: th, QPerM: q, GammaPerS: g, GammaSEPerS: 0.005 * g})
	}
	r, err := Analyze(angs, tK, etaPaS, nil)
	if err != nil {
		t.Fatal(err)
	}
	if !scalar.EqualWithinRel(r.DiffusionM2PerS, d, 1e-9) || !scalar.EqualWithinRel(r.DiameterNm, 100, 1e-9) {
		t.Errorf("D %.12g (want %.12g), d %.12g nm", r.DiffusionM2PerS, d, r.DiameterNm)
	}
	if math.Abs(r.InterceptPerS) > 1e-9*angs[0].GammaPerS || r.InterceptFlagged || r.TrendFlagged || r.SpreadFlagged {
		t.Errorf("intercept %g /s, flags %v %v %v", r.InterceptPerS, r.InterceptFlagged, r.TrendFlagged, r.SpreadFlagged)
	}
	for _, a := range r.PerAngle {
		if !scalar.EqualWithinRel(a.SizeNm, 100, 1e-9) {
			t.Errorf("%.1f°: %g nm", a.AngleDeg, a.SizeNm)
		}
	}
	if !scalar.EqualWithinRel(r.ZeroQDiameterNm, 100, 1e-9) {
		t.Errorf("q → 0 size %g nm", r.ZeroQDiameterNm)
	}
}

// TestSimulatedNarrow: a narrow 100 nm population (lognormal by number,
// geometric width 0.05) with Rayleigh weights, whose exact z-averaged D is
// the same at every angle (the simulator's quadrature), measured at eight
// angles 30–150°. Over four seeds D must be within 1 % of the truth (the
// slope's standard error is about 0.23 %, so 1 % is more than 4 SE) and
// within 4 of its own standard errors; neither the intercept nor a trend
// may be flagged (3-SE rules: false-alarm rate about 0.3 % each with honest
// errors); each per-angle size must be within 4 of its standard errors of
// that angle's exact z-average.
func TestSimulatedNarrow(t *testing.T) {
	for seed := uint64(1); seed <= 4; seed++ {
		var angs []Angle
		var truth []float64
		for k, th := range eightAngles() {
			a, m := measure(t, "lognormal(100nm,0.05,number)", th, false, 100*seed+uint64(k))
			angs = append(angs, a)
			truth = append(truth, m.Truth.ZAvgM*1e9)
		}
		dTrue := dls.DiffusionFromDiameter(tK, etaPaS, truth[0]*1e-9)
		r, err := Analyze(angs, tK, etaPaS, nil)
		if err != nil {
			t.Fatal(err)
		}
		rel := r.DiffusionM2PerS/dTrue - 1
		t.Logf("seed %d: D off by %+.3f %% (SE %.3f %%), intercept %.3g ± %.2g /s, trend z %.2f, spread p %.3g",
			seed, 100*rel, 100*r.DiffusionSEM2PerS/r.DiffusionM2PerS, r.InterceptPerS, r.InterceptSEPerS, r.TrendZ, r.SpreadP)
		if math.Abs(rel) > 0.01 || math.Abs(r.DiffusionM2PerS-dTrue) > 4*r.DiffusionSEM2PerS {
			t.Errorf("seed %d: D %.5g, truth %.5g (%.2f %%, SE %.2g)", seed, r.DiffusionM2PerS, dTrue, 100*rel, r.DiffusionSEM2PerS)
		}
		if r.InterceptFlagged || r.TrendFlagged || r.SpreadFlagged {
			t.Errorf("seed %d: flagged: %q", seed, r.Warnings)
		}
		for i, a := range r.PerAngle {
			if math.Abs(a.SizeNm-truth[i]) > 4*a.SizeSENm {
				t.Errorf("seed %d, %.1f°: d_app %.3f ± %.3f nm, truth %.3f nm", seed, a.AngleDeg, a.SizeNm, a.SizeSENm, truth[i])
			}
		}
	}
}

// TestInjectedIntercept: monodisperse particles whose decay rate is made
// Γ = D·q² + a with a = 25 /s (a q-independent relaxation, injected by
// choosing at each angle the diameter that decays at that rate; D of 100
// nm). The intercept's standard error at these settings is about 2.5 /s,
// so a must be flagged (about 10 SE), and the estimate must lie within 4 SE
// of 25 /s and D within 4 SE of the truth.
func TestInjectedIntercept(t *testing.T) {
	const a = 25.0
	d := dls.DiffusionFromDiameter(tK, etaPaS, 100e-9)
	var angs []Angle
	for k, th := range eightAngles() {
		q := optics(th).Q()
		dNm := dls.DiameterFromDiffusion(tK, etaPaS, (d*q*q+a)/(q*q)) * 1e9
		ang, _ := measure(t, fmt.Sprintf("mono(%.9gnm)", dNm), th, false, uint64(500+k))
		angs = append(angs, ang)
	}
	r, err := Analyze(angs, tK, etaPaS, nil)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("intercept %.3g ± %.2g /s (z %.1f), D %.5g ± %.2g", r.InterceptPerS, r.InterceptSEPerS, r.InterceptZ, r.DiffusionM2PerS, r.DiffusionSEM2PerS)
	if !r.InterceptFlagged {
		t.Errorf("intercept %.3g ± %.2g /s not flagged", r.InterceptPerS, r.InterceptSEPerS)
	}
	if math.Abs(r.InterceptPerS-a) > 4*r.InterceptSEPerS || math.Abs(r.DiffusionM2PerS-d) > 4*r.DiffusionSEM2PerS {
		t.Errorf("intercept %.4g ± %.2g (want %g), D %.5g ± %.2g (want %.5g)", r.InterceptPerS, r.InterceptSEPerS, a, r.DiffusionM2PerS, r.DiffusionSEM2PerS, d)
	}
	if !hasWarning(r, "intercept") {
		t.Errorf("no intercept warning in %q", r.Warnings)
	}
}

func hasWarning(r *Result, s string) bool {
	for _, w := range r.Warnings {
		if strings.Contains(w, s) {
			return true
		}
	}
	return false
}

// TestSizeTrend: broad polystyrene populations with Mie weights, whose
// intensity weighting changes with angle. Lognormal by number, median 200
// nm, width 0.3: the exact z-average falls from about 310 nm at 30° to
// about 220 nm at 150° (the simulator's Mie quadrature), a slope of many
// standard errors that must be flagged, and the apparent sizes must track
// the exact per-angle z-averages within 5 % (second-order cumulants of a
// broad distribution are biased by a few per cent; Mailer, Clegg & Pusey
// 2015). Median 300 nm, width 0.2: the apparent size oscillates with angle
// (Mie resonances) rather than drifting; the spread test must flag it.
func TestSizeTrend(t *testing.T) {
	cases := []struct {
		pop  string
		flag func(*Result) bool
	}{
		{"lognormal(200nm,0.3,number)", func(r *Result) bool { return r.TrendFlagged && r.TrendSlopeNmUm2 < 0 }},
		{"lognormal(300nm,0.2,number)", func(r *Result) bool { return r.SpreadFlagged }},
	}
	for _, c := range cases {
		t.Run(c.pop, func(t *testing.T) {
			var angs []Angle
			var truth []float64
			for k, th := range eightAngles() {
				a, m := measure(t, c.pop, th, true, uint64(900+k))
				angs = append(angs, a)
				truth = append(truth, m.Truth.ZAvgM*1e9)
			}
			r, err := Analyze(angs, tK, etaPaS, nil)
			if err != nil {
				t.Fatal(err)
			}
			t.Logf("trend %.3g ± %.2g nm·µm² (z %.1f, %+.1f %%), spread χ² %.3g on %d, d(slope) %.1f nm, d(q→0) %.1f nm; truth %.1f … %.1f nm",
				r.TrendSlopeNmUm2, r.TrendSlopeSENmUm2, r.TrendZ, r.TrendPct, r.SpreadChi2, r.SpreadDOF, r.DiameterNm, r.ZeroQDiameterNm, truth[0], truth[len(truth)-1])
			if !c.flag(r) {
				t.Errorf("not flagged: %+v", r)
			}
			if len(r.Warnings) == 0 {
				t.Error("no warning")
			}
			for i, a := range r.PerAngle {
				if !scalar.EqualWithinRel(a.SizeNm, truth[i], 0.05) {
					t.Errorf("%.1f°: d_app %.1f nm, exact z-average %.1f nm", a.AngleDeg, a.SizeNm, truth[i])
				}
			}
		})
	}
}

// TestBadInput: the documented errors.
func TestBadInput(t *testing.T) {
	d := dls.DiffusionFromDiameter(tK, etaPaS, 100e-9)
	mk := func(deg ...float64) []Angle {
		var out []Angle
		for _, g := range deg {
			q := optics(g * math.Pi / 180).Q()
			out = append(out, Angle{AngleRad: g * math.Pi / 180, QPerM: q, GammaPerS: d * q * q, GammaSEPerS: 0.01 * d * q * q})
		}
		return out
	}
	cases := []struct {
		name string
		in   []Angle
		tK   float64
		is   error
	}{
		{"one angle", mk(90), tK, ErrTooFewAngles},
		{"two angles", mk(60, 120), tK, ErrTooFewAngles},
		{"two distinct with repeats", mk(60, 60, 120, 120), tK, ErrTooFewAngles},
		{"no temperature", mk(60, 90, 120), 0, dls.ErrOutOfRange},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if _, err := Analyze(c.in, c.tK, etaPaS, nil); !errors.Is(err, c.is) {
				t.Errorf("error %v, want %v", err, c.is)
			}
		})
	}
	for name, edit := range map[string]func([]Angle){
		"zero SE":       func(a []Angle) { a[1].GammaSEPerS = 0 },
		"negative rate": func(a []Angle) { a[1].GammaPerS = -5 },
		"NaN q":         func(a []Angle) { a[0].QPerM = math.NaN() },
		"falling rate": func(a []Angle) {
			a[0].GammaPerS, a[2].GammaPerS = a[2].GammaPerS, a[0].GammaPerS
		},
	} {
		in := mk(60, 90, 120)
		edit(in)
		if _, err := Analyze(in, tK, etaPaS, nil); err == nil {
			t.Errorf("%s accepted", name)
		}
	}
	if _, err := Analyze(mk(60, 60, 90, 120), tK, etaPaS, nil); err != nil {
		t.Errorf("repeats with three distinct angles: %v", err)
	}
}
