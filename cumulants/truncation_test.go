package cumulants

import (
	"math"
	"testing"
)

// TestTruncationBias checks the truncation estimate against the actual
// bias of the second-order fit on exact correlograms: intensity-weighted
// lognormal distributions of decay rates (lognormal moments closed form,
// Aitchison & Brown 1957: ⟨Γ⟩ = median·e^(σ²/2), PDI = e^(σ²) − 1; g1 by
// the trapezoid rule in ln Γ, exponentially accurate) and a two-rate
// mixture (g1 closed form), on a 200-channel multi-tau grid from 25 ns,
// 173° rates of about 3400 /s, σ = 1e-3 on every channel. The estimate
// is the size of the bias, not its sign: the test asks |actual| ≤ 2·|est|
// and |est| ≤ 2·|actual| (the one-step PDI correction misses about a
// fifth of the bias at PDI 0.4; factor 2 leaves room), and zero bias for
// a monodisperse sample.
func TestTruncationBias(t *testing.T) {
	tau := multiTauGrid(25e-9, 8, 200)
	sigma := make([]float64, len(tau))
	for i := range sigma {
		sigma[i] = 1e-3
	}
	const gam = 3400.0
	two := func(g1, g2, w1 float64) func(float64) float64 {
		return func(t float64) float64 { return w1*math.Exp(-g1*t) + (1-w1)*math.Exp(-g2*t) }
	}
	cases := []struct {
		name      string
		g1        func(float64) float64
		mean, pdi float64
	}{
		{"monodisperse", func(t float64) float64 { return math.Exp(-gam * t) }, gam, 0},
		{"lognormal PDI 0.1", nil, gam, 0.1},
		{"lognormal PDI 0.22", nil, gam, 0.22},
		{"lognormal PDI 0.4", nil, gam, 0.4},
		// 70/30 by intensity of rates 3 : 1 (spheres of 60 and 180 nm).
		{"two rates 3:1, 70/30", two(3*1300.0, 1300, 0.7), 0.7*3*1300 + 0.3*1300, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			y := make([]float64, len(tau))
			if c.g1 == nil {
				y = exactLognormal(tau, c.mean, c.pdi)
			} else {
				for i, tt := range tau {
					g := c.g1(tt)
					y[i] = 1 + 0.9*g*g
				}
			}
			r, err := Fit(tau, y, sigma, G2, nil)
			if err != nil {
				t.Fatal(err)
			}
			tr, err := TruncationBias(tau, G2, nil, r)
			if err != nil {
				t.Fatal(err)
			}
			actual := r.GammaPerS/c.mean - 1
			t.Logf("PDI fitted %.3f, lognormal-corrected %.3f; Γ̄ bias %+.3f %%, estimate %+.3f %%", r.PDI, tr.PDILognormal, 100*actual, 100*tr.GammaBias)
			if c.name == "monodisperse" {
				if math.Abs(tr.GammaBias) > 1e-6 || math.Abs(actual) > 1e-6 {
					t.Errorf("monodisperse: bias %g, estimate %g; want both 0 (within 1e-6, the fit's convergence)", actual, tr.GammaBias)
				}
				return
			}
			est := math.Abs(tr.GammaBias)
			if math.Abs(actual) > 2*est || est > 2*math.Abs(actual) {
				t.Errorf("estimate %.3g %% against actual bias %.3g %%: not within a factor 2", 100*est, 100*actual)
			}
		})
	}
}

// multiTauGrid is the lag grid of a multi-tau correlator: 2M channels at
// dt, then M per stage at doubling sample times.
func multiTauGrid(dt float64, m, n int) []float64 {
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

// exactLognormal returns g2 = 1 + 0.9·g1² for an intensity-weighted
// lognormal distribution of rates with the given mean and PDI, by the
// trapezoid rule in z = ln(Γ/median)/σ over ±8 with 2001 nodes (an
// independent quadrature of the one in the code: accurate to rounding).
func exactLognormal(tau []float64, mean, pdi float64) []float64 {
	sg := math.Sqrt(math.Log1p(pdi))
	med := mean * math.Exp(-sg*sg/2)
	const k = 2001
	y := make([]float64, len(tau))
	for i, t := range tau {
		var s, sw float64
		for j := range k {
			z := -8 + 16*float64(j)/(k-1)
			w := math.Exp(-z * z / 2)
			s += w * math.Exp(-med*math.Exp(sg*z)*t)
			sw += w
		}
		g := s / sw
		y[i] = 1 + 0.9*g*g
	}
	return y
}

// TestLognormalCurveSteps checks lognormalCurve, whose nodes' exponentials
// are carried along each multi-tau stage by a constant factor, against
// the same 29-node rule with one exponential per node and lag
// (lognormalCurveDirect; tolerance 1e-13 of β: at most 8–16 products per
// stage and the spacings' rounding), and against an independent
// quadrature of the lognormal's g1 (exactLognormal, 2001 nodes; the
// rule's error bound 1e-8 of β for σ ≤ 1, see lognormalCurve), at PDI
// 0.02–1.
func TestLognormalCurveSteps(t *testing.T) {
	tau := multiTauGrid(25e-9, 8, 200)
	for _, pdi := range []float64{0.02, 0.1, 0.4, 1} {
		got := lognormalCurve(tau, 3400, pdi, 1, 0.9, 2)
		direct := lognormalCurveDirect(tau, 3400, pdi, 1, 0.9, 2)
		exact := exactLognormal(tau, 3400, pdi)
		for i := range tau {
			if d := math.Abs(got[i] - direct[i]); d > 1e-13*0.9 {
				t.Errorf("PDI %g, lag %d (%.3g s): %.17g, per-lag exponentials %.17g", pdi, i, tau[i], got[i], direct[i])
			}
			if d := math.Abs(got[i] - exact[i]); d > 1e-8*0.9 {
				t.Errorf("PDI %g, lag %d (%.3g s): %.12g, independent quadrature %.12g", pdi, i, tau[i], got[i], exact[i])
			}
		}
	}
}

// lognormalCurveDirect is lognormalCurve with one exponential per node and
// lag.
func lognormalCurveDirect(tau []float64, gamma, pdi, b, beta, e float64) []float64 {
	const nodes = 29
	sg := math.Sqrt(math.Log1p(pdi))
	med := gamma * math.Exp(-sg*sg/2)
	var rates, w [nodes]float64
	sw := 0.0
	for j := range nodes {
		z := -7 + 14*float64(j)/(nodes-1)
		rates[j] = med * math.Exp(sg*z)
		w[j] = math.Exp(-z * z / 2)
		sw += w[j]
	}
	y := make([]float64, len(tau))
	done := false
	for i, t := range tau {
		if done {
			y[i] = b
			continue
		}
		g := 0.0
		for j := range nodes {
			g += w[j] * math.Exp(-rates[j]*t)
		}
		g /= sw
		done = g < 1e-16
		y[i] = b + beta*math.Pow(g, e)
	}
	return y
}

// TestDecaysMatchExp: the exponentials of a fit's χ² carried along each
// multi-tau stage agree with math.Exp per point to within
// 1e-14 + 4e-16·x relative at exponent x = g·t: a carry over a stage of 16
// is 16 roundings of about 1.1e-16 each plus the step's own, and the
// spacing Δt, a difference of two rounded points, carries an absolute
// error of about ulp(t), which exp turns into a relative one of x·1.1e-16
// (direct exponentials have that sensitivity too). Where the fit's model
// is not negligible, x ≤ 3 or so (g1 ≥ 0.1 at the range end), so the bound
// is about 1e-14 there. Checked on the grids of the tests (stages of 8 and
// of 16) and on a point list with a gap between its range and its far
// channels, as a fit with the baseline reached has.
func TestDecaysMatchExp(t *testing.T) {
	grids := map[string][]float64{
		"stages of 8":  multiTauGrid(25e-9, 8, 200),
		"stages of 16": multiTauGrid(0.5e-6, 16, 200),
	}
	g := grids["stages of 8"]
	grids["range and tail"] = append(append([]float64(nil), g[:120]...), g[180:]...)
	for name, tau := range grids {
		for _, gamma := range []float64{300, 3400, 1e5, 2e6} {
			// The fit's points are lags scaled by its starting rate.
			pts := make([]float64, len(tau))
			for i, v := range tau {
				pts[i] = v * 2900
			}
			g := gamma / 2900
			ex := make([]float64, len(pts))
			decays(g, pts, ex)
			for i, ti := range pts {
				want := math.Exp(-g * ti)
				if d := math.Abs(ex[i] - want); d > (1e-14+4e-16*g*ti)*want && d > 1e-300 {
					t.Errorf("%s, Γ %g, point %d: %.17g, math.Exp %.17g (relative %.2g)", name, gamma, i, ex[i], want, d/want)
				}
			}
		}
	}
}
