package conc

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/stat/distuv"

	"dlsbatch/dls"
)

// Single-particle diffusion of a 100 nm sphere in water at 25 °C
// (η = 0.890022 mPa·s, IAPWS 2008): 4.90734e-12 m²/s (Stokes–Einstein,
// computed check).
const (
	tK25  = 298.15
	eta25 = 0.890022e-3
)

var d100 = dls.DiffusionFromDiameter(tK25, eta25, 100e-9)

// exactSeries is D_i = D0·(1 + k_D·c_i) with no noise and u(D_i) = rel·D_i.
func exactSeries(d0, kd, rel float64, c []float64) []Point {
	pts := make([]Point, len(c))
	for i, ci := range c {
		d := CollectiveDiffusion(d0, kd, ci)
		pts[i] = Point{Concentration: ci, DiffusionM2PerS: d, DiffusionSEM2PerS: rel * d}
	}
	return pts
}

// TestSeriesExact: a noise-free series from D0 = D(100 nm) and the
// hard-sphere k_D = 1.45 (Batchelor 1976) at φ = 0.002…0.04 must give back
// D0, k_D and 100 nm to 1e-9 (the arithmetic is exact up to rounding), a
// χ² of zero (below 1e-12) and zero residuals.
func TestSeriesExact(t *testing.T) {
	pts := exactSeries(d100, HardSphereKD, 0.005, []float64{0.002, 0.005, 0.01, 0.02, 0.04})
	s, err := FitDilutionSeries(pts, &SeriesSettings{Unit: "volume fraction", TemperatureK: tK25, ViscosityPaS: eta25})
	if err != nil {
		t.Fatal(err)
	}
	if !scalar.EqualWithinRel(s.D0M2PerS, d100, 1e-9) || !scalar.EqualWithinRel(s.KD, HardSphereKD, 1e-9) || !scalar.EqualWithinRel(s.DiameterNm, 100, 1e-9) {
		t.Errorf("D0 %.12g (want %.12g), k_D %.12g, d0 %.12g nm", s.D0M2PerS, d100, s.KD, s.DiameterNm)
	}
	if s.ChiSquare > 1e-12 || s.DOF != 3 || s.Distinct != 5 {
		t.Errorf("χ² %g, dof %d, distinct %d", s.ChiSquare, s.DOF, s.Distinct)
	}
	for _, r := range s.Residuals {
		if math.Abs(r.Normalized) > 1e-6 {
			t.Errorf("residual at %g: %g σ", r.Concentration, r.Normalized)
		}
	}
	if s.Flagged {
		t.Errorf("exact series flagged: %q", s.Warnings)
	}
}

// TestSeriesReference compares estimates and uncertainties with numpy's
// weighted polyfit (cov="unscaled") and the delta-method k_D uncertainty,
// from testdata/series_reference.py run with Debian's python3-numpy 1.24
// and python3-scipy 1.10. Set 1 scatters within its stated uncertainties
// (χ²/ν = 0.18, no Birge scaling); set 2 scatters more (χ²/ν = 9.45), so
// Birge scaling multiplies the variances by 9.45. Tolerance 1e-8 relative:
// the reference values are printed to 11 significant digits.
func TestSeriesReference(t *testing.T) {
	c := []float64{0.5, 1, 2, 4, 8}
	cases := []struct {
		name              string
		d, u              []float64
		scaling           Scaling
		a, b, ua, ub, cov float64
		chi2, p, kd, ukd  float64
	}{
		{"set 1", []float64{4.93e-12, 4.97e-12, 5.02e-12, 5.16e-12, 5.37e-12}, []float64{0.02e-12, 0.02e-12, 0.025e-12, 0.03e-12, 0.04e-12}, ScaleBirge,
			4.9058512578e-12, 5.9523953785e-14, 1.5174962457e-14, 5.3406347598e-15, -5.6094330096e-29, 0.5476194719, 0.9083117627, 0.0121332569, 0.0011149316},
		{"set 2 unscaled", []float64{4.93e-12, 4.99e-12, 5.00e-12, 5.18e-12, 5.36e-12}, []float64{1e-14, 1e-14, 1e-14, 1e-14, 1e-14}, ScaleNone,
			4.9145833333e-12, 5.7231182796e-14, 6.7700320039e-15, 1.6395645895e-15, -8.3333333333e-30, 28.3481182796, 0.0000030695, 0.0116451750, 0.0003458179},
		{"set 2 Birge", []float64{4.93e-12, 4.99e-12, 5.00e-12, 5.18e-12, 5.36e-12}, []float64{1e-14, 1e-14, 1e-14, 1e-14, 1e-14}, ScaleBirge,
			4.9145833333e-12, 5.7231182796e-14, 2.0810964694e-14, 5.0399940156e-15, -8.3333333333e-30 * 9.4493727599, 28.3481182796, 0.0000030695, 0.0116451750, 0.0010630385},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			pts := make([]Point, len(c))
			for i := range c {
				pts[i] = Point{Concentration: c[i], DiffusionM2PerS: tc.d[i], DiffusionSEM2PerS: tc.u[i]}
			}
			s, err := FitDilutionSeries(pts, &SeriesSettings{Unit: "mg/mL", Scaling: tc.scaling})
			if err != nil {
				t.Fatal(err)
			}
			check := func(what string, got, want, tol float64) {
				t.Helper()
				if !scalar.EqualWithinRel(got, want, tol) {
					t.Errorf("%s = %.11g, want %.11g", what, got, want)
				}
			}
			check("D0", s.D0M2PerS, tc.a, 1e-8)
			check("slope", s.SlopeM2PerS, tc.b, 1e-8)
			check("u(D0)", s.D0SEM2PerS, tc.ua, 1e-8)
			check("u(slope)", s.SlopeSEM2PerS, tc.ub, 1e-8)
			check("cov", s.CovD0Slope, tc.cov, 1e-8)
			check("χ²", s.ChiSquare, tc.chi2, 1e-8)
			check("k_D", s.KD, tc.kd, 1e-8)
			check("u(k_D)", s.KDSE, tc.ukd, 1e-7) // printed to 8 significant digits
			if !scalar.EqualWithinAbsOrRel(s.ChiSquarePProb, tc.p, 1e-10, 1e-6) {
				t.Errorf("p = %.10g, want %.10g", s.ChiSquarePProb, tc.p)
			}
		})
	}
}

// birgeCoverage is the probability that |Z| ≤ k·max(1, S) for Z standard
// normal and S² = χ²_ν/ν independent of Z: the coverage of a ±k·SE
// interval of a linear least-squares estimate with known Gaussian
// uncertainties after Birge scaling (estimates and residual sum are
// independent in the normal linear model). Computed by quadrature of the
// χ² density (gonum distuv), independently of the code under test; the
// test checks it against scipy's value for ν = 4.
func birgeCoverage(k float64, nu int) float64 {
	chi := distuv.ChiSquared{K: float64(nu)}
	const n = 200000
	hi := float64(nu) + 60*math.Sqrt(2*float64(nu))
	h := hi / n
	sum := 0.0
	for i := 0; i <= n; i++ {
		x := float64(i) * h
		w := h
		if i == 0 || i == n {
			w /= 2
		}
		s := math.Max(1, math.Sqrt(x/float64(nu)))
		sum += w * chi.Prob(x) * (1 - 2*distuv.UnitNormal.Survival(k*s))
	}
	return sum
}

// TestSeriesCoverage draws noisy series (Gaussian noise of the stated
// u(D) = 1 % at 6 concentrations, φ = 0.002…0.05, D0 of 100 nm, k_D =
// 1.45) over 4000 seeds and counts how often D0 ± 2·u(D0) and k_D ±
// 2·u(k_D) contain the truth. Expected: 95.45 % without scaling (normal
// distribution, known u); with Birge scaling (ν = 4) the value of
// birgeCoverage, 96.59 % (scipy.integrate.quad of the same integral gives
// 0.965941). Statistical tolerance: 3.5 binomial
// standard deviations (√(p(1−p)/4000) ≈ 0.33 %), i.e. about ±1.2 %; k_D is
// a ratio, whose first-order interval is not exact, so it gets 2 % more.
func TestSeriesCoverage(t *testing.T) {
	c := []float64{0.002, 0.005, 0.01, 0.02, 0.035, 0.05}
	const seeds = 4000
	for _, sc := range []Scaling{ScaleNone, ScaleBirge} {
		want := 1 - 2*distuv.UnitNormal.Survival(2)
		if sc == ScaleBirge {
			want = birgeCoverage(2, len(c)-2)
			if !scalar.EqualWithinAbs(want, 0.965941, 2e-6) {
				t.Fatalf("quadrature gives %.6f, scipy 0.965941", want)
			}
		}
		tol := 3.5 * math.Sqrt(want*(1-want)/seeds)
		var inD0, inKD int
		for seed := uint64(1); seed <= seeds; seed++ {
			rng := rand.New(rand.NewPCG(seed, 42))
			pts := exactSeries(d100, HardSphereKD, 0.01, c)
			for i := range pts {
				pts[i].DiffusionM2PerS += pts[i].DiffusionSEM2PerS * rng.NormFloat64()
			}
			s, err := FitDilutionSeries(pts, &SeriesSettings{Scaling: sc})
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(s.D0M2PerS-d100) <= 2*s.D0SEM2PerS {
				inD0++
			}
			if math.Abs(s.KD-HardSphereKD) <= 2*s.KDSE {
				inKD++
			}
		}
		fd, fk := float64(inD0)/seeds, float64(inKD)/seeds
		t.Logf("scaling %v: coverage of ±2 SE: D0 %.2f %%, k_D %.2f %% (expected %.2f %%)", sc, 100*fd, 100*fk, 100*want)
		if math.Abs(fd-want) > tol {
			t.Errorf("scaling %v: D0 coverage %.2f %%, want %.2f ± %.2f %%", sc, 100*fd, 100*want, 100*tol)
		}
		if math.Abs(fk-want) > tol+0.02 {
			t.Errorf("scaling %v: k_D coverage %.2f %%, want %.2f ± %.2f %%", sc, 100*fk, 100*want, 100*(tol+0.02))
		}
	}
}

// TestSeriesBadInput: the documented errors.
func TestSeriesBadInput(t *testing.T) {
	good := exactSeries(d100, HardSphereKD, 0.01, []float64{0.01, 0.02, 0.03})
	cases := []struct {
		name string
		edit func([]Point) []Point
		is   error
	}{
		{"two points", func(p []Point) []Point { return p[:2] }, ErrTooFewConcentrations},
		{"no points", func(p []Point) []Point { return nil }, ErrTooFewConcentrations},
		{"two distinct", func(p []Point) []Point { p[2].Concentration = p[1].Concentration; return p }, ErrTooFewConcentrations},
		{"negative concentration", func(p []Point) []Point { p[0].Concentration = -0.01; return p }, ErrRange},
		{"zero SE", func(p []Point) []Point { p[1].DiffusionSEM2PerS = 0; return p }, ErrRange},
		{"negative D", func(p []Point) []Point { p[1].DiffusionM2PerS = -1e-12; return p }, ErrRange},
		{"NaN D", func(p []Point) []Point { p[1].DiffusionM2PerS = math.NaN(); return p }, dls.ErrNonFinite},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			pts := c.edit(append([]Point(nil), good...))
			if _, err := FitDilutionSeries(pts, nil); !errors.Is(err, c.is) {
				t.Errorf("error %v, want %v", err, c.is)
			}
		})
	}
	// Repeats at the same concentration are fine with three distinct ones.
	rep := append(append([]Point(nil), good...), good[0])
	if _, err := FitDilutionSeries(rep, nil); err != nil {
		t.Errorf("repeat point: %v", err)
	}
	// D rising so steeply that the line extrapolates to D0 = −1e-12 m²/s
	// at c = 0 (D = (−1 + 2·c)·1e-12 by construction).
	steep := []Point{
		{Concentration: 1, DiffusionM2PerS: 1e-12, DiffusionSEM2PerS: 1e-14},
		{Concentration: 2, DiffusionM2PerS: 3e-12, DiffusionSEM2PerS: 1e-14},
		{Concentration: 3, DiffusionM2PerS: 5e-12, DiffusionSEM2PerS: 1e-14},
	}
	if _, err := FitDilutionSeries(steep, nil); !errors.Is(err, ErrRange) {
		t.Errorf("non-positive intercept: %v", err)
	}
}

// TestSeriesQC: count rate proportional to c (exact) passes and a point at
// twice the proportional rate is flagged (deviation ≈ +80 % against the
// 20 % tolerance after the origin fit); a PDI constant at 0.05 ± 0.01
// passes and one rising by 0.1 per 0.01 of φ (10σ over the span) is
// flagged; β constant passes, β falling from 0.9 to 0.6 with u 0.01 is
// flagged (z-test at the 1 % level). The |k_D·c| warning: c up to 0.1 with
// k_D 1.45 gives 0.145 > 0.1.
func TestSeriesQC(t *testing.T) {
	c := []float64{0.005, 0.01, 0.02, 0.04, 0.08}
	base := func() []Point {
		pts := exactSeries(d100, HardSphereKD, 0.005, c)
		for i := range pts {
			pts[i].CountRateKcps, pts[i].HasCountRate = 5000*c[i], true
			pts[i].PDI, pts[i].PDISE, pts[i].HasPDI = 0.05, 0.01, true
			pts[i].Intercept, pts[i].InterceptSE, pts[i].HasIntercept = 0.9, 0.01, true
		}
		return pts
	}
	s, err := FitDilutionSeries(base(), nil)
	if err != nil {
		t.Fatal(err)
	}
	if s.Flagged || s.CountRate == nil || s.CountRate.Flagged || s.PDI.Flagged || s.Intercept.Flagged {
		t.Errorf("clean series flagged: %q", s.Warnings)
	}
	if !scalar.EqualWithinRel(s.CountRate.SlopeKcpsPerUnit, 5000, 1e-12) || s.CountRate.MaxDeviation > 1e-12 {
		t.Errorf("count rate fit %+v", s.CountRate)
	}
	if s.MaxKDC <= FirstOrderLimit {
		t.Errorf("|k_D·c| = %g at φ = 0.08: want the warning (> 0.1)", s.MaxKDC)
	}
	for _, tc := range []struct {
		name string
		edit func([]Point)
		flag func(*Series) bool
	}{
		{"count rate", func(p []Point) { p[2].CountRateKcps *= 2 }, func(s *Series) bool { return s.CountRate.Flagged }},
		{"pdi drift", func(p []Point) {
			for i := range p {
				p[i].PDI += 10 * p[i].Concentration
			}
		}, func(s *Series) bool { return s.PDI.Flagged }},
		{"pdi drift without SE", func(p []Point) {
			for i := range p {
				p[i].PDI += 10*p[i].Concentration + 0.002*float64(i%2)
				p[i].PDISE = 0
			}
		}, func(s *Series) bool { return s.PDI.Flagged && s.PDI.Test == "t" }},
		{"intercept drop", func(p []Point) {
			for i := range p {
				p[i].Intercept = 0.9 - 3.75*p[i].Concentration
			}
		}, func(s *Series) bool { return s.Intercept.Flagged }},
	} {
		t.Run(tc.name, func(t *testing.T) {
			pts := base()
			tc.edit(pts)
			s, err := FitDilutionSeries(pts, nil)
			if err != nil {
				t.Fatal(err)
			}
			if !tc.flag(s) || !s.Flagged {
				t.Errorf("not flagged: %q", s.Warnings)
			}
		})
	}
}

// TestSeriesReferenceState: a series measured partly at 27 °C. The truth is
// D_i = k_B·T_i·(1 + k_D·c_i)/(3π·η(T_i)·d0) for d0 = 100 nm and
// k_D = 0.01 mL/mg, with the IAPWS 2008 viscosity η(25 °C) = 0.890023 and
// η(27 °C) = 0.850906 mPa·s (testdata/water/iapws_viscosity.py, IAPWS
// R12-08 with the Tanaka 2001 density), the 27 °C point the most
// concentrated. Brought to the reference state
// (25 °C) by D·(η/η_ref)·(T_ref/T), the series is exact again: D0, k_D and
// d0 back to 1e-9 (rounding only). Regressed as measured, the 27 °C point
// (5 % faster through η/T alone) raises k_D by more than half.
func TestSeriesReferenceState(t *testing.T) {
	const eta25w, eta27w = 0.890023e-3, 0.850906e-3
	const t27 = 300.15
	c := []float64{1, 2, 4, 8}
	temps := []float64{tK25, tK25, tK25, t27}
	etas := []float64{eta25w, eta25w, eta25w, eta27w}
	pts := make([]Point, len(c))
	for i := range c {
		d := dls.DiffusionFromDiameter(temps[i], etas[i], 100e-9) * (1 + 0.01*c[i])
		pts[i] = Point{Concentration: c[i], DiffusionM2PerS: d, DiffusionSEM2PerS: 0.002 * d, TemperatureK: temps[i], ViscosityPaS: etas[i]}
	}
	set := &SeriesSettings{Unit: "mg/mL", TemperatureK: tK25, ViscosityPaS: eta25w}
	s, err := FitDilutionSeries(pts, set)
	if err != nil {
		t.Fatal(err)
	}
	d0 := dls.DiffusionFromDiameter(tK25, eta25w, 100e-9)
	if !scalar.EqualWithinRel(s.D0M2PerS, d0, 1e-9) || !scalar.EqualWithinRel(s.KD, 0.01, 1e-9) || !scalar.EqualWithinRel(s.DiameterNm, 100, 1e-9) {
		t.Errorf("D0 %.10g (want %.10g), k_D %.10g (want 0.01), d0 %.10g nm (want 100)", s.D0M2PerS, d0, s.KD, s.DiameterNm)
	}
	if s.ReferenceTemperatureK != tK25 || len(s.Notes) != 1 || s.ChiSquare > 1e-12 {
		t.Errorf("reference %g K, notes %q, χ² %g", s.ReferenceTemperatureK, s.Notes, s.ChiSquare)
	}
	if r := s.Residuals[3]; !scalar.EqualWithinRel(r.ToReference, (eta27w/eta25w)*(tK25/t27), 1e-12) || r.MeasuredM2PerS != pts[3].DiffusionM2PerS {
		t.Errorf("27 °C residual row %+v", r)
	}

	// Without the states the same numbers give a wrong k_D: the guard
	// that the test above can fail.
	raw := append([]Point(nil), pts...)
	for i := range raw {
		raw[i].TemperatureK, raw[i].ViscosityPaS = 0, 0
	}
	if s, err := FitDilutionSeries(raw, set); err != nil || s.KD < 0.015 {
		t.Errorf("as measured: k_D %v (err %v); want 50 %% or more high", s.KD, err)
	}

	// States for some points only, or without a reference: errors.
	some := append([]Point(nil), pts...)
	some[0].TemperatureK, some[0].ViscosityPaS = 0, 0
	if _, err := FitDilutionSeries(some, set); err == nil {
		t.Error("states for 3 of 4 points accepted")
	}
	if _, err := FitDilutionSeries(pts, &SeriesSettings{}); err == nil {
		t.Error("point states without a reference state accepted")
	}
}
