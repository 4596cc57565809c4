package uncert

import (
	"math"

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
// rounding there and takes nanoseconds; below it, gonum's inverse of the
// regularised incomplete beta function (tens of microseconds). The
// Welch–Satterthwaite ν_eff of a budget is a continuous value that differs
// from measurement to measurement, so a cache of quantiles would not hit;
// it is nearly always far above tSeriesMinDOF.
func t975(nu float64) float64 {
	if math.IsInf(nu, 1) {
		return z975
	}
	if nu < tSeriesMinDOF {
		return distuv.StudentsT{Mu: 0, Sigma: 1, Nu: nu}.Quantile(0.975)
	}
	return tSeries(nu)
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
