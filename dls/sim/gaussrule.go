package sim

import (
	"errors"
	"math"

	"gonum.org/v1/gonum/mat"
)

// gaussRule returns the k-point Gauss quadrature rule (nodes x, weights v)
// of the discrete measure with points r and weights w ≥ 0: Σ v·f(x) equals
// Σ w·f(r) for every polynomial f of degree below 2k. The orthonormal
// polynomials of the measure are built by the Stieltjes procedure, and the
// rule is read from the eigen-decomposition of their Jacobi matrix: the
// nodes are its eigenvalues and the weights Σw times the squared first
// components of its eigenvectors (G. H. Golub, J. H. Welsch, "Calculation
// of Gauss quadrature rules", Math. Comp. 23, 221–230, 1969). Fewer than k
// nodes are returned when the measure has fewer independent points.
func gaussRule(r, w []float64, k int) (x, v []float64, err error) {
	n := len(r)
	var sw, mean float64
	for i := range r {
		sw += w[i]
		mean += w[i] * r[i]
	}
	if !(sw > 0) {
		return nil, nil, errors.New("size distribution has no weight")
	}
	mean /= sw
	// Work in t = r/mean so the recurrence stays near 1.
	t := make([]float64, n)
	for i := range r {
		t[i] = r[i] / mean
	}
	k = min(k, n)
	alpha := make([]float64, 0, k)
	beta := make([]float64, 0, k) // off-diagonal b_1 … b_(k−1)
	pPrev := make([]float64, n)
	p := make([]float64, n)
	next := make([]float64, n)
	for i := range p {
		p[i] = 1 / math.Sqrt(sw)
	}
	bPrev := 0.0
	for j := 0; j < k; j++ {
		a := 0.0
		for i := range t {
			a += w[i] * t[i] * p[i] * p[i]
		}
		alpha = append(alpha, a)
		if j == k-1 {
			break
		}
		nn := 0.0
		for i := range t {
			next[i] = (t[i]-a)*p[i] - bPrev*pPrev[i]
			nn += w[i] * next[i] * next[i]
		}
		b := math.Sqrt(nn)
		if !(b > 1e-12) {
			break // the measure has only j+1 independent points
		}
		for i := range next {
			next[i] /= b
		}
		beta = append(beta, b)
		pPrev, p, next = p, next, pPrev
		bPrev = b
	}
	m := len(alpha)
	jac := mat.NewSymDense(m, nil)
	for i := range m {
		jac.SetSym(i, i, alpha[i])
		if i+1 < m {
			jac.SetSym(i, i+1, beta[i])
		}
	}
	var es mat.EigenSym
	if !es.Factorize(jac, true) {
		return nil, nil, errors.New("gauss rule: eigen-decomposition failed")
	}
	vals := es.Values(nil)
	var vecs mat.Dense
	es.VectorsTo(&vecs)
	x, v = make([]float64, 0, m), make([]float64, 0, m)
	for i := range m {
		u := vecs.At(0, i)
		if wt := sw * u * u; wt > 0 {
			if !(vals[i] > 0) {
				return nil, nil, errors.New("gauss rule: non-positive node")
			}
			x = append(x, vals[i]*mean)
			v = append(v, wt)
		}
	}
	return x, v, nil
}
