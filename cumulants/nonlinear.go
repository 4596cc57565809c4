package cumulants

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"dlsbatch/dls"
)

// nonlinear fits y = B + β·[exp(−Γτ)·(1 + μ2τ²/2 − μ3τ³/6)]^e over channels
// p.first..last by Levenberg–Marquardt with an analytic Jacobian, starting
// from the linear estimate. Lags are scaled by the starting rate Γ₀ so that
// every parameter is of order one: t = Γ₀τ, g = Γ/Γ₀, v = μ2/Γ₀², w = μ3/Γ₀³.
func (p *prepared) nonlinear(s *Settings, lin LinearEstimate, last int, r *Result) error {
	g0 := lin.GammaPerS
	np := 4
	if s.Order == 3 {
		np = 5
	}
	// Parameters: B, β, g, v, w.
	par := [5]float64{p.farBase, lin.Intercept, 1, lin.Mu2PerS2 / (g0 * g0), 0}
	if lin.PDI < 0 || lin.PDI > 1 {
		par[3] = 0 // a wild linear μ2 is a poor start; the monodisperse one is safe
	}
	m := last - p.first + 1
	t := make([]float64, m)
	y := make([]float64, m)
	w := make([]float64, m)
	for i := range t {
		k := p.first + i
		t[i] = p.tau[k] * g0
		y[i] = p.y[k]
		w[i] = 1 / (p.sigma[k] * p.sigma[k])
	}

	var jtj [5][5]float64
	var jtr [5]float64
	eval := func(q *[5]float64, withJ bool) float64 {
		if withJ {
			jtj = [5][5]float64{}
			jtr = [5]float64{}
		}
		var chi float64
		var jac [5]float64
		for i := range t {
			ti := t[i]
			ex := math.Exp(-q[2] * ti)
			poly := 1 + q[3]*ti*ti/2 - q[4]*ti*ti*ti/6
			f := ex * poly
			fe, dfe := f, 1.0 // f^e and d(f^e)/df
			if p.e == 2 {
				fe, dfe = f*f, 2*f
			}
			res := y[i] - (q[0] + q[1]*fe)
			chi += w[i] * res * res
			if !withJ {
				continue
			}
			bd := q[1] * dfe
			jac[0] = 1
			jac[1] = fe
			jac[2] = bd * (-ti * f)
			jac[3] = bd * ex * ti * ti / 2
			jac[4] = bd * ex * (-ti * ti * ti / 6)
			for a := 0; a < np; a++ {
				jtr[a] += w[i] * jac[a] * res
				for b := a; b < np; b++ {
					jtj[a][b] += w[i] * jac[a] * jac[b]
				}
			}
		}
		return chi
	}

	h := mat.NewSymDense(np, nil)
	rhs := mat.NewVecDense(np, nil)
	var step mat.VecDense
	var ch mat.Cholesky
	lambda := 1e-3
	chi := eval(&par, true)
	converged := false
	iter := 0
	for iter = 1; iter <= s.MaxIter; iter++ {
		for a := 0; a < np; a++ {
			rhs.SetVec(a, jtr[a])
			for b := a; b < np; b++ {
				v := jtj[a][b]
				if a == b {
					v *= 1 + lambda
				}
				h.SetSym(a, b, v)
			}
		}
		if !ch.Factorize(h) {
			lambda *= 10
			if lambda > 1e12 {
				break
			}
			continue
		}
		if err := ch.SolveVecTo(&step, rhs); err != nil {
			lambda *= 10
			continue
		}
		trial := par
		for a := 0; a < np; a++ {
			trial[a] += step.AtVec(a)
		}
		chiT := eval(&trial, false)
		if chiT <= chi && isFinite(chiT) {
			small := true
			for a := 0; a < np; a++ {
				if math.Abs(step.AtVec(a)) > 1e-10*(math.Abs(par[a])+1e-6) {
					small = false
				}
			}
			rel := (chi - chiT) / math.Max(chi, 1e-300)
			par = trial
			chi = eval(&par, true)
			lambda = math.Max(lambda/10, 1e-12)
			if small || rel < 1e-12 {
				converged = true
				break
			}
		} else {
			lambda *= 10
			if lambda > 1e12 {
				// No downhill step exists at any damping: a minimum to
				// working precision.
				converged = true
				break
			}
		}
	}
	if iter > s.MaxIter {
		iter = s.MaxIter
	}
	if !(par[2] > 0) {
		return fmt.Errorf("%w: the nonlinear cumulant fit gives a non-positive decay rate", dls.ErrNoDecay)
	}
	r.Iterations = iter
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
	p.finish(r, last, np)

	// Covariance (JᵀWJ)⁻¹, scaled by the reduced χ² when σ was estimated.
	for a := 0; a < np; a++ {
		for b := a; b < np; b++ {
			h.SetSym(a, b, jtj[a][b])
		}
	}
	var cov mat.SymDense
	if ch.Factorize(h) && ch.InverseTo(&cov) == nil {
		sc := r.scaleChi()
		vg, vv, cgv := cov.At(2, 2)*sc, cov.At(3, 3)*sc, cov.At(2, 3)*sc
		r.GammaSEPerS = math.Sqrt(math.Max(0, vg)) * g0
		// PDI = v/g²: ∂/∂v = 1/g², ∂/∂g = −2v/g³.
		dv, dg := 1/(par[2]*par[2]), -2*par[3]/(par[2]*par[2]*par[2])
		r.PDISE = math.Sqrt(math.Max(0, dv*dv*vv+dg*dg*vg+2*dv*dg*cgv))
	} else {
		r.Warnings = append(r.Warnings, errors.New("cumulant fit covariance is singular: standard errors not available"))
	}
	return nil
}
