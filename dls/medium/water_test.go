package medium

import (
	"dlsbatch/dls"
	"errors"
	"math"
	"strings"
	"testing"
)

// mediumClose fails the test when got and want differ by more than absTol.
func mediumClose(t *testing.T, what string, got, want, absTol float64) {
	t.Helper()
	if !(math.Abs(got-want) <= absTol) {
		t.Errorf("%s = %.9g, want %.9g ± %.3g (diff %.3g)", what, got, want, absTol, got-want)
	}
}

// mediumRel fails the test when got and want differ by more than relTol of want.
func mediumRel(t *testing.T, what string, got, want, relTol float64) {
	t.Helper()
	if !(math.Abs(got-want) <= relTol*math.Abs(want)) {
		t.Errorf("%s = %.9g, want %.9g ± %.2g relative (rel diff %.3g)", what, got, want, relTol, (got-want)/want)
	}
}

// Check values of the release: IAPWS R12-08, "Release on the IAPWS
// Formulation 2008 for the Viscosity of Ordinary Water Substance", Table 4
// (μ̄2 = 1); also Huber et al., J. Phys. Chem. Ref. Data 38, 101 (2009).
func TestWaterViscosityIAPWS2008Table4(t *testing.T) {
	tests := []struct {
		tK, rho, muMicroPaS float64
	}{
		{298.15, 998, 889.735100},
		{298.15, 1200, 1437.649467},
		{373.15, 1000, 307.883622},
		{433.15, 1, 14.538324},
		{433.15, 1000, 217.685358},
		{873.15, 1, 32.619287},
		{873.15, 100, 35.802262},
		{873.15, 600, 77.430195},
		{1173.15, 1, 44.217245},
		{1173.15, 100, 47.640433},
		{1173.15, 400, 64.154608},
	}
	for _, tc := range tests {
		got := WaterViscosityIAPWS2008PaS(tc.tK, tc.rho) * 1e6
		// 1e-6 relative: the formula is exact arithmetic and the release
		// prints 8–10 significant digits.
		mediumRel(t, "μ(T,ρ) µPa·s", got, tc.muMicroPaS, 1e-6)
	}
}

// Liquid water at 0.101325 MPa. Expected density and viscosity: computed
// with an independent script from Pátek et al. 2009 (density) and IAPWS
// 2008 (viscosity); they check this implementation of the same formulas,
// so the tolerance is half a unit of the printed last digit. The script is
// not kept in the repository, so these rows are in effect a pin at the
// printed digits; the outside checks of the same quantities are the IAPWS
// Table 4 values above, the SR6-08 correlation (3e-4, 0–90 °C) and Tanaka
// 2001 / Kell 1975 (density) below.
func TestWaterAtOneAtmosphere(t *testing.T) {
	tests := []struct {
		tC, rho, muMicroPaS float64
	}{
		{0, 999.8431, 1791.76},
		{5, 999.9666, 1518.17},
		{10, 999.7025, 1305.90},
		{15, 999.1026, 1137.57},
		{20, 998.2072, 1001.60},
		{25, 997.0476, 890.02},
		{30, 995.6494, 797.22},
		{37, 993.3297, 691.30},
		{40, 992.2163, 652.73},
		{50, 988.0351, 546.52},
		{60, 983.1958, 466.04},
		{70, 977.7646, 403.55},
		{80, 971.7904, 354.05},
		{90, 965.3096, 314.18},
	}
	for _, tc := range tests {
		tK := dls.KelvinFromCelsius(tc.tC)
		mediumClose(t, "ρ kg/m³", WaterDensityKgM3(tK), tc.rho, 0.5e-4+1e-9)
		mu, err := WaterViscosityPaS(tK)
		if err != nil {
			t.Errorf("%g °C: %v", tc.tC, err)
		}
		mediumClose(t, "μ µPa·s", mu*1e6, tc.muMicroPaS, 0.005+1e-9)
	}
}

// Independent cross-check: the simple 0.1 MPa correlation
// μ = Σ a_i (T/300 K)^b_i µPa·s (IAPWS SR6-08 / Pátek et al. 2009). The
// two formulations agree within 0.03 % over 0–90 °C (their stated
// agreement), which bounds any slip in either implementation.
func TestWaterViscosityAgainstSimpleCorrelation(t *testing.T) {
	a := []float64{280.68, 511.45, 61.131, 0.45903}
	b := []float64{-1.9, -7.7, -19.6, -40.0}
	for tC := 0.0; tC <= 90; tC++ {
		tK := dls.KelvinFromCelsius(tC)
		want := 0.0
		for i := range a {
			want += a[i] * math.Pow(tK/300, b[i])
		}
		got, err := WaterViscosityPaS(tK)
		if err != nil {
			t.Fatal(err)
		}
		mediumRel(t, "μ vs simple correlation", got*1e6, want, 3e-4)
	}
}

// Handbook values. Tolerances are half a unit of the last printed digit.
func TestWaterViscosityHandbook(t *testing.T) {
	tests := []struct {
		name        string
		tC, wantMPa float64
		tol         float64
	}{
		// ISO/TR 3666:1998 reference value for water at 20 °C (from memory).
		{"ISO/TR 3666 20 °C", 20, 1.0016, 0.00005},
		// CRC Handbook of Chemistry and Physics, "Concentrative properties
		// of aqueous solutions" header: 1.002 mPa·s at 20 °C.
		{"CRC 20 °C", 20, 1.002, 0.0005},
		// CRC Handbook, "Viscosity of liquids": 0.890 mPa·s at 25 °C.
		{"CRC 25 °C", 25, 0.890, 0.0005},
	}
	for _, tc := range tests {
		mu, err := WaterViscosityPaS(dls.KelvinFromCelsius(tc.tC))
		if err != nil {
			t.Fatal(err)
		}
		mediumClose(t, tc.name, mu*1e3, tc.wantMPa, tc.tol)
	}
}

func TestWaterDensity(t *testing.T) {
	// Pátek et al. 2009 at exactly 0.1 MPa, computed with an independent
	// script (printed to 1e-6 kg/m³, so ±0.6e-6). The script is not in the
	// repository; Tanaka 2001 and Kell 1975 below check the same density
	// from outside at 1.5 ppm and 0.02 kg/m³.
	patek := []struct{ tK, rho float64 }{
		{273.15, 999.842383},
		{293.15, 998.206546},
		{298.15, 997.047013},
		{310.15, 993.329164},
	}
	for _, tc := range patek {
		mediumClose(t, "Pátek ρ(0.1 MPa)", WaterDensityPatekKgM3(tc.tK, 0.1e6), tc.rho, 0.6e-6)
	}
	// Tanaka, Girard, Davis, Peuto, Bignell, Metrologia 38, 301 (2001)
	// (CIPM table, 101.325 kPa, 0–40 °C). The two correlations are stated
	// to agree within 1 ppm; 1.5 ppm leaves room for rounding.
	for tC := 0.0; tC <= 40; tC += 2.5 {
		const a1, a2, a3, a4, a5 = -3.983035, 301.797, 522528.9, 69.34881, 999.974950
		want := a5 * (1 - (tC+a1)*(tC+a1)*(tC+a2)/(a3*(tC+a4)))
		mediumRel(t, "ρ vs Tanaka 2001", WaterDensityKgM3(dls.KelvinFromCelsius(tC)), want, 1.5e-6)
	}
	// Kell, J. Chem. Eng. Data 20, 97 (1975), eq. 16 (1 atm, IPTS-68):
	// agrees within about 0.01 kg/m³ over 0–90 °C; 0.02 kg/m³ allows for
	// the IPTS-68/ITS-90 temperature difference.
	for tC := 0.0; tC <= 90; tC += 5 {
		num := 999.83952 + 16.945176*tC - 7.9870401e-3*tC*tC - 46.170461e-6*math.Pow(tC, 3) +
			105.56302e-9*math.Pow(tC, 4) - 280.54253e-12*math.Pow(tC, 5)
		want := num / (1 + 16.879850e-3*tC)
		mediumClose(t, "ρ vs Kell 1975", WaterDensityKgM3(dls.KelvinFromCelsius(tC)), want, 0.02)
	}
}

// IAPWS R9-97, "Release on the Refractive Index of Ordinary Water Substance
// as a Function of Wavelength, Temperature and Pressure", check values at
// given T and ρ.
func TestWaterRefractiveIndexIAPWS97CheckValues(t *testing.T) {
	tests := []struct {
		name         string
		tK, rho, lUm float64
		want         float64
	}{
		{"release 298.15 K 0.2265 µm", 298.15, 997.047435, 0.2265, 1.39277824},
		{"release 298.15 K 0.5893 µm", 298.15, 997.047435, 0.5893, 1.33285819},
		{"release 773.15 K 0.5893 µm", 773.15, 30.4758534, 0.5893, 1.00949307},
		// From memory, reproduced by an independent script from the formula.
		{"773.15 K 0.2265 µm", 773.15, 30.4758534, 0.2265, 1.01098988},
		// Computed from the formula with an independent script (not in the
		// repository: a pin; Daimon & Masumura below checks the index near
		// 1 µm from outside only to 4e-5).
		{"298.15 K 1.01 µm (computed)", 298.15, 997.047435, 1.01, 1.32483403},
		{"773.15 K 1.01 µm (computed)", 773.15, 30.4758534, 1.01, 1.00932712},
	}
	for _, tc := range tests {
		got := WaterRefractiveIndexIAPWS97(tc.tK, tc.rho, tc.lUm*1e-6)
		// 1e-8: the values are printed to 8 decimals of exact arithmetic.
		mediumClose(t, tc.name, got, tc.want, 1e-8)
	}
	// Release Table 3 at 273.15 K, 0.1 MPa, 0.2265 µm, here with the
	// Pátek density at 0.1 MPa; printed to 6 decimals.
	got := WaterRefractiveIndexIAPWS97(273.15, WaterDensityPatekKgM3(273.15, 0.1e6), 0.2265e-6)
	mediumClose(t, "release table 3, 273.15 K", got, 1.394527, 1e-6)
}

// Values at DLS laser lines at 0.101325 MPa, computed with an independent
// script (IAPWS R9-97 with Pátek density), printed to 5 decimals: 1e-5.
// The script is not in the repository, so the table is a pin at 5
// decimals; the outside check of the same index is the Daimon & Masumura
// test below (2e-5 over 0.40–0.85 µm at 19–21.5 °C) and the release check
// values above.
func TestWaterRefractiveIndexLaserLines(t *testing.T) {
	lines := []float64{405, 488, 514.5, 532, 589.3, 632.8, 660, 785, 830}
	table := []struct {
		tC float64
		n  []float64
	}{
		{15, []float64{1.34352, 1.33781, 1.33653, 1.33579, 1.33375, 1.33251, 1.33182, 1.32926, 1.32849}},
		{20, []float64{1.34309, 1.33739, 1.33612, 1.33538, 1.33335, 1.33211, 1.33142, 1.32887, 1.32810}},
		{25, []float64{1.34258, 1.33689, 1.33563, 1.33488, 1.33286, 1.33162, 1.33094, 1.32839, 1.32762}},
		{30, []float64{1.34199, 1.33632, 1.33505, 1.33431, 1.33229, 1.33105, 1.33038, 1.32784, 1.32707}},
		{37, []float64{1.34104, 1.33539, 1.33413, 1.33339, 1.33138, 1.33015, 1.32947, 1.32695, 1.32619}},
		{40, []float64{1.34060, 1.33495, 1.33369, 1.33296, 1.33095, 1.32972, 1.32904, 1.32653, 1.32577}},
		{50, []float64{1.33895, 1.33334, 1.33209, 1.33136, 1.32936, 1.32814, 1.32747, 1.32498, 1.32423}},
	}
	for _, row := range table {
		for i, lNm := range lines {
			got, err := WaterRefractiveIndex(dls.KelvinFromCelsius(row.tC), lNm*1e-9)
			if err != nil {
				t.Fatal(err)
			}
			mediumClose(t, "n(laser line)", got, row.n[i], 1e-5)
		}
	}
}

// Independent measurement: Daimon & Masumura, "Measurement of the
// refractive index of distilled water from the near-infrared region to the
// ultraviolet region", Appl. Opt. 46, 3811 (2007), Sellmeier sets at 19.0,
// 20.0 and 21.5 °C (vacuum wavelength). Their data agree with R9-97 within
// about 1e-5 in the visible; 2e-5 over 0.40–0.85 µm allows for the
// measurement uncertainty at the red end. Nearer 1 µm the two differ by up
// to 4e-5 (R9-97 lower), so the sweep stops at 0.85 µm.
func TestWaterRefractiveIndexDaimonMasumura(t *testing.T) {
	sets := []struct {
		tC float64
		bc [8]float64
	}{
		{19.0, [8]float64{5.672526103e-1, 5.085550461e-3, 1.736581125e-1, 1.814938654e-2, 2.121531502e-2, 2.617260739e-2, 1.138493213e-1, 1.073888649e1}},
		{20.0, [8]float64{5.684027565e-1, 5.101829712e-3, 1.726177391e-1, 1.821153936e-2, 2.086189578e-2, 2.620722293e-2, 1.130748688e-1, 1.069792721e1}},
		{21.5, [8]float64{5.689093832e-1, 5.110301794e-3, 1.719708856e-1, 1.825180155e-2, 2.062501582e-2, 2.624158904e-2, 1.123965424e-1, 1.067505178e1}},
	}
	for _, s := range sets {
		for lUm := 0.40; lUm <= 0.8501; lUm += 0.025 {
			l2 := lUm * lUm
			n2 := 1.0
			for k := 0; k < 4; k++ {
				n2 += s.bc[2*k] * l2 / (l2 - s.bc[2*k+1])
			}
			got, err := WaterRefractiveIndex(dls.KelvinFromCelsius(s.tC), lUm*1e-6)
			if err != nil {
				t.Fatal(err)
			}
			mediumClose(t, "n vs Daimon & Masumura", got, math.Sqrt(n2), 2e-5)
		}
	}
	// Published agreement at 21.5 °C: both give 1.34295 at 405 nm and
	// 1.33321 at 589.3 nm (printed to 5 decimals).
	n405, _ := WaterRefractiveIndex(dls.KelvinFromCelsius(21.5), 405e-9)
	mediumClose(t, "n(405 nm, 21.5 °C)", n405, 1.34295, 1e-5)
	n589, _ := WaterRefractiveIndex(dls.KelvinFromCelsius(21.5), 589.3e-9)
	mediumClose(t, "n(589.3 nm, 21.5 °C)", n589, 1.33321, 1e-5)
}

// Handbook n_D is relative to air: CRC "Concentrative properties of aqueous
// solutions" gives 1.3330 at 20 °C; times n_air ≈ 1.00027 (from memory) it is
// the absolute index. 1e-4: four printed decimals and the n_air estimate.
func TestWaterRefractiveIndexHandbook(t *testing.T) {
	got, err := WaterRefractiveIndex(dls.KelvinFromCelsius(20), 589.3e-9)
	if err != nil {
		t.Fatal(err)
	}
	mediumClose(t, "n_D(20 °C) absolute", got, 1.3330*1.00027, 1e-4)
}

func TestWaterRanges(t *testing.T) {
	mu, err := WaterViscosityPaS(dls.KelvinFromCelsius(95))
	if !errors.Is(err, dls.ErrOutOfRange) {
		t.Fatalf("95 °C: err = %v, want dls.ErrOutOfRange", err)
	}
	if want := "0.0–90.0 °C"; !strings.Contains(err.Error(), want) {
		t.Errorf("error %q does not name the range %q", err, want)
	}
	// The value is still returned: IAPWS 2008 holds for the stable liquid
	// up to the boiling point; the simple 0.1 MPa correlation (valid to
	// 383.15 K) agrees within 0.03 %.
	simple := 280.68*math.Pow(368.15/300, -1.9) + 511.45*math.Pow(368.15/300, -7.7) +
		61.131*math.Pow(368.15/300, -19.6) + 0.45903*math.Pow(368.15/300, -40)
	mediumRel(t, "μ(95 °C)", mu*1e6, simple, 3e-4)

	if _, err := WaterViscosityPaS(dls.KelvinFromCelsius(-1)); !errors.Is(err, dls.ErrOutOfRange) {
		t.Errorf("-1 °C: err = %v, want dls.ErrOutOfRange", err)
	}
	if _, err := WaterViscosityPaS(math.NaN()); !errors.Is(err, dls.ErrOutOfRange) {
		t.Errorf("NaN: err = %v, want dls.ErrOutOfRange", err)
	}
	_, err = WaterRefractiveIndex(dls.KelvinFromCelsius(25), 1200e-9)
	if !errors.Is(err, dls.ErrOutOfRange) || !strings.Contains(err.Error(), "200–1100 nm") {
		t.Errorf("1200 nm: err = %v, want dls.ErrOutOfRange naming 200–1100 nm", err)
	}
	if _, err := WaterRefractiveIndex(dls.KelvinFromCelsius(120), 633e-9); !errors.Is(err, dls.ErrOutOfRange) {
		t.Errorf("120 °C: err = %v, want dls.ErrOutOfRange", err)
	}
}

func BenchmarkWaterViscosityPaS(b *testing.B) {
	for i := 0; b.Loop(); i++ {
		_, _ = WaterViscosityPaS(283.15 + float64(i%60))
	}
}

func BenchmarkWaterRefractiveIndex(b *testing.B) {
	for i := 0; b.Loop(); i++ {
		_, _ = WaterRefractiveIndex(283.15+float64(i%60), 633e-9)
	}
}
