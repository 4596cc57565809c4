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

// Options say how Fit treats the weights. The zero value takes them as
// relative only.
type Options struct {
	// KnownUncertainty says the weights are w = 1/u² with u known: the
	// covariance is then that of the stated u. When false the weights are
	// relative only and the covariance is multiplied by χ²/ν (the classical
	// regression estimate).
	KnownUncertainty bool
	// Birge, with KnownUncertainty, multiplies the covariance by
	// max(1, χ²/ν), so that scatter beyond the stated u widens it but
	// never narrows it (R. T. Birge, "The calculation of errors by the
	// method of least squares", Phys. Rev. 40, 207, 1932). Without
	// KnownUncertainty it has no effect.
	Birge bool
}

// Line is a weighted straight-line fit y = A + B·x with its covariance.
type Line struct {
	A, B              float64
	VarA, VarB, Cov   float64 // covariance of (A, B), after scaling
	Chi2              float64 // Σ w·r² (with w = 1/u² this is χ²)
	DOF               int
	Scale             float64 // factor applied to the covariance
	Residuals, Fitted []float64
	// Known is the fit's Options.KnownUncertainty; SlopeTest reads it.
	Known bool
}

// Fit fits y = a + b·x by least squares with weights w (nil: all 1).
// stat.LinearRegression gives the estimates; the covariance comes from the
// centred sums:
//
//	S = Σw, x̄ = Σw·x/S, Sxx = Σw·(x − x̄)²
//	var(b) = 1/Sxx, var(a) = 1/S + x̄²/Sxx, cov(a, b) = −x̄/Sxx
//
// which is the covariance for weights w = 1/u² with u known; o says how it
// is scaled (Options). Needs at least two distinct x.
func Fit(x, y, w []float64, o Options) Line {
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
	l := Line{A: a, B: b, VarB: 1 / sxx, VarA: 1/s + xm*xm/sxx, Cov: -xm / sxx, DOF: len(x) - 2, Scale: 1, Known: o.KnownUncertainty}
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
		case !o.KnownUncertainty:
			l.Scale = red
		case o.Birge:
			l.Scale = math.Max(1, red)
		}
	} else if !o.KnownUncertainty {
		l.Scale = math.NaN()
	}
	l.VarA *= l.Scale
	l.VarB *= l.Scale
	l.Cov *= l.Scale
	return l
}

// SlopeTest tests B = 0: a normal z-test when the fit took its
// uncertainties as known (l.Known), else a Student t-test on l.DOF degrees
// of freedom. It returns the statistic and its two-sided p-value (NaN when
// it cannot be computed).
func SlopeTest(l Line) (stat, p float64) {
	se := math.Sqrt(l.VarB)
	if !(se > 0) || math.IsInf(se, 0) {
		return math.NaN(), math.NaN()
	}
	stat = l.B / se
	if l.Known {
		return stat, 2 * distuv.UnitNormal.Survival(math.Abs(stat))
	}
	if l.DOF < 1 {
		return stat, math.NaN()
	}
	t := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(l.DOF)}
	return stat, 2 * t.Survival(math.Abs(stat))
}
