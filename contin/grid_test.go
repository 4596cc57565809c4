package contin

import (
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"sync"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/integrate/quad"
)

func TestGridLayout(t *testing.T) {
	tau, _ := multiTauUntil(0.5e-6, 8, 1.05)
	g, err := NewGrid(tau, nil)
	if err != nil {
		t.Fatal(err)
	}
	gam, w := g.GammaPerS(), g.Weights()
	n := len(gam)
	if n != DefaultNGamma || g.NGamma() != n || g.NLags() != len(tau) {
		t.Fatalf("sizes: %d rates, %d lags", n, g.NLags())
	}
	// Documented defaults: Γmin = 0.2/τmax and Γmax = 1/τmin, exactly.
	if gam[0] != DefaultGammaMinTimesTauMax/tau[len(tau)-1] || gam[n-1] != DefaultGammaMaxTimesTauMin/tau[0] {
		t.Errorf("range [%g, %g]", gam[0], gam[n-1])
	}
	// Log spacing: every step in ln Γ equals the mean step (rounding of
	// exp/log only, 1e-12 relative).
	h := math.Log(gam[n-1]/gam[0]) / float64(n-1)
	for j := 1; j < n; j++ {
		if d := math.Log(gam[j] / gam[j-1]); !scalar.EqualWithinRel(d, h, 1e-9) {
			t.Fatalf("step %d: %g, want %g", j, d, h)
		}
	}
	// The trapezoid rule in ln Γ integrates a constant exactly:
	// Σ w_j = ln(Γmax/Γmin).
	var sw float64
	for _, v := range w {
		sw += v
	}
	if !scalar.EqualWithinRel(sw, math.Log(gam[n-1]/gam[0]), 1e-12) {
		t.Errorf("Σw = %g, want %g", sw, math.Log(gam[n-1]/gam[0]))
	}
	if w[0] != w[1]/2 || w[n-1] != w[n-2]/2 {
		t.Errorf("end weights %g %g, interior %g", w[0], w[n-1], w[1])
	}
	// Kernel entries are exp(−Γτ) (math.Exp), except those below 1e-25 of
	// their column's largest, which are zero.
	a := g.Kernel()
	for i := 0; i < len(tau); i++ {
		for j := 0; j < n; j++ {
			want := math.Exp(-gam[j] * tau[i])
			got := a.At(i, j)
			if got == 0 && want < 1e-25*math.Exp(-gam[j]*tau[0]) {
				continue
			}
			if got != want {
				t.Fatalf("A[%d][%d] = %g, want exp(−Γτ) = %g", i, j, got, want)
			}
		}
	}
	if len(g.Warnings()) != 0 {
		t.Errorf("unexpected warnings %v", g.Warnings())
	}
}

// TestRegulariser checks R = L'L against the hand-derived band: with Gt = 0
// at two points beyond each end, every column of L holds (1, −2, 1)/w_j, so
// R_jk = c_|j−k| / (w_j w_k) with c = (6, −4, 1) for every j, including the
// ends (1 + 4 + 1 = 6 on the diagonal, −2 − 2 = −4 next to it).
func TestRegulariser(t *testing.T) {
	tau, _ := multiTau(1e-6, 8, 60)
	g, err := NewGrid(tau, &GridSettings{NGamma: 20})
	if err != nil {
		t.Fatal(err)
	}
	w := g.Weights()
	r := g.Regulariser()
	c := [3]float64{6, -4, 1}
	for j := 0; j < 20; j++ {
		for k := 0; k < 20; k++ {
			want := 0.0
			if d := j - k; d >= -2 && d <= 2 {
				want = c[max(d, -d)] / (w[j] * w[k])
			}
			if got := r.At(j, k); !scalar.EqualWithinAbsOrRel(got, want, 1e-12, 1e-12) {
				t.Fatalf("R[%d][%d] = %g, want %g", j, k, got, want)
			}
		}
	}
	// ||L x/w||² computed from the second differences equals x'Rx.
	rng := rand.New(rand.NewPCG(3, 4))
	x := make([]float64, 20)
	for i := range x {
		x[i] = rng.Float64()
	}
	var xrx float64
	for j := range x {
		for k := range x {
			xrx += x[j] * r.At(j, k) * x[k]
		}
	}
	if n := g.normLx(x); !scalar.EqualWithinRel(n*n, xrx, 1e-12) {
		t.Errorf("||Lx||² = %g, x'Rx = %g", n*n, xrx)
	}
	if !scalar.EqualWithinRel(g.trR, r.Trace(), 1e-14) {
		t.Errorf("tr R %g vs %g", g.trR, r.Trace())
	}
}

// TestTriangleKernel compares the closed form of the triangle-averaged
// kernel with Gauss–Legendre quadrature (gonum integrate/quad) of
// (1 − |u|/Δ)/Δ·exp(−Γ(τ+u)) over [−Δ, Δ], split at the kink u = 0;
// 40 nodes per half integrate this smooth integrand to rounding.
func TestTriangleKernel(t *testing.T) {
	tau, width := multiTau(1e-6, 4, 30)
	g, err := NewGrid(tau, &GridSettings{NGamma: 16, GammaMinPerS: 10, GammaMaxPerS: 3e6, ChannelWidthS: width})
	if err != nil {
		t.Fatal(err)
	}
	a := g.Kernel()
	gam := g.GammaPerS()
	for i, ti := range tau {
		d := width[i]
		for j, gj := range gam {
			f := func(u float64) float64 { return (1 - math.Abs(u)/d) / d * math.Exp(-gj*(ti+u)) }
			want := quad.Fixed(f, -d, 0, 40, quad.Legendre{}, 0) + quad.Fixed(f, 0, d, 40, quad.Legendre{}, 0)
			got := a.At(i, j)
			if want < 1e-25*math.Exp(-gj*tau[0]) && got == 0 {
				continue
			}
			if !scalar.EqualWithinRel(got, want, 1e-11) {
				t.Fatalf("A[%d][%d] (Γτ = %.3g, ΓΔ = %.3g) = %.15g, quadrature %.15g", i, j, gj*ti, gj*d, got, want)
			}
		}
	}
}

func TestGridErrors(t *testing.T) {
	good, _ := multiTau(1e-6, 8, 40)
	mod := func(f func([]float64) []float64) []float64 { return f(append([]float64(nil), good...)) }
	cases := []struct {
		name string
		tau  []float64
		s    *GridSettings
		want error
	}{
		{"too few lags", good[:MinPoints-1], nil, ErrTooFewPoints},
		{"nan lag", mod(func(v []float64) []float64 { v[3] = math.NaN(); return v }), nil, ErrNonFinite},
		{"inf lag", mod(func(v []float64) []float64 { v[39] = math.Inf(1); return v }), nil, ErrNonFinite},
		{"zero lag", mod(func(v []float64) []float64 { v[0] = 0; return v }), nil, ErrBadLag},
		{"not increasing", mod(func(v []float64) []float64 { v[5] = v[4]; return v }), nil, ErrBadLag},
		{"few rates", good, &GridSettings{NGamma: 3}, ErrBadSettings},
		{"many rates", good, &GridSettings{NGamma: MaxGammaPoints + 1}, ErrBadSettings},
		{"negative rate", good, &GridSettings{GammaMinPerS: -1}, ErrBadSettings},
		{"nan rate", good, &GridSettings{GammaMaxPerS: math.NaN()}, ErrNonFinite},
		{"empty range", good, &GridSettings{GammaMinPerS: 1e4, GammaMaxPerS: 1e3}, ErrBadGrid},
		{"rates too slow", good, &GridSettings{GammaMinPerS: 1e-6, GammaMaxPerS: 1e-3}, ErrBadGrid},
		{"rates too fast", good, &GridSettings{GammaMinPerS: 1e8, GammaMaxPerS: 1e9}, ErrBadGrid},
		{"underflow", good, &GridSettings{GammaMaxPerS: 1e9}, ErrBadGrid},
		{"width length", good, &GridSettings{ChannelWidthS: good[:3]}, ErrLength},
		{"width above lag", good, &GridSettings{ChannelWidthS: mod(func(v []float64) []float64 { v[2] *= 2; return v })}, ErrBadSettings},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			g, err := NewGrid(c.tau, c.s)
			if !errors.Is(err, c.want) || g != nil {
				t.Fatalf("got %v, %v; want %v", g, err, c.want)
			}
			var cache Cache
			if _, err := cache.Grid(c.tau, c.s); !errors.Is(err, c.want) {
				t.Fatalf("cache: got %v, want %v", err, c.want)
			}
		})
	}
}

func TestGridWarnings(t *testing.T) {
	tau, _ := multiTau(1e-6, 8, 40)
	// 8 rates over 8 decades: 0.9 per decade.
	g, err := NewGrid(tau, &GridSettings{NGamma: 8, GammaMinPerS: 1, GammaMaxPerS: 1e8})
	if err != nil {
		t.Fatal(err)
	}
	ws := g.Warnings()
	if len(ws) != 3 {
		t.Fatalf("want 3 warnings (slow end, fast end, coarse), got %v", ws)
	}
	for _, w := range ws {
		if !errors.Is(w, ErrIllConditioned) {
			t.Errorf("%v does not wrap ErrIllConditioned", w)
		}
	}
}

func TestCache(t *testing.T) {
	tau, _ := multiTau(1e-6, 8, 80)
	var c Cache
	a, err := c.Grid(tau, nil)
	if err != nil {
		t.Fatal(err)
	}
	// Settings equal to the defaults once filled in share the grid.
	b, _ := c.Grid(append([]float64(nil), tau...), &GridSettings{NGamma: DefaultNGamma, GammaMaxPerS: 1 / tau[0]})
	if a != b || c.Len() != 1 {
		t.Fatalf("equal grids not shared: %p %p, %d entries", a, b, c.Len())
	}
	d, _ := c.Grid(tau, &GridSettings{NGamma: 50})
	other := append([]float64(nil), tau...)
	other[10] = math.Nextafter(other[10], 1)
	e, _ := c.Grid(other, nil)
	if d == a || e == a || c.Len() != 3 {
		t.Fatalf("distinct grids shared: %d entries", c.Len())
	}
	// Concurrent first requests build one grid.
	var c2 Cache
	var wg sync.WaitGroup
	got := make([]*Grid, 16)
	for i := range got {
		wg.Add(1)
		go func() {
			defer wg.Done()
			got[i], _ = c2.Grid(tau, nil)
		}()
	}
	wg.Wait()
	for _, g := range got {
		if g == nil || g != got[0] {
			t.Fatal("concurrent requests returned different grids")
		}
	}
	if c2.Len() != 1 {
		t.Fatalf("%d entries after concurrent requests", c2.Len())
	}
}

// The cache holds at most CacheSize grids and evicts the least recently
// requested one; a rebuilt grid equals the evicted one (same kernel), so
// eviction cannot change an inversion.
func TestCacheEvicts(t *testing.T) {
	tau, _ := multiTau(1e-6, 8, 80)
	var c Cache
	first, err := c.Grid(tau, &GridSettings{NGamma: 20})
	if err != nil {
		t.Fatal(err)
	}
	// A temperature series: one grid per slowest rate.
	for k := range 2 * CacheSize {
		if _, err := c.Grid(tau, &GridSettings{NGamma: 20, GammaMinPerS: 10 + float64(k)}); err != nil {
			t.Fatal(err)
		}
		if k == CacheSize/2 {
			c.Grid(tau, &GridSettings{NGamma: 20}) // keep the first grid recent
		}
		if c.Len() > CacheSize {
			t.Fatalf("%d grids held, at most %d", c.Len(), CacheSize)
		}
	}
	if c.Len() != CacheSize {
		t.Errorf("%d grids held after %d distinct ones, want %d", c.Len(), 2*CacheSize+1, CacheSize)
	}
	// The first grid was requested again halfway, then pushed out by the
	// later CacheSize+… distinct ones; a new request rebuilds an equal grid.
	again, _ := c.Grid(tau, &GridSettings{NGamma: 20})
	if again == first {
		t.Error("the least recently used grid was not evicted")
	}
	if !slices.Equal(again.at, first.at) || again.trR != first.trR {
		t.Error("rebuilt grid differs from the evicted one")
	}
	// The most recent grid stays.
	last := GridSettings{NGamma: 20, GammaMinPerS: 10 + float64(2*CacheSize-1)}
	a, _ := c.Grid(tau, &last)
	b, _ := c.Grid(tau, &last)
	if a != b {
		t.Error("a recent grid was rebuilt")
	}
}
