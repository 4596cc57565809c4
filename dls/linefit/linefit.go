// Package linefit fits straight lines by weighted least squares with the
// full covariance of intercept and slope, for the dilution-series and
// multi-angle regressions of dlsbatch. gonum's stat.LinearRegression gives
// the estimates; it returns no standard errors, which come from the centred
// sums (e.g. P. R. Bevington and D. K. Robinson, Data Reduction and Error
// Analysis for the Physical Sciences, 3rd ed., McGraw-Hill 2003, ch. 6).
package linefit

import (
	"math"

	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"
)

// Line is a weighted straight-line fit y = A + B·x with its covariance.
type Line struct {
	A, B              float64
	VarA, VarB, Cov   float64 // covariance of (A, B), after scaling
	Chi2              float64 // Σ w·r² (with w = 1/u² this is χ²)
	DOF               int
	Scale             float64 // factor applied to the covariance
	Residuals, Fitted []float64
}

// Fit fits y = a + b·x by least squares with weights w (nil: all 1).
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
func Fit(x, y, w []float64, known, birge bool) Line {
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
	l := Line{A: a, B: b, VarB: 1 / sxx, VarA: 1/s + xm*xm/sxx, Cov: -xm / sxx, DOF: len(x) - 2, Scale: 1}
	l.Residuals = make([]float64, len(x))
	l.Fitted = make([]float64, len(x))
	for i := range x {
		wi := 1.0
		if w != nil {
			wi = w[i]
		}
		l.Fitted[i] = a + b*x[i]
		l.Residuals[i] = y[i] - l.Fitted[i]
		l.Chi2 += wi * l.Residuals[i] * l.Residuals[i]
	}
	if l.DOF > 0 {
		red := l.Chi2 / float64(l.DOF)
		switch {
		case !known:
			l.Scale = red
		case birge:
			l.Scale = math.Max(1, red)
		}
	} else if !known {
		l.Scale = math.NaN()
	}
	l.VarA *= l.Scale
	l.VarB *= l.Scale
	l.Cov *= l.Scale
	return l
}

// SlopeTest tests B = 0: with known uncertainties a normal z-test, else a
// Student t-test on dof degrees of freedom. It returns the statistic and
// its two-sided p-value (NaN when it cannot be computed).
func SlopeTest(l Line, known bool) (stat, p float64) {
	se := math.Sqrt(l.VarB)
	if !(se > 0) || math.IsInf(se, 0) {
		return math.NaN(), math.NaN()
	}
	stat = l.B / se
	if known {
		return stat, 2 * distuv.UnitNormal.Survival(math.Abs(stat))
	}
	if l.DOF < 1 {
		return stat, math.NaN()
	}
	t := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(l.DOF)}
	return stat, 2 * t.Survival(math.Abs(stat))
}
