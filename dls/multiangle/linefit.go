package multiangle

import (
	"math"

	"gonum.org/v1/gonum/stat"
)

// line is a weighted straight-line fit y = a + b·x with its covariance.
type line struct {
	a, b              float64
	varA, varB, cov   float64 // covariance of (a, b), after scaling
	chi2              float64 // Σ w·r² (with w = 1/u² this is χ²)
	dof               int
	scale             float64 // factor applied to the covariance
	residuals, fitted []float64
}

// fitLine fits y = a + b·x by least squares with weights w (nil: all 1).
// stat.LinearRegression gives the estimates; the covariance comes from the
// centred sums:
//
//	S = Σw, x̄ = Σw·x/S, Sxx = Σw·(x − x̄)²
//	var(b) = 1/Sxx, var(a) = 1/S + x̄²/Sxx, cov(a, b) = −x̄/Sxx
//
// which is the covariance for weights w = 1/u² with u known. With known
// false the weights are relative only and the covariance is multiplied by
// χ²/ν (the classical regression estimate); with known true it is
// multiplied by max(1, χ²/ν) when birge is set, else left as is. Needs at
// least two distinct x.
func fitLine(x, y, w []float64, known, birge bool) line {
	a, b := stat.LinearRegression(x, y, w, false)
	var s, sx float64
	for i := range x {
		wi := 1.0
		if w != nil {
			wi = w[i]
		}
		s += wi
		sx += wi * x[i]
	}
	xm := sx / s
	var sxx float64
	for i := range x {
		wi := 1.0
		if w != nil {
			wi = w[i]
		}
		sxx += wi * (x[i] - xm) * (x[i] - xm)
	}
	l := line{a: a, b: b, varB: 1 / sxx, varA: 1/s + xm*xm/sxx, cov: -xm / sxx, dof: len(x) - 2, scale: 1}
	l.residuals = make([]float64, len(x))
	l.fitted = make([]float64, len(x))
	for i := range x {
		wi := 1.0
		if w != nil {
			wi = w[i]
		}
		l.fitted[i] = a + b*x[i]
		l.residuals[i] = y[i] - l.fitted[i]
		l.chi2 += wi * l.residuals[i] * l.residuals[i]
	}
	if l.dof > 0 {
		red := l.chi2 / float64(l.dof)
		switch {
		case !known:
			l.scale = red
		case birge:
			l.scale = math.Max(1, red)
		}
	} else if !known {
		l.scale = math.NaN()
	}
	l.varA *= l.scale
	l.varB *= l.scale
	l.cov *= l.scale
	return l
}
