package uncert

import (
	"math"

	"gonum.org/v1/gonum/mathext"
	"gonum.org/v1/gonum/stat/distuv"
)

// z975 is the 0.975 quantile of the standard normal distribution,
// 1.95996 39845 40054 23552 (the erf series solved in 45-digit decimal
// arithmetic, testdata/t_quantile.py; gonum's UnitNormal.Quantile(0.975)
// is 3 units in the last place lower).
const z975 = 1.9599639845400542355

// tSeriesMinDOF is the smallest ν for which t975 uses the asymptotic
// series: its first neglected term, about 0.4/ν⁶, is then below 3e-17,
// under half a unit in the last place of t ≈ 1.96.
const tSeriesMinDOF = 500

// tNewtonMinDOF is the smallest ν for which t975 refines the series by one
// Newton step: the series' error, about 0.4/ν⁶ (2e-10 at ν = 30), then
// squares to below rounding, and what is left is the rounding of the
// incomplete beta function (about 1e-14 relative, as in gonum's inverse).
const tNewtonMinDOF = 30

// t975 returns t_0.975(ν), the 0.975 quantile of Student's t distribution
// with ν > 0 degrees of freedom (+Inf: the normal quantile). For
// ν ≥ tSeriesMinDOF it sums the asymptotic expansion in 1/ν of the t
// quantile about the normal one, x = z_0.975,
//
//	t = x + g1/ν + g2/ν² + g3/ν³ + g4/ν⁴ + g5/ν⁵,
//	g1 = (x³ + x)/4
//	g2 = (5x⁵ + 16x³ + 3x)/96
//	g3 = (3x⁷ + 19x⁵ + 17x³ − 15x)/384
//	g4 = (79x⁹ + 776x⁷ + 1482x⁵ − 1920x³ − 945x)/92160
//	g5 = (27x¹¹ + 339x⁹ + 930x⁷ − 1782x⁵ − 765x³ + 17955x)/368640
//
// (Abramowitz & Stegun 26.7.5 for g1–g4; g5 from memory, checked against
// the closed form of the distribution in the tests), which is exact to
// rounding there and takes nanoseconds. For tNewtonMinDOF ≤ ν <
// tSeriesMinDOF it takes one Newton step from the series on the upper
// tail Q(t) = ½·I_{ν/(ν+t²)}(ν/2, ½) = 0.025 (A&S 26.7.1 and 26.5.27;
// gonum's regularised incomplete beta function, under a microsecond);
// below, gonum's inverse of that function (about 20 microseconds). The
// Welch–Satterthwaite ν_eff of a budget is a continuous value that differs
// from measurement to measurement, so a cache of quantiles would not hit.
func t975(nu float64) float64 {
	switch {
	case math.IsInf(nu, 1):
		return z975
	case nu < tNewtonMinDOF:
		return distuv.StudentsT{Mu: 0, Sigma: 1, Nu: nu}.Quantile(0.975)
	case nu < tSeriesMinDOF:
		return tNewton(nu)
	}
	return tSeries(nu)
}

// tNewton is tSeries refined by one Newton step on the upper tail of the t
// distribution, whose density is
// f(t) = Γ((ν+1)/2)/(Γ(ν/2)·√(νπ))·(1 + t²/ν)^(−(ν+1)/2).
func tNewton(nu float64) float64 {
	t := tSeries(nu)
	q := 0.5 * mathext.RegIncBeta(nu/2, 0.5, nu/(nu+t*t))
	lg1, _ := math.Lgamma((nu + 1) / 2)
	lg2, _ := math.Lgamma(nu / 2)
	f := math.Exp(lg1 - lg2 - 0.5*math.Log(nu*math.Pi) - (nu+1)/2*math.Log1p(t*t/nu))
	return t + (q-0.025)/f
}

// tSeries sums the expansion of t975 to the term in 1/ν⁵.
func tSeries(nu float64) float64 {
	x := z975
	x2 := x * x
	g1 := (x2 + 1) * x / 4
	g2 := ((5*x2+16)*x2 + 3) * x / 96
	g3 := (((3*x2+19)*x2+17)*x2 - 15) * x / 384
	g4 := ((((79*x2+776)*x2+1482)*x2-1920)*x2 - 945) * x / 92160
	g5 := (((((27*x2+339)*x2+930)*x2-1782)*x2-765)*x2 + 17955) * x / 368640
	u := 1 / nu
	return x + u*(g1+u*(g2+u*(g3+u*(g4+u*g5))))
}
