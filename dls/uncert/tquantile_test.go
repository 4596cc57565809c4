package uncert

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// TestT975 checks the 0.975 quantile of Student's t against closed forms:
// ν = 1 is the Cauchy distribution, t = tan(0.475π); ν = 2 has
// t = (2p − 1)/√(2p(1 − p)) (both from the distribution function in
// closed form, Abramowitz & Stegun 1964, 26.7.3–4); the even ν from 4 to
// 100,000 are the A&S 26.7.4 distribution function solved in 45-digit
// decimal arithmetic (testdata/t_quantile.py, 25 digits printed). From
// ν = 500 on, the series is exact to rounding: 2.5e-16 relative (about 2
// units in the last place). From ν = 30 to 500, one Newton step from
// the series, and below, gonum's inverse incomplete beta function: 5e-14
// (measured at most 1.5e-14 and 1.2e-14; gonum's inverse is 1.7e-11 off
// at ν = 1e5 and 1.6e-7 at ν = 1e9, which is why it is not used there).
func TestT975(t *testing.T) {
	cases := []struct {
		nu, want float64
	}{
		{1, math.Tan(0.475 * math.Pi)},
		{2, 0.95 / math.Sqrt(2*0.975*0.025)},
		{4, 2.7764451051977943578031048},
		{10, 2.2281388519862747483954907},
		{30, 2.0422724563012383099580422},
		{100, 1.9839715185235522865951849},
		{200, 1.9718962236339093822250520},
		{500, 1.9647198374673677933559719},
		{1000, 1.9623390808264084849985804},
		{2000, 1.9611508260994380305448451},
		{10000, 1.9602012398906262578384797},
		{100000, 1.9599877075346096385918830},
		// The normal quantile, the erf series (A&S 7.1.5) solved in the
		// same script; A&S Table 26.1 prints 1.959963985.
		{math.Inf(1), 1.9599639845400542355245944},
	}
	for _, c := range cases {
		got := t975(c.nu)
		tol := 5e-14
		if c.nu >= tSeriesMinDOF {
			tol = 2.5e-16
		}
		if e := math.Abs(got/c.want - 1); !(e <= tol) {
			t.Errorf("ν = %g: t = %.17g, closed form %.17g (relative error %.2g, tolerance %.2g)", c.nu, got, c.want, e, tol)
		}
	}
}

// TestTSeriesTerms checks the fifth term of the expansion where it
// matters: at ν = 100 and 200 the series must agree with the closed form
// to its first neglected term (about 0.4/ν⁶, relative 2e-13 at ν = 100;
// 5e-13 allowed), while without g5 the error would be g5/ν⁵ ≈ 7e-11 at
// ν = 100. It also stays continuous where t975 switches method: at ν = 500
// the series and the Newton step, and at ν = 30 the Newton step and gonum,
// agree to gonum's accuracy (5e-14).
func TestTSeriesTerms(t *testing.T) {
	for _, c := range []struct{ nu, want float64 }{
		{100, 1.9839715185235522865951849},
		{200, 1.9718962236339093822250520},
	} {
		if e := math.Abs(tSeries(c.nu)/c.want - 1); !(e <= 5e-13) {
			t.Errorf("ν = %g: series %.17g, closed form %.17g (relative error %.2g)", c.nu, tSeries(c.nu), c.want, e)
		}
	}
	lib := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: tSeriesMinDOF}.Quantile(0.975)
	if e := math.Abs(tSeries(tSeriesMinDOF)/lib - 1); !(e <= 5e-14) {
		t.Errorf("at ν = %d: series %.17g, gonum %.17g", tSeriesMinDOF, tSeries(tSeriesMinDOF), lib)
	}
	if e := math.Abs(tNewton(tSeriesMinDOF)/tSeries(tSeriesMinDOF) - 1); !(e <= 5e-14) {
		t.Errorf("at ν = %d: Newton step %.17g, series %.17g", tSeriesMinDOF, tNewton(tSeriesMinDOF), tSeries(tSeriesMinDOF))
	}
	lib = distuv.StudentsT{Mu: 0, Sigma: 1, Nu: tNewtonMinDOF}.Quantile(0.975)
	if e := math.Abs(tNewton(tNewtonMinDOF)/lib - 1); !(e <= 5e-14) {
		t.Errorf("at ν = %d: Newton step %.17g, gonum %.17g", tNewtonMinDOF, tNewton(tNewtonMinDOF), lib)
	}
}
