package uncert

import (
	"encoding/json"
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"dlsbatch/dls/medium"
)

// andrade is η(T) = η25·exp(B·(1/T − 1/T25)) with B = 2000 K, a water-like
// Andrade law whose temperature coefficient is analytic: η'/η = −B/T².
func andrade(tK float64) float64 {
	return 0.890022e-3 * math.Exp(2000*(1/tK-1/298.15))
}

func handInputs() *Inputs {
	return &Inputs{
		GammaPerS: 3418.78, GammaSEPerS: 10, GammaDOF: 100,
		TemperatureK: 298.15, Viscosity: andrade,
		RefractiveIndex: 1.33162, AngleRad: 173 * math.Pi / 180, WavelengthM: 632.8e-9,
		U: Uncertainties{TemperatureK: 0.1, ViscosityRel: 0.01, RefractiveIndex: 1e-4, AngleRad: 0.1 * math.Pi / 180, WavelengthM: 0.1e-9},
	}
}

// TestHandWorkedBudget is a GUM (JCGM 100:2008, 5.1.2) budget worked with
// analytic sensitivities (testdata/gum_example.py, Debian python3; the
// arithmetic can be followed by hand):
//
//	T = 298.15 K, u = 0.1 K; η = 0.890022 mPa·s (Andrade, B = 2000 K), u = 1 %;
//	n = 1.33162, u = 1e-4; θ = 173°, u = 0.1°; λ0 = 632.8 nm, u = 0.1 nm;
//	Γ̄ = 3418.78 /s, u = 10 /s, ν = 100.
//
//	q = 4π·1.33162·sin(86.5°)/632.8 nm = 2.6394467e7 /m
//	d = k_B·T·q²/(3π·η·Γ̄) = 100.00020 nm (the Γ̄ of a 100 nm sphere)
//
//	input  c_i                              c_i·u_i      share
//	Γ̄      −d/Γ̄ = −0.0292503 nm·s           −0.292503 nm   7.416 %
//	T      d·(1/T + B/T²) = 2.585292 nm/K   +0.258529 nm   5.793 %
//	η      −d/η = −1.123570e5 nm/(Pa·s)     −1.000002 nm  86.675 %
//	n      2d/n = 150.1933 nm               +0.015019 nm   0.020 %
//	θ      d·cot(86.5°) = 6.116274 nm/rad   +0.010675 nm   0.010 %
//	λ0     −2d/λ0 = −3.160563e8 nm/m        −0.031606 nm   0.087 %
//
//	u_c = √Σ(c_i·u_i)² = 1.0741218 nm (1.0741 %),  U = 2·u_c = 2.1482435 nm
//	ν_eff = u_c⁴/((c_Γ·u_Γ)⁴/100) = 18184.24
//
// Tolerances: 1e-8 relative for closed-form values; 1e-6 for the
// temperature coefficient, which the code takes by central difference
// (step 0.01 K: truncation about (0.01·B/T²)²/6 ≈ 1e-8).
func TestHandWorkedBudget(t *testing.T) {
	b, err := ZAverage(handInputs())
	if err != nil {
		t.Fatal(err)
	}
	near := func(what string, got, want, tol float64) {
		t.Helper()
		if !scalar.EqualWithinRel(got, want, tol) {
			t.Errorf("%s = %.10g, want %.10g", what, got, want)
		}
	}
	near("d", b.ZAvgNm, 100.0002007517, 1e-8)
	want := []struct {
		name       string
		c, cu, pct float64
		tol        float64
	}{
		{"decay_rate", -2.9250259084e-02, -0.2925025908, 7.415704, 1e-8},
		{"temperature", 2.5852920823, 0.2585292082, 5.793116, 1e-6},
		{"viscosity", -1.1235699876e+05, -1.0000020075, 86.675170, 1e-6},
		{"refractive_index", 1.5019329952e+02, 0.0150193300, 0.019552, 1e-6},
		{"angle", 6.1162742935, 0.0106749124, 0.009877, 1e-6},
		{"wavelength", -3.1605626028e+08, -0.0316056260, 0.086581, 1e-6},
	}
	if len(b.Components) != len(want) {
		t.Fatalf("%d components, want %d", len(b.Components), len(want))
	}
	for i, w := range want {
		c := b.Components[i]
		if c.Name != w.name {
			t.Fatalf("component %d is %q, want %q", i, c.Name, w.name)
		}
		near(w.name+" c", c.Sensitivity, w.c, w.tol)
		near(w.name+" c·u", c.ContributionNm, w.cu, w.tol)
		// Shares printed to 6 decimals of a percent.
		if !scalar.EqualWithinAbs(c.VarianceSharePct, w.pct, 2e-6) {
			t.Errorf("%s share %.7f %%, want %.6f %%", w.name, c.VarianceSharePct, w.pct)
		}
	}
	near("u_c", b.CombinedUNm, 1.0741217723, 1e-7)
	near("U", b.ExpandedUNm, 2.1482435447, 1e-7)
	near("ν_eff", b.EffectiveDOF, 18184.242330, 1e-6)
	if b.CoverageFactor != 2 || b.Components[0].Type != "A" || b.Components[1].Type != "B" {
		t.Errorf("k %g, types %s %s", b.CoverageFactor, b.Components[0].Type, b.Components[1].Type)
	}
	// t_0.975 at ν = 18184.24: 1.9600945 (scipy.stats.t.ppf, Debian
	// python3-scipy 1.10); 2e-6 covers the rounding of ν above.
	if !scalar.EqualWithinAbs(b.CoverageFactorT95, 1.9600945, 2e-6) {
		t.Errorf("t factor %.7f, want 1.9600945", b.CoverageFactorT95)
	}
}

// iapwsLnViscosityAndSlopes evaluates ln μ of IAPWS 2008 (μ̄2 = 1) and its
// partial derivatives in T and ρ analytically, from the formula and
// coefficients of the release (Huber et al., J. Phys. Chem. Ref. Data 38,
// 101 (2009), Tables 2 and 3; R12-08 Tables 1 and 2).
func iapwsLnViscosityAndSlopes(tK, rho float64) (lnMu, dT, dRho float64) {
	h0 := [4]float64{1.67752, 2.20462, 0.6366564, -0.241605}
	h1 := [6][7]float64{
		{5.20094e-1, 2.22531e-1, -2.81378e-1, 1.61913e-1, -3.25372e-2, 0, 0},
		{8.50895e-2, 9.99115e-1, -9.06851e-1, 2.57399e-1, 0, 0, 0},
		{-1.08374, 1.88797, -7.72479e-1, 0, 0, 0, 0},
		{-2.89555e-1, 1.26613, -4.89837e-1, 0, 6.98452e-2, 0, -4.35673e-3},
		{0, 0, -2.57040e-1, 0, 0, 8.72102e-3, 0},
		{0, 1.20573e-1, 0, 0, 0, 0, -5.93264e-4},
	}
	const tStar, rhoStar = 647.096, 322.0
	tb, rb := tK/tStar, rho/rhoStar
	// ln μ̄0 = ln 100 + ½ ln T̄ − ln Σ H_i T̄^−i
	var s, ds float64
	for i, h := range h0 {
		s += h * math.Pow(tb, -float64(i))
		ds += -float64(i) * h * math.Pow(tb, -float64(i)-1)
	}
	lnMu0 := math.Log(100) + 0.5*math.Log(tb) - math.Log(s)
	dlnMu0 := 0.5/tb - ds/s
	// ln μ̄1 = ρ̄·F, F = Σ_i Σ_j H_ij x^i y^j, x = 1/T̄ − 1, y = ρ̄ − 1
	x, y := 1/tb-1, rb-1
	var f, fx, fy float64
	for i := 0; i < 6; i++ {
		for j := 0; j < 7; j++ {
			h := h1[i][j]
			if h == 0 {
				continue
			}
			f += h * math.Pow(x, float64(i)) * math.Pow(y, float64(j))
			if i > 0 {
				fx += h * float64(i) * math.Pow(x, float64(i-1)) * math.Pow(y, float64(j))
			}
			if j > 0 {
				fy += h * float64(j) * math.Pow(x, float64(i)) * math.Pow(y, float64(j-1))
			}
		}
	}
	lnMu1 := rb * f
	dlnMu1dT := rb * fx * (-1 / (tb * tb)) // dx/dT̄ = −1/T̄²
	dlnMu1dR := f + rb*fy
	lnMu = lnMu0 + lnMu1 + math.Log(1e-6)
	return lnMu, (dlnMu0 + dlnMu1dT) / tStar, dlnMu1dR / rhoStar
}

// patekDensityAndSlope is the density of Pátek et al., J. Phys. Chem. Ref.
// Data 38, 21 (2009) (IAPWS SR6-08) at pressure pPa and its analytic
// temperature derivative: with α = T_R/(T_a − T), β = T_R/(T − T_b),
// d(α^n)/dT = n·α^(n+1)/T_R, d(β^m)/dT = −m·β^(m+1)/T_R, ρ = 1/v,
// dρ/dT = −ρ²·dv/dT. Coefficients from Table 4 of the paper.
func patekDensityAndSlope(tK, pPa float64) (rho, dRhoDT float64) {
	a := map[int]float64{5: 1.93763157e-2, 6: 6.74458446e3, 7: -2.22521604e5, 8: 1.00231247e8,
		9: -1.63552118e9, 10: 8.32299658e9, 11: -7.5245878e-6, 12: -1.3767418e-2, 13: 1.0627293e1,
		14: -2.0457795e2, 15: 1.2037414e3}
	nExp := map[int]float64{6: 4, 7: 5, 8: 7, 9: 8, 10: 9, 11: 1, 12: 3, 13: 5, 14: 6, 15: 7}
	b := map[int]float64{5: 5.78545292e-3, 6: -1.53195665e-2, 7: 3.11337859e-2, 8: -4.23546241e-2,
		9: 3.38713507e-2, 10: -1.19946761e-2, 11: -3.1091470e-6, 12: 2.8964919e-5, 13: -1.3112763e-4,
		14: 3.0410453e-4, 15: -3.9034594e-4, 16: 2.3403117e-4, 17: -4.8510101e-5}
	mExp := map[int]float64{5: 1, 6: 2, 7: 3, 8: 4, 9: 5, 10: 6, 11: 1, 12: 3, 13: 4, 14: 5, 15: 6, 16: 7, 17: 9}
	const r, tR, ta, tb, p0 = 461.51805, 10.0, 593.0, 232.0, 0.1e6
	al, be := tR/(ta-tK), tR/(tK-tb)
	s0, ds0 := a[5], 0.0
	for i := 6; i <= 10; i++ {
		s0 += a[i] * math.Pow(al, nExp[i])
		ds0 += a[i] * nExp[i] * math.Pow(al, nExp[i]+1) / tR
	}
	for i := 5; i <= 10; i++ {
		s0 += b[i] * math.Pow(be, mExp[i])
		ds0 -= b[i] * mExp[i] * math.Pow(be, mExp[i]+1) / tR
	}
	var sp, dsp float64
	for i := 11; i <= 15; i++ {
		sp += a[i] * math.Pow(al, nExp[i])
		dsp += a[i] * nExp[i] * math.Pow(al, nExp[i]+1) / tR
	}
	for i := 11; i <= 17; i++ {
		sp += b[i] * math.Pow(be, mExp[i])
		dsp -= b[i] * mExp[i] * math.Pow(be, mExp[i]+1) / tR
	}
	c0, cp := r*tR/p0, r*tR/(p0*p0)
	v := c0*s0 + cp*sp*(pPa-p0)
	dv := c0*ds0 + cp*dsp*(pPa-p0)
	rho = 1 / v
	return rho, -rho * rho * dv
}

// TestTemperatureSensitivityWater checks ∂d/∂T of the budget, which takes
// η'(T) of the built-in water law by central difference, against the
// analytic derivative of the same formulation: IAPWS 2008 viscosity along
// the Pátek 2009 density at 0.101325 MPa, differentiated by the chain rule
//
//	d ln μ/dT = ∂ln μ/∂T + ∂ln μ/∂ρ · dρ/dT
//
// First the analytic functions must reproduce the dlsbatch values of μ and
// ρ (1e-12 relative: same formula, same coefficients), then
// c_T/d = 1/T − η'/η must agree to 1e-7 relative (the central difference's
// truncation is about 1e-8 there). The magnitude at 25 °C, η'/η ≈
// −0.0223 /K, is the familiar ≈ 2 %/K of water (from memory).
func TestTemperatureSensitivityWater(t *testing.T) {
	w, err := medium.Lookup("water")
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []float64{5, 20, 25, 37, 60, 85} {
		tK := tc + 273.15
		rho, dRho := patekDensityAndSlope(tK, medium.StandardAtmospherePa)
		if got := medium.WaterDensityKgM3(tK); !scalar.EqualWithinRel(got, rho, 1e-12) {
			t.Fatalf("%g °C: density %.12g, independent analytic form %.12g", tc, got, rho)
		}
		lnMu, dT, dR := iapwsLnViscosityAndSlopes(tK, rho)
		if got := w.Viscosity.ViscosityPaS(tK); !scalar.EqualWithinRel(got, math.Exp(lnMu), 1e-12) {
			t.Fatalf("%g °C: viscosity %.12g, independent analytic form %.12g", tc, got, math.Exp(lnMu))
		}
		dlnEta := dT + dR*dRho
		in := handInputs()
		in.TemperatureK = tK
		in.Viscosity = w.Viscosity.ViscosityPaS
		b, err := ZAverage(in)
		if err != nil {
			t.Fatal(err)
		}
		got := b.Components[1].Sensitivity / b.ZAvgNm
		want := 1/tK - dlnEta
		if !scalar.EqualWithinRel(got, want, 1e-7) {
			t.Errorf("%g °C: (∂d/∂T)/d = %.10g /K, analytic %.10g /K", tc, got, want)
		}
		if tc == 25 && !scalar.EqualWithinAbs(dlnEta, -0.0223, 0.0005) {
			t.Errorf("25 °C: d ln η/dT = %.5f /K, want about −0.0223", dlnEta)
		}
	}
}

// TestBudgetBadInput: the documented errors.
func TestBudgetBadInput(t *testing.T) {
	cases := map[string]func(*Inputs){
		"zero rate":          func(in *Inputs) { in.GammaPerS = 0 },
		"zero SE":            func(in *Inputs) { in.GammaSEPerS = 0 },
		"NaN temperature":    func(in *Inputs) { in.TemperatureK = math.NaN() },
		"angle 180°":         func(in *Inputs) { in.AngleRad = math.Pi },
		"index 0":            func(in *Inputs) { in.RefractiveIndex = 0 },
		"no viscosity":       func(in *Inputs) { in.Viscosity = nil },
		"negative viscosity": func(in *Inputs) { in.Viscosity = func(float64) float64 { return -1 } },
		"negative u(T)":      func(in *Inputs) { in.U.TemperatureK = -0.1 },
		"u(η) 100 %":         func(in *Inputs) { in.U.ViscosityRel = 1 },
		"negative dof":       func(in *Inputs) { in.GammaDOF = -1 },
		"negative k":         func(in *Inputs) { in.CoverageFactor = -2 },
	}
	for name, edit := range cases {
		in := handInputs()
		edit(in)
		if _, err := ZAverage(in); !errors.Is(err, ErrBadInput) {
			t.Errorf("%s: error %v, want ErrBadInput", name, err)
		}
	}
}

// TestBudgetJSON: the budget marshals with snake_case keys and no
// non-finite numbers (all Type B: ν_eff infinite is written as 0).
func TestBudgetJSON(t *testing.T) {
	in := handInputs()
	in.GammaDOF = 0
	b, err := ZAverage(in)
	if err != nil {
		t.Fatal(err)
	}
	// The normal 97.5 % quantile is 1.959964 (scipy.stats.norm.ppf).
	if b.EffectiveDOF != 0 || !scalar.EqualWithinAbs(b.CoverageFactorT95, 1.959964, 1e-6) {
		t.Errorf("ν_eff %g, t factor %g; want 0 (infinite) and 1.959964", b.EffectiveDOF, b.CoverageFactorT95)
	}
	js, err := json.Marshal(b)
	if err != nil {
		t.Fatal(err)
	}
	for _, key := range []string{`"z_avg_nm"`, `"combined_standard_uncertainty_nm"`, `"expanded_uncertainty_nm"`, `"coverage_factor":2`,
		`"sensitivity_nm_per_unit"`, `"variance_share_pct"`, `"name":"temperature"`} {
		if !strings.Contains(string(js), key) {
			t.Errorf("JSON lacks %s", key)
		}
	}
}

// TestViscosityRelUncertainty: the defaults for the solvent table's laws.
func TestViscosityRelUncertaintyncertainty(t *testing.T) {
	for _, c := range []struct {
		solvent string
		want    float64
		ok      bool
	}{{"water", 0.01, true}, {"ethanol", 0.03, true}, {"glycerol-water:0.4", 0, false}} {
		s, err := medium.Lookup(c.solvent)
		if err != nil {
			t.Fatal(err)
		}
		got, basis, ok := ViscosityRelUncertainty(s.Viscosity)
		if ok != c.ok || !scalar.EqualWithinAbs(got, c.want, 1e-15) || (ok && basis == "") {
			t.Errorf("%s: %g %q %v", c.solvent, got, basis, ok)
		}
	}
	if _, _, ok := ViscosityRelUncertainty(medium.ConstantViscosity{PaS: 1e-3}); ok {
		t.Error("a measured constant got a default uncertainty")
	}
}

// TestRepeatability: five runs 100.2, 99.8, 100.5, 99.9, 100.1 nm. By hand:
// mean 100.1; squared deviations 0.01, 0.09, 0.16, 0.04, 0 sum to 0.30;
// s² = 0.30/4 = 0.075, s = 0.2738613 nm; RSD 0.2735877 %; s/√5 =
// 0.1224745 nm; ν = 4. Tolerance 1e-6 relative (rounding of the decimal
// inputs).
func TestRepeatability(t *testing.T) {
	r, err := RepeatabilityOf([]float64{100.2, 99.8, 100.5, 99.9, 100.1})
	if err != nil {
		t.Fatal(err)
	}
	if r.N != 5 || r.DOF != 4 || !scalar.EqualWithinRel(r.Mean, 100.1, 1e-12) || !scalar.EqualWithinRel(r.SD, math.Sqrt(0.075), 1e-6) ||
		!scalar.EqualWithinRel(r.RSDPct, 0.2735877, 1e-6) || !scalar.EqualWithinRel(r.SEMean, 0.1224745, 1e-6) {
		t.Errorf("%+v", r)
	}
	for _, bad := range [][]float64{nil, {100}, {100, math.NaN()}} {
		if _, err := RepeatabilityOf(bad); !errors.Is(err, ErrBadInput) {
			t.Errorf("%v: %v", bad, err)
		}
	}
}
