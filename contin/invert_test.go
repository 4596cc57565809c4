package contin

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"sync"
	"testing"

	"gonum.org/v1/gonum/floats"
)

// checkFinite fails the test if any number in r is NaN or infinite.
func checkFinite(t *testing.T, r *Result) {
	t.Helper()
	bad := func(name string, v ...float64) {
		for i, x := range v {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				t.Fatalf("%s[%d] = %v", name, i, x)
			}
		}
	}
	bad("Amplitude", r.Amplitude...)
	bad("Fitted", r.Fitted...)
	bad("Residuals", r.Residuals...)
	bad("scalars", r.Baseline, r.Alpha, r.Lambda, r.ChiSquare, r.DegreesOfFreedom, r.NormLx, r.ProbReject, r.GCV,
		r.NoiseSigma, r.SumAmplitude, r.MeanRatePerS)
	for _, s := range r.Scan {
		bad("Scan", s.Lambda, s.Alpha, s.ChiSquare, s.DegreesOfFreedom, s.NormLx, s.ProbReject, s.GCV, s.Curvature)
	}
	for j, x := range r.Amplitude {
		if x < 0 {
			t.Fatalf("Amplitude[%d] = %g < 0", j, x)
		}
	}
}

func testGrid(t testing.TB) (*Grid, []float64) {
	tau, _ := multiTauUntil(0.5e-6, 8, 1.05)
	g, err := gridCache.Grid(tau, nil)
	if err != nil {
		t.Fatal(err)
	}
	return g, tau
}

func TestInvertBadInput(t *testing.T) {
	g, tau := testGrid(t)
	m := len(tau)
	g1 := g1Of([]population{{3000, 0.2, 1}}, tau)
	y, sig := noisy(g1, 1e-3, 1)
	with := func(v []float64, i int, x float64) []float64 {
		w := slices.Clone(v)
		w[i] = x
		return w
	}
	constant := make([]float64, m)
	rising := make([]float64, m)
	for i := range constant {
		constant[i] = 0.7
		rising[i] = 1 - g1[i]
	}
	pureNoise, _ := noisy(make([]float64, m), 1e-3, 2)
	masked := slices.Clone(sig)
	for i := MinPoints - 1; i < m; i++ {
		masked[i] = math.Inf(1)
	}
	cases := []struct {
		name     string
		y, sigma []float64
		s        *Settings
		want     error
	}{
		{"short y", y[:m-1], sig, nil, ErrLength},
		{"short sigma", y, sig[:m-2], nil, ErrLength},
		{"nan y", with(y, 7, math.NaN()), sig, nil, ErrNonFinite},
		{"inf y", with(y, 0, math.Inf(-1)), sig, nil, ErrNonFinite},
		{"nan sigma", y, with(sig, 3, math.NaN()), nil, ErrNonFinite},
		{"zero sigma", y, with(sig, 3, 0), nil, ErrBadSigma},
		{"negative sigma", y, with(sig, 3, -1e-3), nil, ErrBadSigma},
		{"too few points", y, masked, nil, ErrTooFewPoints},
		{"constant", constant, sig, nil, ErrNoDecay},
		{"constant no sigma", constant, nil, nil, ErrNoDecay},
		{"rising", rising, sig, nil, ErrNoDecay},
		{"pure noise", pureNoise, sig, nil, ErrNoDecay},
		{"pure noise no sigma", pureNoise, nil, nil, ErrNoDecay},
		{"fixed without strength", y, sig, &Settings{Criterion: Fixed}, ErrBadSettings},
		{"unknown criterion", y, sig, &Settings{Criterion: 9}, ErrBadSettings},
		{"two strengths", y, sig, &Settings{NAlpha: 2}, ErrBadSettings},
		{"l-curve four", y, sig, &Settings{Criterion: LCurve, NAlpha: 4}, ErrBadSettings},
		{"empty range", y, sig, &Settings{LambdaMin: 1, LambdaMax: 1e-3}, ErrBadSettings},
		{"target one", y, sig, &Settings{TargetProbReject: 1}, ErrBadSettings},
		{"nan lambda", y, sig, &Settings{Criterion: Fixed, Lambda: math.NaN()}, ErrBadSettings},
		{"negative maxiter", y, sig, &Settings{MaxIter: -1}, ErrBadSettings},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r, err := Invert(g, c.y, c.sigma, c.s)
			if !errors.Is(err, c.want) || r != nil {
				t.Fatalf("got %v, %v; want error %v", r, err, c.want)
			}
		})
	}
}

func TestInvertNilGridPanics(t *testing.T) {
	defer func() {
		if r := recover(); r == nil || fmt.Sprint(r) != "contin: nil grid" {
			t.Fatalf("recovered %v", r)
		}
	}()
	Invert(nil, nil, nil, nil)
}

// TestIterationLimit: with a bound of 2 iterations per strength the solver
// cannot converge from a cold start; it must return promptly, flagged,
// with finite non-negative output.
func TestIterationLimit(t *testing.T) {
	g, tau := testGrid(t)
	y, sig := noisy(g1Of([]population{{500, 0.1, 0.5}, {5000, 0.1, 0.5}}, tau), 1e-3, 3)
	s := DefaultSettings()
	s.MaxIter = 2
	r, err := Invert(g, y, sig, s)
	if err != nil {
		t.Fatal(err)
	}
	checkFinite(t, r)
	if r.Status != IterationLimit {
		t.Errorf("status %v, want %v", r.Status, IterationLimit)
	}
	found := false
	for _, w := range r.Warnings {
		found = found || errors.Is(w, ErrIterationLimit)
	}
	if !found {
		t.Errorf("no ErrIterationLimit among %v", r.Warnings)
	}
}

// TestMaskedPoints: an infinite σ gives a point zero weight, which must
// equal inverting on the grid without those lags (same rate grid). The two
// Gram matrices differ only by terms that are exactly zero, so the
// solutions agree to rounding (1e-9 of the norm).
func TestMaskedPoints(t *testing.T) {
	g, tau := testGrid(t)
	y, sig := noisy(g1Of([]population{{3000, 0.2, 1}}, tau), 1e-3, 4)
	drop := map[int]bool{0: true, 1: true, 40: true, 41: true, 100: true}
	ms := slices.Clone(sig)
	var tau2, y2, sig2 []float64
	for i := range tau {
		if drop[i] {
			ms[i] = math.Inf(1)
			continue
		}
		tau2, y2, sig2 = append(tau2, tau[i]), append(y2, y[i]), append(sig2, sig[i])
	}
	gs := g.Settings()
	g2, err := NewGrid(tau2, &gs)
	if err != nil {
		t.Fatal(err)
	}
	s := &Settings{Criterion: Fixed, Lambda: 1e-5, Baseline: true}
	a, err := Invert(g, y, ms, s)
	if err != nil {
		t.Fatal(err)
	}
	b, err := Invert(g2, y2, sig2, s)
	if err != nil {
		t.Fatal(err)
	}
	if a.Points != len(tau2) {
		t.Errorf("points %d, want %d", a.Points, len(tau2))
	}
	if !floats.EqualApprox(a.Amplitude, b.Amplitude, 1e-9*floats.Norm(b.Amplitude, 2)) {
		t.Errorf("masked and removed lags disagree")
	}
	checkFinite(t, a)
}

// TestSigmaNil: without σ the fit uses equal weights, so at fixed λ the
// amplitudes equal those with any constant σ (α² = λ·tr(G)/tr(R) scales
// with the weights), and the estimated noise σ̂ = sqrt(V₁/(N_y − N_DF))
// recovers the generating noise. Its relative standard deviation is about
// 1/sqrt(2(N_y − N_DF)) ≈ 6 % for N_y = 152 (χ² statistics), so 20 % is
// over three standard deviations.
func TestSigmaNil(t *testing.T) {
	g, tau := testGrid(t)
	const noise = 1e-3
	y, sig := noisy(g1Of([]population{{3000, 0.2, 1}}, tau), noise, 5)
	s := &Settings{Criterion: Fixed, Lambda: 1e-5, Baseline: true}
	a, err := Invert(g, y, nil, s)
	if err != nil {
		t.Fatal(err)
	}
	b, err := Invert(g, y, sig, s)
	if err != nil {
		t.Fatal(err)
	}
	if !floats.EqualApprox(a.Amplitude, b.Amplitude, 1e-9*floats.Norm(b.Amplitude, 2)) {
		t.Errorf("amplitudes depend on a constant weight")
	}
	if !a.SigmaEstimated || b.SigmaEstimated {
		t.Errorf("SigmaEstimated %v %v", a.SigmaEstimated, b.SigmaEstimated)
	}
	if e := math.Abs(a.NoiseSigma/noise - 1); e > 0.2 {
		t.Errorf("σ̂ = %.3g, true %.3g", a.NoiseSigma, noise)
	}
	// Reported for weights 1/σ̂², χ² is then N_y − N_DF by construction.
	if d := a.ChiSquare - (float64(a.Points) - a.DegreesOfFreedom); math.Abs(d) > 1e-9*a.ChiSquare {
		t.Errorf("χ² %g, N_y − N_DF %g", a.ChiSquare, float64(a.Points)-a.DegreesOfFreedom)
	}
	// Default criterion with nil σ works too.
	r, err := Invert(g, y, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	checkFinite(t, r)
}

// TestWeightPaths: constant σ uses the grid's cached unit Gram matrix;
// σ differing in one entry by one ulp forces the per-correlogram Gram
// matrix. Both must give the same solution to rounding (1e-9).
func TestWeightPaths(t *testing.T) {
	g, tau := testGrid(t)
	y, sig := noisy(g1Of([]population{{800, 0.3, 1}}, tau), 1e-3, 6)
	sig2 := slices.Clone(sig)
	sig2[50] = math.Nextafter(sig2[50], 1)
	s := &Settings{Criterion: Fixed, Lambda: 1e-6, Baseline: true}
	a, err := Invert(g, y, sig, s)
	if err != nil {
		t.Fatal(err)
	}
	b, err := Invert(g, y, sig2, s)
	if err != nil {
		t.Fatal(err)
	}
	if !floats.EqualApprox(a.Amplitude, b.Amplitude, 1e-9*floats.Norm(a.Amplitude, 2)) {
		t.Errorf("cached and computed Gram paths disagree")
	}
}

// TestBaseline: a constant offset of 0.01 added to g1 is returned by the
// free baseline column. Its standard error here is of the order of the
// noise over the ~100 lags where g1 has decayed, about 1e-3/sqrt(100) =
// 1e-4, inflated by its correlation with the slowest rates; 1e-3 is
// several standard errors. Without the column, the offset must go into
// slow rates instead and the χ² grows.
func TestBaseline(t *testing.T) {
	g, tau := testGrid(t)
	const off = 0.01
	g1 := g1Of([]population{{3000, 0.2, 1}}, tau)
	y, sig := noisy(g1, 1e-3, 7)
	for i := range y {
		y[i] += off
	}
	r, err := Invert(g, y, sig, nil)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(r.Baseline-off) > 1e-3 {
		t.Errorf("baseline %.5f, want %.3f ± 0.001", r.Baseline, off)
	}
	s := DefaultSettings()
	s.Baseline = false
	r2, err := Invert(g, y, sig, s)
	if err != nil {
		t.Fatal(err)
	}
	if r2.Baseline != 0 || !(r2.Scan[0].ChiSquare > r.Scan[0].ChiSquare) {
		t.Errorf("without baseline: baseline %g, reference χ² %g vs %g with it", r2.Baseline, r2.Scan[0].ChiSquare, r.Scan[0].ChiSquare)
	}
}

// TestNegativeTail: data with many values at or below zero in the tail
// (noise around a decayed g1) are fitted as they are: residuals are y −
// Fitted at every lag, nothing is clipped, and the fit stays consistent
// (χ² per degree of freedom within 1 ± 4·sqrt(2/(N_y − N_DF)), χ²
// statistics, with the true σ).
func TestNegativeTail(t *testing.T) {
	g, tau := testGrid(t)
	y, sig := noisy(g1Of([]population{{2e4, 0.2, 1}}, tau), 3e-3, 8)
	neg := 0
	for _, v := range y {
		if v <= 0 {
			neg++
		}
	}
	if neg < 30 {
		t.Fatalf("only %d non-positive points; the test needs a negative tail", neg)
	}
	r, err := Invert(g, y, sig, nil)
	if err != nil {
		t.Fatal(err)
	}
	checkFinite(t, r)
	var chi2 float64
	for i := range y {
		if d := y[i] - r.Fitted[i] - r.Residuals[i]; d != 0 {
			t.Fatalf("residual %d is not y − fitted", i)
		}
		chi2 += (r.Residuals[i] / sig[i]) * (r.Residuals[i] / sig[i])
	}
	if !withinAbs(chi2, r.ChiSquare, 1e-9*chi2) {
		t.Errorf("χ² from residuals %g, reported %g", chi2, r.ChiSquare)
	}
	dof := float64(r.Points) - r.DegreesOfFreedom
	if q := chi2 / dof; math.Abs(q-1) > 4*math.Sqrt(2/dof) {
		t.Errorf("χ²/(N_y − N_DF) = %.3f", q)
	}
}

func withinAbs(a, b, tol float64) bool { return math.Abs(a-b) <= tol }

// TestScanConsistency checks invariants of the audit trail, for the full
// scan and for the default search: rows sorted by α, α²/λ the same ratio
// tr(G)/tr(R) on every row, the chosen row and the picks inside the scan,
// and the result fields equal to the chosen row. The full scan holds every
// lattice strength; the search holds lattice strengths (the least
// regularised first) and at most DefaultRefine refinements, at most 8
// lattice rows (the reference, the middle, at most 4 steps of 1, 2, 4, …
// to an end of the lattice and 2 bisections of the last step's 4), and no
// GCV or L-curve pick.
func TestScanConsistency(t *testing.T) {
	g, tau := testGrid(t)
	y, sig := noisy(g1Of([]population{{1000, 0.1, 0.4}, {4000, 0.1, 0.6}}, tau), 1e-3, 9)
	lattice := map[float64]bool{}
	ds := DefaultSettings()
	for k := 0; k < DefaultNAlpha; k++ {
		lattice[ds.latticeLambda(k)] = true
	}
	for _, full := range []bool{true, false} {
		s := DefaultSettings()
		s.FullScan = full
		r, err := Invert(g, y, sig, s)
		if err != nil {
			t.Fatal(err)
		}
		checkFinite(t, r)
		ratio := r.Scan[0].Alpha * r.Scan[0].Alpha / r.Scan[0].Lambda
		nRefined := 0
		for i, s := range r.Scan {
			if i > 0 && !(s.Alpha > r.Scan[i-1].Alpha) {
				t.Fatalf("full=%v: rows %d, %d not increasing in α", full, i-1, i)
			}
			if q := s.Alpha * s.Alpha / s.Lambda; !within(q, ratio, 1e-12) {
				t.Fatalf("full=%v: row %d: α²/λ = %g, row 0 %g", full, i, q, ratio)
			}
			if s.Refined {
				nRefined++
			} else if !lattice[s.Lambda] {
				t.Errorf("full=%v: row %d: λ = %v is not a lattice strength", full, i, s.Lambda)
			}
		}
		if r.Scan[0].Lambda != DefaultLambdaMin || nRefined > DefaultRefine {
			t.Errorf("full=%v: first λ %g, %d refined", full, r.Scan[0].Lambda, nRefined)
		}
		picks := []int{r.Chosen, r.Picks.ProbReject}
		if full {
			if len(r.Scan) != DefaultNAlpha+nRefined {
				t.Errorf("full scan: %d rows, %d refined", len(r.Scan), nRefined)
			}
			picks = append(picks, r.Picks.GCV, r.Picks.LCurve)
		} else {
			if n := len(r.Scan) - nRefined; n > 8 {
				t.Errorf("search: %d lattice rows", n)
			}
			if r.Picks.GCV != -1 || r.Picks.LCurve != -1 {
				t.Errorf("search: picks %+v, want −1 for GCV and L-curve", r.Picks)
			}
		}
		for _, k := range picks {
			if k < 0 || k >= len(r.Scan) {
				t.Fatalf("full=%v: index %d outside the scan", full, k)
			}
		}
		c := r.Scan[r.Chosen]
		if r.Chosen != r.Picks.ProbReject || r.Alpha != c.Alpha || r.ChiSquare != c.ChiSquare || r.DegreesOfFreedom != c.DegreesOfFreedom {
			t.Errorf("full=%v: result fields differ from the chosen row", full)
		}
		var sx, sxg float64
		for j, x := range r.Amplitude {
			sx += x
			sxg += x * r.GammaPerS[j]
		}
		if !within(r.SumAmplitude, sx, 1e-12) || !within(r.MeanRatePerS, sxg/sx, 1e-12) {
			t.Errorf("full=%v: SumAmplitude %g MeanRatePerS %g, recomputed %g %g", full, r.SumAmplitude, r.MeanRatePerS, sx, sxg/sx)
		}
	}
}

// TestKKT checks the optimality (Karush–Kuhn–Tucker) conditions of fixed-λ
// solutions on random problems, recomputing the gradient
// w = A'W(y − Ax − b) − α²Rx directly from the kernel: x ≥ 0, w_j ≤ tol_j
// where x_j = 0 and |w_j| ≤ tol_j where x_j > 0 or j is the baseline. The
// tolerance is 1e-9 of Σ_i |A_ij| W_i (|y_i| + |Ax|_i) + α²|R||x|, the scale
// of the terms that cancel in w_j; rounding leaves ~1e-13 of it.
func TestKKT(t *testing.T) {
	g, tau := testGrid(t)
	rng := rand.New(rand.NewPCG(21, 22))
	n := g.NGamma()
	gam := g.GammaPerS()
	a := g.Kernel()
	R := g.Regulariser()
	trials := 40
	if testing.Short() {
		trials = 10
	}
	for trial := 0; trial < trials; trial++ {
		var pops []population
		for k := 0; k < 1+rng.IntN(3); k++ {
			pops = append(pops, population{ModePerS: math.Exp(math.Log(50) + rng.Float64()*math.Log(1e4)), SigmaLn: 0.05 + 0.4*rng.Float64(), Frac: rng.Float64()})
		}
		noise := math.Exp(math.Log(1e-5) + rng.Float64()*math.Log(1e3))
		y, sig := noisy(g1Of(pops, tau), noise, uint64(100+trial))
		lam := math.Exp(math.Log(1e-12) + rng.Float64()*math.Log(1e12))
		base := rng.IntN(2) == 0
		r, err := Invert(g, y, sig, &Settings{Criterion: Fixed, Lambda: lam, Baseline: base})
		if err != nil {
			t.Fatalf("trial %d: %v", trial, err)
		}
		checkFinite(t, r)
		x := r.Amplitude
		a2 := r.Alpha * r.Alpha
		res := make([]float64, len(tau))
		scale := make([]float64, len(tau))
		for i := range tau {
			var f, af float64
			for j := 0; j < n; j++ {
				f += a.At(i, j) * x[j]
				af += math.Abs(a.At(i, j) * x[j])
			}
			w := 1 / (sig[i] * sig[i])
			res[i] = w * (y[i] - f - r.Baseline)
			scale[i] = w * (math.Abs(y[i]) + af + math.Abs(r.Baseline))
		}
		name := fmt.Sprintf("trial %d (λ=%.2g, noise %.2g, baseline %v)", trial, lam, noise, base)
		for j := 0; j <= n; j++ {
			var w, tol float64
			if j == n {
				if !base {
					break
				}
				for i := range tau {
					w += res[i]
					tol += scale[i]
				}
			} else {
				for i := range tau {
					w += a.At(i, j) * res[i]
					tol += a.At(i, j) * scale[i]
				}
				for k := max(j-2, 0); k <= min(j+2, n-1); k++ {
					w -= a2 * R.At(j, k) * x[k]
					tol += a2 * math.Abs(R.At(j, k)*x[k])
				}
			}
			tol *= 1e-9
			switch {
			case j == n || x[j] > 0:
				if math.Abs(w) > tol {
					t.Fatalf("%s: passive %d (Γ=%.3g, x=%.3g): gradient %.3g, tolerance %.3g", name, j, gam[min(j, n-1)], x[min(j, n-1)], w, tol)
				}
			case w > tol:
				t.Fatalf("%s: active %d (Γ=%.3g): gradient %.3g > tolerance %.3g", name, j, gam[j], w, tol)
			}
		}
	}
}

// TestQRMatchesNormalEquations forces the QR solver for every strength and
// compares with the default path: both minimise the same strictly convex
// problem, so the solutions agree to the accuracy of the normal equations
// at their condition bound (1e-6 of the norm).
func TestQRMatchesNormalEquations(t *testing.T) {
	g, tau := testGrid(t)
	y, sig := noisy(g1Of([]population{{500, 0.15, 0.4}, {5000, 0.15, 0.6}}, tau), 1e-3, 10)
	for _, lam := range []float64{1e-9, 1e-6, 1e-3, 1} {
		s := &Settings{Criterion: Fixed, Lambda: lam, Baseline: true}
		a, err := Invert(g, y, sig, s)
		if err != nil {
			t.Fatal(err)
		}
		saved := neCondMax
		neCondMax = 0
		b, err := Invert(g, y, sig, s)
		neCondMax = saved
		if err != nil {
			t.Fatal(err)
		}
		if b.QRSolves != 1 {
			t.Fatalf("λ=%g: QR not used", lam)
		}
		d := make([]float64, len(a.Amplitude))
		floats.SubTo(d, a.Amplitude, b.Amplitude)
		if e := floats.Norm(d, 2) / floats.Norm(b.Amplitude, 2); e > 1e-6 {
			t.Errorf("λ=%g: NE and QR differ by %.3g of the norm", lam, e)
		}
		if math.Abs(a.DegreesOfFreedom-b.DegreesOfFreedom) > 1e-6 {
			t.Errorf("λ=%g: N_DF %g vs %g", lam, a.DegreesOfFreedom, b.DegreesOfFreedom)
		}
	}
}

// TestConcurrentAndReproducible: one grid shared by many goroutines gives
// byte-identical results to a serial run, and two serial runs are
// byte-identical (JSON of the whole result, warnings as text).
func TestConcurrentAndReproducible(t *testing.T) {
	g, tau := testGrid(t)
	const n = 12
	ys := make([][]float64, n)
	sigs := make([][]float64, n)
	for k := range ys {
		ys[k], sigs[k] = noisy(g1Of([]population{{float64(300 + 400*k), 0.2, 1}}, tau), 1e-3, uint64(30+k))
	}
	enc := func(r *Result) string {
		var ws []string
		for _, w := range r.Warnings {
			ws = append(ws, w.Error())
		}
		b, err := json.Marshal(struct {
			R *Result
			W []string
		}{r, ws})
		if err != nil {
			t.Fatal(err)
		}
		return string(b)
	}
	serial := make([]string, n)
	for k := range ys {
		r, err := Invert(g, ys[k], sigs[k], nil)
		if err != nil {
			t.Fatal(err)
		}
		serial[k] = enc(r)
	}
	par := make([]string, n)
	var wg sync.WaitGroup
	for k := range ys {
		wg.Add(1)
		go func() {
			defer wg.Done()
			r, err := Invert(g, ys[k], sigs[k], nil)
			if err != nil {
				t.Error(err)
				return
			}
			par[k] = enc(r)
		}()
	}
	wg.Wait()
	for k := range ys {
		if par[k] != serial[k] {
			t.Errorf("correlogram %d: concurrent result differs from serial", k)
		}
		r, _ := Invert(g, ys[k], sigs[k], nil)
		if enc(r) != serial[k] {
			t.Errorf("correlogram %d: second serial run differs", k)
		}
	}
}

// TestLazyGramRows: rows of G formed on demand, in any order, hold
// G_jk = Σ_i (W_i A_ij)·A_ik over the common support (j the row formed
// first; the diagonal Σ_i W_i A_ij²), bit for bit as dot computes it, and
// for equal weights the grid's unit matrix scaled; and a plain loop over
// the kernel agrees to rounding (1e-13 relative: sums of at most m
// positive terms).
func TestLazyGramRows(t *testing.T) {
	g, tau := testGrid(t)
	y, sig := noisy(g1Of([]population{{3000, 0.2, 1}}, tau), 1e-3, 12)
	for i := range sig {
		sig[i] *= 1 + 0.5*math.Sin(float64(i)) // unequal weights
	}
	S, m := g.stride, g.m
	order := rand.New(rand.NewPCG(3, 4)).Perm(S)
	pos := make([]int, S)
	for k, j := range order {
		pos[j] = k
	}
	equal := make([]float64, m)
	for i := range equal {
		equal[i] = 2e-3
	}
	for _, sigma := range [][]float64{sig, equal} {
		ws := newWorkspace(g)
		p := &problem{g: g, ws: ws, y: y, s: *DefaultSettings(), ny: m, N: S}
		p.prepare(sigma)
		for _, k := range order {
			ws.ne.ensure(k)
		}
		isEqual := &sigma[0] == &equal[0]
		w := make([]float64, m)
		for i := range w {
			w[i] = (1 / sigma[i]) * (1 / sigma[i])
		}
		c := w[0] // as prepare scales the unit matrix
		for j := 0; j < S; j++ {
			for k := 0; k < S; k++ {
				var want float64
				switch r, o := j, k; {
				case isEqual:
					want = c * g.unitGram()[j*S+k]
				case j == k:
					want = dot(w[:g.supp[j]], g.at2[j*m:])
				default:
					if pos[o] < pos[r] {
						r, o = o, r
					}
					l := min(g.supp[r], g.supp[o])
					cr := make([]float64, l)
					for i := range cr {
						cr[i] = w[i] * g.at[r*m+i]
					}
					want = dot(cr, g.at[o*m:])
				}
				got := ws.G[j*S+k]
				if math.Float64bits(got) != math.Float64bits(want) {
					t.Fatalf("equal weights %v: G[%d][%d] = %v, want %v", isEqual, j, k, got, want)
				}
				var plain float64
				for i := 0; i < m; i++ {
					plain += w[i] * g.at[j*m+i] * g.at[k*m+i]
				}
				if !withinAbs(got, plain, 1e-13*math.Abs(plain)) {
					t.Fatalf("G[%d][%d] = %v, plain sum %v", j, k, got, plain)
				}
			}
		}
	}
}
