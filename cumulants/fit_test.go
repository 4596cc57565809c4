package cumulants_test

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"dlsbatch/cumulants"
)

// multiTau returns the lag grid of a multi-tau correlator (Schätzel 1988):
// 2M channels at dt, then M channels per stage at doubling sample times.
func multiTau(dt float64, m, n int) []float64 {
	var out []float64
	for k := 1; k <= 2*m && len(out) < n; k++ {
		out = append(out, float64(k)*dt)
	}
	for s := 1; len(out) < n; s++ {
		for j := 1; j <= m && len(out) < n; j++ {
			out = append(out, float64(m+j)*math.Ldexp(dt, s))
		}
	}
	return out
}

// logNormalG1 returns g1(τ) for an intensity-weighted lognormal
// distribution of decay rates with median gMed and geometric width sg (the
// standard deviation of ln Γ), with its exact mean rate and PDI. The
// lognormal moments are closed form: ⟨Γ⟩ = gMed·exp(sg²/2) and
// var/⟨Γ⟩² = exp(sg²) − 1 (J. Aitchison and J. A. C. Brown, The Lognormal
// Distribution, Cambridge 1957). g1 is integrated by the trapezoid rule in
// ln Γ over ±8 sg with 2001 nodes, which for this smooth, rapidly decaying
// integrand is accurate to rounding (exponential convergence of the
// trapezoid rule, Trefethen & Weideman, SIAM Rev. 56, 385, 2014).
func logNormalG1(tau []float64, gMed, sg float64) (g1 []float64, mean, pdi float64) {
	g1 = make([]float64, len(tau))
	if sg == 0 {
		for i, t := range tau {
			g1[i] = math.Exp(-gMed * t)
		}
		return g1, gMed, 0
	}
	const k = 2001
	var sw float64
	ws := make([]float64, k)
	gs := make([]float64, k)
	for j := range ws {
		z := -8 + 16*float64(j)/(k-1)
		ws[j] = math.Exp(-z * z / 2)
		gs[j] = gMed * math.Exp(sg*z)
		sw += ws[j]
	}
	for i, t := range tau {
		var s float64
		for j := range ws {
			s += ws[j] * math.Exp(-gs[j]*t)
		}
		g1[i] = s / sw
	}
	return g1, gMed * math.Exp(sg*sg/2), math.Expm1(sg * sg)
}

// correlogram builds correlation values of the given kind from g1 with the
// Siegert relation g2 = B + β·g1² (g1 data: B + √β·g1), adding white noise
// of standard deviation noise when rng is not nil.
func correlogram(g1 []float64, kind cumulants.Kind, beta, base, noise float64, rng *rand.Rand) []float64 {
	y := make([]float64, len(g1))
	for i := range g1 {
		switch kind {
		case cumulants.G1:
			y[i] = base + math.Sqrt(beta)*g1[i]
		default:
			y[i] = base + beta*g1[i]*g1[i]
		}
		if rng != nil {
			y[i] += noise * rng.NormFloat64()
		}
	}
	return y
}

// constant returns n copies of v.
func constant(n int, v float64) []float64 {
	out := make([]float64, n)
	for i := range out {
		out[i] = v
	}
	return out
}

func TestFitNoiseFreeMonodisperse(t *testing.T) {
	// Exact single exponentials: the second-order model contains them with
	// μ2 = 0, so the fit must return the generating values to rounding.
	// Tolerance 1e-6 relative, far above rounding: the fits reach about
	// 1e-12, so a failure means a wrong model or a stopped iteration.
	tau := multiTau(0.5e-6, 8, 200)
	cases := []struct {
		name       string
		kind       cumulants.Kind
		method     cumulants.Method
		gamma      float64 // 1/s
		beta, base float64
	}{
		{"g2 nonlinear", cumulants.G2, cumulants.Nonlinear, 3418.78, 0.92, 1},
		{"g2 linear", cumulants.G2, cumulants.Linear, 3418.78, 0.92, 1},
		{"g2m1 nonlinear", cumulants.G2Minus1, cumulants.Nonlinear, 1715.78, 0.6, 0},
		{"g1 nonlinear", cumulants.G1, cumulants.Nonlinear, 58.46, 1, 0},
		{"g2 fast decay", cumulants.G2, cumulants.Nonlinear, 2.0e5, 0.8, 1},
		{"g2 slow decay", cumulants.G2, cumulants.Nonlinear, 30, 0.8, 1},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			g1, _, _ := logNormalG1(tau, c.gamma, 0)
			y := correlogram(g1, c.kind, c.beta, c.base, 0, nil)
			s := cumulants.DefaultSettings()
			s.Method = c.method
			r, err := cumulants.Fit(tau, y, nil, c.kind, &s)
			if err != nil {
				t.Fatal(err)
			}
			if !scalar.EqualWithinRel(r.GammaPerS, c.gamma, 1e-6) {
				t.Errorf("Γ̄ = %.10g, want %.10g", r.GammaPerS, c.gamma)
			}
			if math.Abs(r.PDI) > 1e-6 {
				t.Errorf("PDI = %.3g, want 0", r.PDI)
			}
			wantB := c.beta
			if c.kind == cumulants.G1 {
				wantB = math.Sqrt(c.beta)
			}
			if !scalar.EqualWithinRel(r.Intercept, wantB, 1e-6) {
				t.Errorf("intercept = %.10g, want %.10g", r.Intercept, wantB)
			}
			if math.Abs(r.Baseline-c.base) > 1e-6 {
				t.Errorf("baseline = %.10g, want %.10g", r.Baseline, c.base)
			}
			if len(r.Warnings) != 0 {
				t.Errorf("warnings on clean data: %v", r.Warnings)
			}
		})
	}
}

func TestFitNoiseFreeLogNormal(t *testing.T) {
	// Against the closed-form lognormal moments (see logNormalG1). The
	// second-order expansion truncated at g1 = 0.1 is biased by the higher
	// cumulants; tolerances are set from the size of the neglected third
	// cumulant term, μ3τ³/6 with μ3/Γ̄³ = p²(p + 3) for a lognormal
	// (p = PDI), over Γ̄τ ≲ 2.3: about 0.1 % in Γ̄ at p = 0.04 and
	// 0.3 % at p = 0.1, and 0.01 in PDI.
	tau := multiTau(0.5e-6, 8, 200)
	cases := []struct {
		name             string
		sg               float64
		order            int
		tolGamma, tolPDI float64
	}{
		{"narrow", 0.1, 2, 5e-4, 0.002},
		{"moderate", 0.2, 2, 1e-3, 0.005},
		{"broad", 0.3, 2, 3e-3, 0.01},
		{"broad third order", 0.3, 3, 1e-3, 0.005},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			g1, mean, pdi := logNormalG1(tau, 2000, c.sg)
			y := correlogram(g1, cumulants.G2, 0.9, 1, 0, nil)
			s := cumulants.DefaultSettings()
			s.Order = c.order
			r, err := cumulants.Fit(tau, y, nil, cumulants.G2, &s)
			if err != nil {
				t.Fatal(err)
			}
			if !scalar.EqualWithinRel(r.GammaPerS, mean, c.tolGamma) {
				t.Errorf("Γ̄ = %.6g, want %.6g (rel. error %.2g, tol %.1g)", r.GammaPerS, mean, r.GammaPerS/mean-1, c.tolGamma)
			}
			if math.Abs(r.PDI-pdi) > c.tolPDI {
				t.Errorf("PDI = %.4f, want %.4f ± %.3f", r.PDI, pdi, c.tolPDI)
			}
		})
	}
}

func TestFitStandardErrorsMatchScatter(t *testing.T) {
	// Honest uncertainties: over repeated noisy fits of one population, the
	// reported standard error of Γ̄ should match the observed scatter.
	// With 200 repeats the sample SD is itself uncertain by about
	// 1/√(2·200) = 5 %; the fit's linearisation adds a little, so the
	// ratio must lie within 0.8–1.25.
	if testing.Short() {
		t.Skip("200 fits")
	}
	tau := multiTau(0.5e-6, 8, 200)
	g1, _, _ := logNormalG1(tau, 2500, 0.15)
	rng := rand.New(rand.NewPCG(7, 11))
	var gs, ses []float64
	for k := 0; k < 200; k++ {
		y := correlogram(g1, cumulants.G2, 0.85, 1, 2e-3, rng)
		r, err := cumulants.Fit(tau, y, nil, cumulants.G2, nil)
		if err != nil {
			t.Fatal(err)
		}
		gs = append(gs, r.GammaPerS)
		ses = append(ses, r.GammaSEPerS)
	}
	sd := stddev(gs)
	meanSE := meanOf(ses)
	if ratio := meanSE / sd; ratio < 0.8 || ratio > 1.25 {
		t.Errorf("mean reported SE %.4g vs observed SD %.4g: ratio %.3f outside 0.8–1.25", meanSE, sd, ratio)
	}
}

func TestFitGivenSigma(t *testing.T) {
	// With σ given per point and data whose noise matches it, the reduced
	// χ² is a χ²/ν variable with ν ≈ 70: its standard deviation is
	// √(2/ν) ≈ 0.17, so 1 ± 0.5 holds with wide margin.
	tau := multiTau(0.5e-6, 8, 200)
	g1, _, _ := logNormalG1(tau, 1500, 0.1)
	rng := rand.New(rand.NewPCG(3, 5))
	y := correlogram(g1, cumulants.G2, 0.9, 1, 1e-3, rng)
	r, err := cumulants.Fit(tau, y, constant(len(tau), 1e-3), cumulants.G2, nil)
	if err != nil {
		t.Fatal(err)
	}
	if r.SigmaEstimated {
		t.Error("sigma was given but reported as estimated")
	}
	if math.Abs(r.ReducedChi2-1) > 0.5 {
		t.Errorf("reduced χ² = %.3f, want 1 ± 0.5", r.ReducedChi2)
	}
}

func TestFitRangeCheckWarnsOnBimodal(t *testing.T) {
	// A fast population (4000 1/s, 30 % of the intensity) beside a slow
	// one (200 1/s): the second-order series cannot follow the two-step
	// decay, so the mean rate depends on where the fit stops, and the range
	// check must say so (limit 2 %, common practice). On a narrow
	// monomodal sample the series is adequate: the shift stays below
	// 0.5 %. The data are noise-free, so both outcomes are properties of
	// the model, not of a noise draw.
	tau := multiTau(0.5e-6, 8, 200)
	a, _, _ := logNormalG1(tau, 4000, 0.05)
	b, _, _ := logNormalG1(tau, 200, 0.05)
	g1 := make([]float64, len(tau))
	for i := range g1 {
		g1[i] = 0.3*a[i] + 0.7*b[i]
	}
	// σ is given (constant), so that the weights are not re-estimated from
	// residuals, which on noise-free data would be pure model error.
	sigma := constant(len(tau), 1e-4)
	r, err := cumulants.Fit(tau, correlogram(g1, cumulants.G2, 0.9, 1, 0, nil), sigma, cumulants.G2, nil)
	if err != nil {
		t.Fatal(err)
	}
	if !r.RangeChecked || r.RangeShift <= 0.02 || len(r.Warnings) == 0 {
		t.Errorf("bimodal: range shift %.3g (checked %v, warnings %v), want > 0.02 and a warning", r.RangeShift, r.RangeChecked, r.Warnings)
	}
	r, err = cumulants.Fit(tau, correlogram(a, cumulants.G2, 0.9, 1, 0, nil), sigma, cumulants.G2, nil)
	if err != nil {
		t.Fatal(err)
	}
	if !r.RangeChecked || r.RangeShift > 0.005 {
		t.Errorf("narrow: range shift %.3g (checked %v), want ≤ 0.005", r.RangeShift, r.RangeChecked)
	}
}

func TestFitBadData(t *testing.T) {
	// Each case breaks the synthetic data in one known way; the error must
	// wrap the sentinel of that condition and, when it concerns a point,
	// be a *PointError at the index of the point that was broken (or at
	// the start of the fit range, or at the last channel for data that
	// have not decayed by it).
	tau := multiTau(0.5e-6, 8, 200)
	n := len(tau)
	g1, _, _ := logNormalG1(tau, 2000, 0)
	rng := rand.New(rand.NewPCG(1, 2))
	clean := func() []float64 { return correlogram(g1, cumulants.G2, 0.9, 1, 0, nil) }
	minTau := cumulants.DefaultSettings()
	minTau.MinTauS = 100 // beyond the last lag (≈ 67 s)
	cases := []struct {
		name     string
		tau      []float64
		y, sigma []float64
		s        *cumulants.Settings
		want     []error // the error must wrap one of these
		index    int     // index of the PointError; -1: no PointError
	}{
		{"never decays", tau, func() []float64 {
			// Γ = 0.01 1/s: g1 has only fallen to 0.51 by the last lag
			// (≈ 67 s), so the far channels keep more than half of the
			// amplitude.
			slow, _, _ := logNormalG1(tau, 0.01, 0)
			return correlogram(slow, cumulants.G2, 0.9, 1, 1e-3, rng)
		}(), nil, nil, []error{cumulants.ErrNoDecay}, n - 1},
		{"all at baseline", tau, correlogram(make([]float64, n), cumulants.G2, 0.9, 1, 1e-3, rng), nil, nil,
			[]error{cumulants.ErrNoSignal}, 0},
		{"too few points", tau[:6], clean()[:6], nil, nil, []error{cumulants.ErrTooFewPoints}, 0},
		{"decay faster than first lag", tau, func() []float64 {
			fast, _, _ := logNormalG1(tau, 2e6, 0)
			return correlogram(fast, cumulants.G2, 0.9, 1, 1e-3, rng)
		}(), nil, nil, []error{cumulants.ErrNoSignal, cumulants.ErrTooFewPoints}, 0},
		{"NaN", tau, func() []float64 { y := clean(); y[17] = math.NaN(); return y }(), nil, nil,
			[]error{cumulants.ErrNonFinite}, 17},
		{"infinite sigma", tau, clean(), func() []float64 { s := constant(n, 1e-3); s[5] = math.Inf(1); return s }(), nil,
			[]error{cumulants.ErrNonFinite}, 5},
		{"non-increasing lag", func() []float64 { v := append([]float64(nil), tau...); v[30] = v[29]; return v }(), clean(), nil, nil,
			[]error{cumulants.ErrBadLag}, 30},
		{"zero sigma", tau, clean(), func() []float64 { s := constant(n, 1e-3); s[40] = 0; return s }(), nil,
			[]error{cumulants.ErrBadSigma}, 40},
		{"no lag above the minimum", tau, clean(), nil, &minTau,
			[]error{cumulants.ErrTooFewPoints}, -1},
		{"bad settings", tau, clean(), nil, &cumulants.Settings{Order: 4}, nil, -1},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r, err := cumulants.Fit(c.tau, c.y, c.sigma, cumulants.G2, c.s)
			if err == nil {
				t.Fatalf("no error; Γ̄ = %g", r.GammaPerS)
			}
			var pe *cumulants.PointError
			switch isPoint := errors.As(err, &pe); {
			case c.index >= 0 && (!isPoint || pe.Index != c.index):
				t.Errorf("error %q: want a *PointError at index %d", err, c.index)
			case c.index < 0 && isPoint:
				t.Errorf("error %q: want no *PointError (index %d is not a point of the data)", err, pe.Index)
			}
			found := c.want == nil
			for _, w := range c.want {
				found = found || errors.Is(err, w)
			}
			if !found {
				t.Errorf("error %q wraps none of %q", err, c.want)
			}
		})
	}
}

func TestPointErrorMessage(t *testing.T) {
	// The message names the index and keeps the wrapped reason; errors.Is
	// sees through it (the errors package's Unwrap contract).
	e := &cumulants.PointError{Index: 17, Err: fmt.Errorf("value is %w", cumulants.ErrNonFinite)}
	if got, want := e.Error(), "point 17: value is not finite"; got != want {
		t.Errorf("message %q, want %q", got, want)
	}
	if !errors.Is(e, cumulants.ErrNonFinite) {
		t.Error("errors.Is does not see the sentinel through the PointError")
	}
}

func stddev(v []float64) float64 {
	m := meanOf(v)
	var s float64
	for _, x := range v {
		s += (x - m) * (x - m)
	}
	return math.Sqrt(s / float64(len(v)-1))
}

func meanOf(v []float64) float64 {
	var s float64
	for _, x := range v {
		s += x
	}
	return s / float64(len(v))
}

// TestSkippedCovariancesChangeNothing: leaving out the covariance of the
// fits whose standard errors are not read (the equal-weight first pass,
// range-check refits with a shift within 2 %, the fits of the truncation
// estimate) must give the same Result and truncation estimate,
// bit for bit, as computing all of them: on unimodal and bimodal
// correlograms (the bimodal one shifts by more than 2 %, so its refits are
// repeated with their covariance), with σ given and estimated, and on one
// whose second pass fails (the first-pass fit is then kept with its
// standard errors).
func TestSkippedCovariancesChangeNothing(t *testing.T) {
	tau := multiTau(0.5e-6, 8, 200)
	a, _, _ := logNormalG1(tau, 4000, 0.05)
	b, _, _ := logNormalG1(tau, 200, 0.05)
	mono, _, _ := logNormalG1(tau, 2000, 0.15)
	bi := make([]float64, len(tau))
	for i := range bi {
		bi[i] = 0.3*a[i] + 0.7*b[i]
	}
	rng := rand.New(rand.NewPCG(5, 6))
	type input struct {
		name  string
		y     []float64
		sigma []float64
	}
	var inputs []input
	for _, c := range []struct {
		name string
		g1   []float64
	}{{"mono", mono}, {"bimodal", bi}} {
		y := correlogram(c.g1, cumulants.G2, 0.9, 1, 1e-3, rng)
		inputs = append(inputs, input{c.name + "/sigma-nil", y, nil}, input{c.name + "/sigma", y, constant(len(tau), 1e-3)})
	}
	// A demo correlogram with dust whose baseline is not reached; its
	// second pass fails.
	dustyTau, dustyY := readTwoColumns(t, "../testdata/demo/20_pmma50-P0301-3-dusty.csv")
	defer func() { *cumulants.SkipUnreadCov = true }()
	for _, in := range inputs {
		var got [2]string
		for k, skip := range []bool{true, false} {
			*cumulants.SkipUnreadCov = skip
			r, err := cumulants.Fit(tau, in.y, in.sigma, cumulants.G2, nil)
			if err != nil {
				t.Fatalf("%s: %v", in.name, err)
			}
			var ws []string
			for _, w := range r.Warnings {
				ws = append(ws, w.Error())
			}
			c := *r
			c.Warnings = nil
			tr, err := cumulants.TruncationBias(tau, cumulants.G2, nil, r)
			if err != nil {
				t.Fatalf("%s: %v", in.name, err)
			}
			got[k] = fmt.Sprintf("%#v %q %#v", c, ws, *tr)
		}
		if got[0] != got[1] {
			t.Errorf("%s: results differ\nskipping: %s\nall:      %s", in.name, got[0], got[1])
		}
	}
	var got [2]string
	for k, skip := range []bool{true, false} {
		*cumulants.SkipUnreadCov = skip
		r, err := cumulants.Fit(dustyTau, dustyY, nil, cumulants.G2, nil)
		if err != nil {
			t.Fatal(err)
		}
		got[k] = fmt.Sprintf("%v %v %v %v %v", r.GammaPerS, r.GammaSEPerS, r.PDISE, r.RangeShift, r.Warnings)
	}
	if got[0] != got[1] {
		t.Errorf("dusty: results differ\nskipping: %s\nall:      %s", got[0], got[1])
	}
}

// readTwoColumns reads the lag and correlation columns of a correlogram
// CSV file (lines starting with # and the header skipped).
func readTwoColumns(t *testing.T, path string) (tau, y []float64) {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	for _, line := range strings.Split(string(b), "\n")[1:] {
		f := strings.Split(strings.TrimSpace(line), ",")
		if len(f) != 2 || strings.HasPrefix(f[0], "#") {
			continue
		}
		a, err1 := strconv.ParseFloat(f[0], 64)
		c, err2 := strconv.ParseFloat(f[1], 64)
		if err1 != nil || err2 != nil {
			continue // the header
		}
		tau, y = append(tau, a), append(y, c)
	}
	return tau, y
}

// TestUnrolledOrder2MatchesGeneral: the unrolled χ² and normal-equation
// sums of the second-order model must give the same fits, bit for bit, as
// the general loop over any order: g2, g2−1 and g1 data (the square or
// not), σ given and estimated (which also exercises the held baseline of
// the range-check refits).
func TestUnrolledOrder2MatchesGeneral(t *testing.T) {
	tau := multiTau(0.5e-6, 8, 200)
	g1, _, _ := logNormalG1(tau, 2000, 0.3)
	rng := rand.New(rand.NewPCG(7, 8))
	defer func() { *cumulants.UnrolledOrder2 = true }()
	for _, kind := range []cumulants.Kind{cumulants.G2, cumulants.G2Minus1, cumulants.G1} {
		base := 1.0
		if kind != cumulants.G2 {
			base = 0
		}
		y := correlogram(g1, kind, 0.9, base, 1e-3, rng)
		for _, sigma := range [][]float64{nil, constant(len(tau), 1e-3)} {
			var got [2]string
			for k, unrolled := range []bool{true, false} {
				*cumulants.UnrolledOrder2 = unrolled
				r, err := cumulants.Fit(tau, y, sigma, kind, nil)
				if err != nil {
					t.Fatalf("%v: %v", kind, err)
				}
				c := *r
				c.Warnings = nil
				got[k] = fmt.Sprintf("%#v %v", c, r.Warnings)
			}
			if got[0] != got[1] {
				t.Errorf("%v, σ given %v: unrolled and general fits differ", kind, sigma != nil)
			}
		}
	}
}
