package cumulants

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// linCov carries the linear fit's standard errors and third cumulant.
type linCov struct {
	seGamma, sePDI, mu3 float64
}

// linear fits (1/e)·ln(y − B₀) = c0 + c1·t + c2·t² [+ c3·t³], t = τ/τ_last,
// by weighted least squares over channels p.first..last whose y − B₀ exceeds
// 3σ. The weights w = e²(y − B₀)²/σ² are the inverse variances of the
// transformed values. The normal equations are solved by Cholesky: with τ
// scaled to [0, 1] their condition number stays below about 1e6 for cubic
// design matrices, far from double-precision trouble.
//
// With withCov false the standard errors are left out (linCov holds only
// μ3): the nonlinear method reads none of them.
func (p *prepared) linear(order, last int, withCov bool) (LinearEstimate, linCov, error) {
	nc := order + 1
	ts := p.tau[last]
	// Sums in plain arrays (at most 4×4), copied into gonum's types for
	// the solve: the same sums as accumulating in them directly.
	var as [4][4]float64
	var bs [4]float64
	var row [4]float64
	pts := 0
	e := float64(p.e)
	for i := p.first; i <= last; i++ {
		d := p.y[i] - p.farBase
		if d <= 3*p.sigma[i] {
			continue
		}
		z := p.logResidual(i) / e
		w := e * e * d * d / (p.sigma[i] * p.sigma[i])
		t := p.tau[i] / ts
		row[0] = 1
		for k := 1; k < nc; k++ {
			row[k] = row[k-1] * t
		}
		for j := 0; j < nc; j++ {
			bs[j] += w * row[j] * z
			for k := j; k < nc; k++ {
				as[j][k] += w * row[j] * row[k]
			}
		}
		pts++
	}
	a := mat.NewSymDense(nc, nil)
	b := mat.NewVecDense(nc, nil)
	for j := 0; j < nc; j++ {
		b.SetVec(j, bs[j])
		for k := j; k < nc; k++ {
			a.SetSym(j, k, as[j][k])
		}
	}
	if pts < nc+2 {
		return LinearEstimate{}, linCov{}, fmt.Errorf("%w: %d channels above 3σ of the baseline in the fit range, need %d", ErrTooFewPoints, pts, nc+2)
	}
	var ch mat.Cholesky
	if !ch.Factorize(a) {
		return LinearEstimate{}, linCov{}, fmt.Errorf("linear cumulant fit: singular normal equations")
	}
	var c mat.VecDense
	if err := ch.SolveVecTo(&c, b); err != nil {
		return LinearEstimate{}, linCov{}, fmt.Errorf("linear cumulant fit: %w", err)
	}
	c0, c1, c2 := c.AtVec(0), c.AtVec(1), c.AtVec(2)
	est := LinearEstimate{
		GammaPerS: -c1 / ts,
		Mu2PerS2:  2 * c2 / (ts * ts),
		Intercept: math.Exp(e * c0),
		Points:    pts,
	}
	if !(est.GammaPerS > 0) {
		return est, linCov{}, fmt.Errorf("%w: the linear cumulant fit gives a non-positive decay rate", ErrNoDecay)
	}
	est.PDI = est.Mu2PerS2 / (est.GammaPerS * est.GammaPerS)
	var cv linCov
	if order == 3 {
		cv.mu3 = -6 * c.AtVec(3) / (ts * ts * ts)
	}
	if !withCov {
		return est, cv, nil
	}
	// SolveVecTo has already refused an ill-conditioned matrix, which is
	// all that InverseTo would refuse after it.
	var inv mat.SymDense
	if err := ch.InverseTo(&inv); err != nil {
		return LinearEstimate{}, linCov{}, fmt.Errorf("linear cumulant fit: %w", err)
	}
	// PDI = 2·c2/c1²: ∂/∂c2 = 2/c1², ∂/∂c1 = −4·c2/c1³.
	g2, g1 := 2/(c1*c1), -4*c2/(c1*c1*c1)
	cv.seGamma = math.Sqrt(inv.At(1, 1)) / ts
	cv.sePDI = math.Sqrt(math.Max(0, g2*g2*inv.At(2, 2)+g1*g1*inv.At(1, 1)+2*g1*g2*inv.At(1, 2)))
	return est, cv, nil
}

// logResidual returns ln(y_i − B₀) for a channel above the far baseline,
// computed once for all the fits of one prepared correlogram (they share
// y and B₀; their weights and ranges differ). A truncation fit, the only
// fit of its data (noCurves), computes it directly.
func (p *prepared) logResidual(i int) float64 {
	if p.noCurves {
		return math.Log(p.y[i] - p.farBase)
	}
	if p.logY == nil {
		p.logY = make([]float64, len(p.y))
		for k := range p.logY {
			p.logY[k] = math.NaN()
		}
	}
	if math.IsNaN(p.logY[i]) {
		p.logY[i] = math.Log(p.y[i] - p.farBase)
	}
	return p.logY[i]
}
