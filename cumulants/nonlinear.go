package cumulants

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/lapack/lapack64"
	"gonum.org/v1/gonum/mat"
)

// nonlinear fits y = B + β·[exp(−Γτ)·(1 + μ2τ²/2 − μ3τ³/6)]^e over channels
// p.first..last by Levenberg–Marquardt with an analytic Jacobian, starting
// from the linear estimate. Lags are scaled by the starting rate Γ₀ so that
// every parameter is of order one: t = Γ₀τ, g = Γ/Γ₀, v = μ2/Γ₀², w = μ3/Γ₀³.
func (p *prepared) nonlinear(s *Settings, lin LinearEstimate, last int, r *Result) error {
	// When the correlation has reached its baseline, the far channels join
	// the fit: there the model is B alone, and these channels, whose noise
	// is the smallest of the correlogram, pin the baseline that would
	// otherwise trade off against μ2 inside a truncated range.
	useTail := p.baseReached
	g0 := lin.GammaPerS
	// Parameters: B, β, g, v, w.
	par := [5]float64{p.farBase, lin.Intercept, 1, lin.Mu2PerS2 / (g0 * g0), 0}
	if lin.PDI < 0 || lin.PDI > 1 {
		par[3] = 0 // a wild linear μ2 is a poor start; the monodisperse one is safe
	}
	if p.start != nil {
		// Refits start from an earlier fit of the same data.
		w := p.start
		par = [5]float64{w.Baseline, w.Intercept, w.GammaPerS / g0, w.Mu2PerS2 / (g0 * g0), w.Mu3PerS3 / (g0 * g0 * g0)}
	}
	np := 4
	if s.Order == 3 {
		np = 5
	}
	// lo = 1 holds the baseline fixed at its start value: the range-check
	// refits keep the main fit's baseline, so that they test the cumulant
	// series against the range and not how well a short range fixes B.
	lo := 0
	if p.fixBase {
		lo = 1
	}
	k := np - lo
	// The point lists live in scratch space shared by the fits of one Fit.
	if c := len(p.tau); cap(p.idxBuf) < c { // distinct channels: at most all
		p.idxBuf = make([]int, 0, c)
		p.ptBuf = make([]float64, 4*c)
	}
	idx := p.idxBuf[:0]
	for k := p.first; k <= last; k++ {
		idx = append(idx, k)
	}
	if useTail {
		for k := max(last+1, len(p.tau)-p.tailN); k < len(p.tau); k++ {
			idx = append(idx, k)
		}
	}
	m := len(idx)
	c := cap(p.idxBuf)
	t := p.ptBuf[:m:m]
	y := p.ptBuf[c : c+m : c+m]
	w := p.ptBuf[2*c : 2*c+m : 2*c+m]
	exs := p.ptBuf[3*c : 3*c+m : 3*c+m]
	for i, k := range idx {
		t[i] = p.tau[k] * g0
		y[i] = p.y[k]
		w[i] = 1 / (p.sigma[k] * p.sigma[k])
	}

	// point returns the residual and the model's gradient at point i.
	point := func(q *[5]float64, i int, ex float64) (res float64, jac [5]float64) {
		ti := t[i]
		poly := 1 + q[3]*ti*ti/2 - q[4]*ti*ti*ti/6
		f := ex * poly
		fe, dfe := f, 1.0 // f^e and d(f^e)/df
		if p.e == 2 {
			fe, dfe = f*f, 2*f
		}
		res = y[i] - (q[0] + q[1]*fe)
		bd := q[1] * dfe
		jac[0] = 1
		jac[1] = fe
		jac[2] = bd * (-ti * f)
		jac[3] = bd * ex * ti * ti / 2
		jac[4] = bd * ex * (-ti * ti * ti / 6)
		return res, jac
	}
	// eval returns χ² at q and fills JᵀWJ (upper triangle) and JᵀWr.
	eval := func(q *[5]float64, jtj *[5][5]float64, jtr *[5]float64) float64 {
		*jtj = [5][5]float64{}
		*jtr = [5]float64{}
		decays(q[2], t, exs)
		if np == 4 && unrolledOrder2 {
			return evalOrder2(q, jtj, jtr, t, y, w, exs, p.e == 2, lo == 0)
		}
		var chi float64
		for i := range t {
			res, jac := point(q, i, exs[i])
			wi := w[i]
			chi += wi * res * res
			for a := lo; a < np; a++ {
				wa := wi * jac[a]
				jtr[a] += wa * res
				for b := a; b < np; b++ {
					jtj[a][b] += wa * jac[b]
				}
			}
		}
		return chi
	}
	var jtj, jtjT [5][5]float64
	var jtr, jtrT [5]float64

	// The damped normal equations are k×k (k ≤ 5): factorised with LAPACK's
	// Cholesky on a raw slice, which skips the condition estimate that
	// mat.Cholesky computes on every call.
	var hArr [25]float64
	var stepArr [5]float64
	hbuf, stepv := hArr[:k*k], stepArr[:k]
	h := blas64.Symmetric{N: k, Stride: k, Data: hbuf, Uplo: blas.Upper}
	lambda := 1e-3
	chi := eval(&par, &jtj, &jtr)
	converged := false
	iter := 0
	for iter = 1; iter <= s.MaxIter; iter++ {
		for a := lo; a < np; a++ {
			stepv[a-lo] = jtr[a]
			for b := a; b < np; b++ {
				v := jtj[a][b]
				if a == b {
					v *= 1 + lambda
				}
				hbuf[(a-lo)*k+(b-lo)] = v
			}
		}
		tri, ok := lapack64.Potrf(h)
		if !ok {
			lambda *= 10
			if lambda > 1e12 {
				break
			}
			continue
		}
		lapack64.Potrs(tri, blas64.General{Rows: k, Cols: 1, Stride: 1, Data: stepv})
		trial := par
		for a := lo; a < np; a++ {
			trial[a] += stepv[a-lo]
		}
		chiT := eval(&trial, &jtjT, &jtrT)
		// A step that changes no parameter beyond 1e-9 of its size, or χ²
		// beyond 1e-8 of itself, marks a minimum to working precision
		// whether or not rounding let χ² fall.
		small := true
		for a := lo; a < np; a++ {
			if math.Abs(stepv[a-lo]) > 1e-9*(math.Abs(par[a])+1e-6) {
				small = false
			}
		}
		flat := math.Abs(chi-chiT) <= 1e-8*chi
		if chiT <= chi && isFinite(chiT) {
			par, chi, jtj, jtr = trial, chiT, jtjT, jtrT
			lambda = math.Max(lambda/10, 1e-12)
		} else {
			lambda *= 10
		}
		if small || flat || lambda > 1e12 {
			converged = true
			break
		}
	}
	if iter > s.MaxIter {
		iter = s.MaxIter
	}
	if !(par[2] > 0) {
		return fmt.Errorf("%w: the nonlinear cumulant fit gives a non-positive decay rate", ErrNoDecay)
	}
	r.Iterations = iter
	r.farFitted = useTail
	r.Converged = converged
	if !converged {
		r.Warnings = append(r.Warnings, fmt.Errorf("nonlinear cumulant fit stopped at the iteration bound (%d) before converging", s.MaxIter))
	}
	r.Baseline = par[0]
	r.Intercept = par[1]
	r.GammaPerS = par[2] * g0
	r.Mu2PerS2 = par[3] * g0 * g0
	if s.Order == 3 {
		r.Mu3PerS3 = par[4] * g0 * g0 * g0
	}
	r.PDI = par[3] / (par[2] * par[2])
	if !p.fixBase && !p.noCurves {
		p.finish(r, last, k)
	}
	if p.skipCov {
		return nil // the caller needs no standard errors from this fit
	}

	// Covariance. With σ given: (JᵀWJ)⁻¹. With σ estimated from the
	// residuals, the weights are themselves noisy and (JᵀWJ)⁻¹ overstates
	// the information (by about 20 % in the standard error of Γ̄ on
	// simulated multi-tau data); the heteroscedasticity-consistent sandwich
	// A⁻¹·(Σ w_i² r_i² J_iJ_iᵀ)·A⁻¹ with A = JᵀWJ, and the HC3 leverage
	// correction r_i/(1 − h_ii) (White 1980, Econometrica 48, 817; MacKinnon
	// & White 1985, J. Econometrics 29, 305), uses the residuals
	// themselves and restores it.
	hs := mat.NewSymDense(k, nil)
	for a := lo; a < np; a++ {
		for b := a; b < np; b++ {
			hs.SetSym(a-lo, b-lo, jtj[a][b])
		}
	}
	var ch mat.Cholesky
	var cov mat.SymDense
	ok := ch.Factorize(hs) && ch.InverseTo(&cov) == nil
	if ok && p.sigmaEstimated {
		// In plain arrays (k ≤ 5): c = A⁻¹, meat = Σ e_i² J_iJ_iᵀ, and the
		// sandwich c·meat·c, symmetrised.
		var c, meat [5][5]float64
		for a := 0; a < k; a++ {
			for b := 0; b < k; b++ {
				c[a][b] = cov.At(a, b)
			}
		}
		decays(par[2], t, exs)
		var jv [5]float64
		for i := range t {
			res, jac := point(&par, i, exs[i])
			copy(jv[:k], jac[lo:np])
			// Leverage h_ii = w_i·J_iᵀ A⁻¹ J_i.
			var quad float64
			for a := 0; a < k; a++ {
				var ca float64
				for b := 0; b < k; b++ {
					ca += c[a][b] * jv[b]
				}
				quad += jv[a] * ca
			}
			h := w[i] * quad
			if h > 0.99 {
				h = 0.99
			}
			e := w[i] * res / (1 - h)
			e2 := e * e
			for a := 0; a < k; a++ {
				ea := e2 * jv[a]
				for b := a; b < k; b++ {
					meat[a][b] += ea * jv[b]
				}
			}
		}
		for a := 0; a < k; a++ {
			for b := 0; b < a; b++ {
				meat[a][b] = meat[b][a]
			}
		}
		var left [5][5]float64
		for a := 0; a < k; a++ {
			for b := 0; b < k; b++ {
				var v float64
				for d := 0; d < k; d++ {
					v += c[a][d] * meat[d][b]
				}
				left[a][b] = v
			}
		}
		var sand [5][5]float64
		for a := 0; a < k; a++ {
			for b := 0; b < k; b++ {
				var v float64
				for d := 0; d < k; d++ {
					v += left[a][d] * c[d][b]
				}
				sand[a][b] = v
			}
		}
		for a := 0; a < k; a++ {
			for b := a; b < k; b++ {
				cov.SetSym(a, b, 0.5*(sand[a][b]+sand[b][a]))
			}
		}
	}
	if ok {
		vg, vv, cgv := cov.At(2-lo, 2-lo), cov.At(3-lo, 3-lo), cov.At(2-lo, 3-lo)
		r.GammaSEPerS = math.Sqrt(math.Max(0, vg)) * g0
		// PDI = v/g²: ∂/∂v = 1/g², ∂/∂g = −2v/g³.
		dv, dg := 1/(par[2]*par[2]), -2*par[3]/(par[2]*par[2]*par[2])
		r.PDISE = math.Sqrt(math.Max(0, dv*dv*vv+dg*dg*vg+2*dv*dg*cgv))
	} else {
		r.Warnings = append(r.Warnings, errors.New("cumulant fit covariance is singular: standard errors not available"))
	}
	return nil
}

// unrolledOrder2 selects evalOrder2 for second-order fits. A variable only
// so that tests can compare it with the general loop.
var unrolledOrder2 = true

// evalOrder2 is eval of the second-order model (parameters B, β, g, v;
// with fit0 false B is held): the same residuals, gradients and sums as
// point and the general loop, term by term in the same order, unrolled.
func evalOrder2(q *[5]float64, jtj *[5][5]float64, jtr *[5]float64, t, y, w, exs []float64, square, fit0 bool) float64 {
	q0, q1, q3, q4 := q[0], q[1], q[3], q[4]
	y, w, exs = y[:len(t)], w[:len(t)], exs[:len(t)]
	var chi float64
	for i, ti := range t {
		ex := exs[i]
		poly := 1 + q3*ti*ti/2 - q4*ti*ti*ti/6
		f := ex * poly
		fe, dfe := f, 1.0
		if square {
			fe, dfe = f*f, 2*f
		}
		res := y[i] - (q0 + q1*fe)
		bd := q1 * dfe
		j0 := 1.0
		j1 := fe
		j2 := bd * (-ti * f)
		j3 := bd * ex * ti * ti / 2
		wi := w[i]
		chi += wi * res * res
		if fit0 {
			wa := wi * j0
			jtr[0] += wa * res
			jtj[0][0] += wa * j0
			jtj[0][1] += wa * j1
			jtj[0][2] += wa * j2
			jtj[0][3] += wa * j3
		}
		wa := wi * j1
		jtr[1] += wa * res
		jtj[1][1] += wa * j1
		jtj[1][2] += wa * j2
		jtj[1][3] += wa * j3
		wa = wi * j2
		jtr[2] += wa * res
		jtj[2][2] += wa * j2
		jtj[2][3] += wa * j3
		wa = wi * j3
		jtr[3] += wa * res
		jtj[3][3] += wa * j3
	}
	return chi
}

// decays sets ex[i] to exp(−g·t[i]) for the increasing points t. Along a
// run of equal spacings (a multi-tau stage; spacings within 1e-13 of each
// other count as equal) the value is carried by the factor exp(−g·Δt)
// from the run's first point, where it is computed directly: two
// exponentials per stage instead of one per point, within 1e-14 of the
// direct values over a stage of 16 (TestDecaysMatchExp). The points of one
// fit share the stages, so every iteration takes the same path.
func decays(g float64, t, ex []float64) {
	ex = ex[:len(t)]
	run := math.NaN() // spacing of the current run
	var step float64
	for i, ti := range t {
		if i > 0 {
			if d := ti - t[i-1]; math.Abs(d-run) <= 1e-13*run {
				ex[i] = ex[i-1] * step
				continue
			} else if i+1 < len(t) && math.Abs((t[i+1]-ti)-d) <= 1e-13*d {
				// A new run starts here: its step, once.
				run, step = d, math.Exp(-g*d)
			} else {
				run = math.NaN()
			}
		}
		ex[i] = math.Exp(-g * ti)
	}
}

// fitChannels lists the channels of a nonlinear fit over first..last and,
// with tail, the last tailN channels beyond last.
func fitChannels(first, last, n, tailN int, tail bool) []int {
	idx := make([]int, 0, last-first+1+tailN)
	for k := first; k <= last; k++ {
		idx = append(idx, k)
	}
	if tail {
		for k := max(last+1, n-tailN); k < n; k++ {
			idx = append(idx, k)
		}
	}
	return idx
}
