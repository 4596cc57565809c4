package medium

import (
	"dlsbatch/dls"
	"fmt"
	"math"
)

// Water: density (Pátek et al. 2009), viscosity (IAPWS 2008) and refractive
// index (IAPWS R9-97). The formulas and references are collected in
// doc.go.

// StandardAtmospherePa is the pressure at which dlsbatch evaluates liquid
// properties, 101 325 Pa (one standard atmosphere, exact by definition).
const StandardAtmospherePa = 101325.0

// Valid ranges of the water correlations as used by dlsbatch.
const (
	// Pátek et al. 2009 (IAPWS SR6-08) density near 0.1 MPa.
	WaterDensityTMinK = 253.15
	WaterDensityTMaxK = 383.15

	// Viscosity at 0.101325 MPa: from 0 °C (the melting point at that
	// pressure, IAPWS 2008 is stated from the melting curve up) to 90 °C,
	// the span that the check table of the implementation covers and the
	// usual top of DLS temperature control; the liquid boils at 99.97 °C.
	WaterViscosityTMinK = 273.15
	WaterViscosityTMaxK = 363.15

	// IAPWS R9-97 index: −12 °C … 500 °C and 0.2 … 1.1 µm; dlsbatch also
	// needs the density, so the upper temperature is that of Pátek 2009.
	WaterIndexTMinK      = 261.15
	WaterIndexTMaxK      = WaterDensityTMaxK
	WaterIndexLambdaMinM = 0.2e-6
	WaterIndexLambdaMaxM = 1.1e-6
)

// Source strings written into Props and listings.
const (
	srcWaterViscosity = "IAPWS 2008 viscosity with Pátek 2009 density at 0.1 MPa"
	srcWaterIndex     = "IAPWS R9-97 refractive index with Pátek 2009 density at 0.1 MPa"
)

// Pátek, Hrubý, Klomfar, Součková, Harvey, J. Phys. Chem. Ref. Data 38, 21
// (2009), Table 4; also IAPWS SR6-08.
var (
	patekA = [...]float64{5: 1.93763157e-2, 6.74458446e3, -2.22521604e5, 1.00231247e8,
		-1.63552118e9, 8.32299658e9, -7.5245878e-6, -1.3767418e-2, 1.0627293e1,
		-2.0457795e2, 1.2037414e3}
	patekN = [...]float64{6: 4, 5, 7, 8, 9, 1, 3, 5, 6, 7}
	patekB = [...]float64{5: 5.78545292e-3, -1.53195665e-2, 3.11337859e-2, -4.23546241e-2,
		3.38713507e-2, -1.19946761e-2, -3.1091470e-6, 2.8964919e-5, -1.3112763e-4,
		3.0410453e-4, -3.9034594e-4, 2.3403117e-4, -4.8510101e-5}
	patekM = [...]float64{5: 1, 2, 3, 4, 5, 6, 1, 3, 4, 5, 6, 7, 9}
)

// WaterDensityPatekKgM3 returns the density of liquid water in kg/m³ at
// temperature tK (kelvin) and pressure pPa (pascal) from the correlation of
// Pátek et al. 2009 (IAPWS SR6-08), valid 253.15–383.15 K near 0.1 MPa (the
// pressure term is linear and meant for small departures from 0.1 MPa). No
// range check.
func WaterDensityPatekKgM3(tK, pPa float64) float64 {
	const (
		r  = 461.51805 // J/(kg·K)
		tR = 10.0      // K
		ta = 593.0     // K
		tb = 232.0     // K
		p0 = 0.1e6     // Pa
	)
	alpha := tR / (ta - tK)
	beta := tR / (tK - tb)
	s0 := patekA[5]
	for i := 6; i <= 10; i++ {
		s0 += patekA[i] * math.Pow(alpha, patekN[i])
	}
	for i := 5; i <= 10; i++ {
		s0 += patekB[i] * math.Pow(beta, patekM[i])
	}
	sp := 0.0
	for i := 11; i <= 15; i++ {
		sp += patekA[i] * math.Pow(alpha, patekN[i])
	}
	for i := 11; i <= 17; i++ {
		sp += patekB[i] * math.Pow(beta, patekM[i])
	}
	v0 := r * tR / p0 * s0
	vp := r * tR / (p0 * p0) * sp
	return 1 / (v0 + vp*(pPa-p0))
}

// WaterDensityKgM3 returns the density of liquid water in kg/m³ at tK kelvin
// and 0.101325 MPa (Pátek et al. 2009, IAPWS SR6-08). No range check; the
// correlation holds for 253.15–383.15 K.
func WaterDensityKgM3(tK float64) float64 {
	return WaterDensityPatekKgM3(tK, StandardAtmospherePa)
}

// IAPWS R12-08 (Huber et al., J. Phys. Chem. Ref. Data 38, 101 (2009)),
// Tables 1 and 2 of the release.
var (
	iapwsH0 = [4]float64{1.67752, 2.20462, 0.6366564, -0.241605}
	iapwsH1 = [6][7]float64{
		{5.20094e-1, 2.22531e-1, -2.81378e-1, 1.61913e-1, -3.25372e-2, 0, 0},
		{8.50895e-2, 9.99115e-1, -9.06851e-1, 2.57399e-1, 0, 0, 0},
		{-1.08374, 1.88797, -7.72479e-1, 0, 0, 0, 0},
		{-2.89555e-1, 1.26613, -4.89837e-1, 0, 6.98452e-2, 0, -4.35673e-3},
		{0, 0, -2.57040e-1, 0, 0, 8.72102e-3, 0},
		{0, 1.20573e-1, 0, 0, 0, 0, -5.93264e-4},
	}
)

// WaterViscosityIAPWS2008PaS returns the viscosity of water in Pa·s at
// temperature tK (kelvin) and density rhoKgM3 (kg/m³) from the IAPWS 2008
// formulation (release R12-08) with the critical enhancement μ̄2 set to 1,
// as the release allows outside the critical region. No range check.
func WaterViscosityIAPWS2008PaS(tK, rhoKgM3 float64) float64 {
	const (
		tStar   = 647.096 // K
		rhoStar = 322.0   // kg/m³
		muStar  = 1e-6    // Pa·s
	)
	t := tK / tStar
	d := rhoKgM3 / rhoStar
	den := 0.0
	for i, h := range iapwsH0 {
		den += h / math.Pow(t, float64(i))
	}
	mu0 := 100 * math.Sqrt(t) / den
	x := 1/t - 1
	y := d - 1
	sum := 0.0
	xi := 1.0
	for i := 0; i < 6; i++ {
		inner := 0.0
		yj := 1.0
		for j := 0; j < 7; j++ {
			inner += iapwsH1[i][j] * yj
			yj *= y
		}
		sum += xi * inner
		xi *= x
	}
	mu1 := math.Exp(d * sum)
	return mu0 * mu1 * muStar
}

// waterViscosity is the viscosity at 0.101325 MPa without a range check.
func waterViscosity(tK float64) float64 {
	return WaterViscosityIAPWS2008PaS(tK, WaterDensityKgM3(tK))
}

// WaterViscosityPaS returns the viscosity of liquid water in Pa·s at tK
// kelvin and 0.101325 MPa: IAPWS 2008 with the density of Pátek et al. 2009.
// Outside 0–90 °C it returns the value and an error wrapping dls.ErrOutOfRange.
func WaterViscosityPaS(tK float64) (float64, error) {
	mu := waterViscosity(tK)
	if err := checkTemperature(tK, WaterViscosityTMinK, WaterViscosityTMaxK, srcWaterViscosity); err != nil {
		return mu, err
	}
	return mu, nil
}

// IAPWS R9-97 (Harvey, Gallagher, Levelt Sengers, J. Phys. Chem. Ref. Data
// 27, 761 (1998)), Table 2 of the release.
var iapwsRI = [8]float64{0.244257733, 9.74634476e-3, -3.73234996e-3, 2.68678472e-4,
	1.58920570e-3, 2.45934259e-3, 0.900704920, -1.66626219e-2}

// WaterRefractiveIndexIAPWS97 returns the absolute refractive index of water
// at temperature tK (kelvin), density rhoKgM3 (kg/m³) and vacuum wavelength
// lambdaM (metres) from IAPWS R9-97. No range check; the release states
// −12 °C … 500 °C, 0 … 1060 kg/m³ and 0.2 … 1.1 µm.
func WaterRefractiveIndexIAPWS97(tK, rhoKgM3, lambdaM float64) float64 {
	const (
		tStar   = 273.15   // K
		rhoStar = 1000.0   // kg/m³
		lStar   = 0.589e-6 // m
		lUV     = 0.229202
		lIR     = 5.432937
	)
	a := iapwsRI
	t := tK / tStar
	d := rhoKgM3 / rhoStar
	l2 := (lambdaM / lStar) * (lambdaM / lStar)
	rhs := a[0] + a[1]*d + a[2]*t + a[3]*l2*t + a[4]/l2 + a[5]/(l2-lUV*lUV) + a[6]/(l2-lIR*lIR) + a[7]*d*d
	A := d * rhs
	return math.Sqrt((2*A + 1) / (1 - A))
}

// waterIndex is the index at 0.101325 MPa without a range check.
func waterIndex(tK, lambdaM float64) float64 {
	return WaterRefractiveIndexIAPWS97(tK, WaterDensityKgM3(tK), lambdaM)
}

// WaterRefractiveIndex returns the absolute refractive index of liquid water
// at tK kelvin and 0.101325 MPa for vacuum wavelength lambdaM metres (IAPWS
// R9-97 with the density of Pátek et al. 2009). Outside −12 … 110 °C or
// 0.2 … 1.1 µm it returns the value and an error wrapping dls.ErrOutOfRange.
func WaterRefractiveIndex(tK, lambdaM float64) (float64, error) {
	n := waterIndex(tK, lambdaM)
	if err := checkTemperature(tK, WaterIndexTMinK, WaterIndexTMaxK, srcWaterIndex); err != nil {
		return n, err
	}
	if err := checkWavelength(lambdaM, WaterIndexLambdaMinM, WaterIndexLambdaMaxM, srcWaterIndex); err != nil {
		return n, err
	}
	return n, nil
}

// checkTemperature returns an error wrapping dls.ErrOutOfRange naming the range
// [minK, maxK] of the correlation src when tK lies outside it.
func checkTemperature(tK, minK, maxK float64, src string) error {
	// 1e-9 K of slack: a bound given in °C and a temperature converted from
	// °C may differ in the last bit.
	if tK >= minK-1e-9 && tK <= maxK+1e-9 {
		return nil
	}
	return fmt.Errorf("temperature %.1f °C is outside %.1f–%.1f °C of the %s: %w",
		tK-dls.ZeroCelsiusK, minK-dls.ZeroCelsiusK, maxK-dls.ZeroCelsiusK, src, dls.ErrOutOfRange)
}

// checkWavelength is checkTemperature for a vacuum wavelength in metres.
func checkWavelength(lambdaM, minM, maxM float64, src string) error {
	// Relative slack of 1e-12 for bounds converted from µm or nm.
	if lambdaM >= minM*(1-1e-12) && lambdaM <= maxM*(1+1e-12) {
		return nil
	}
	return fmt.Errorf("wavelength %.1f nm is outside %.0f–%.0f nm of the %s: %w",
		lambdaM*1e9, minM*1e9, maxM*1e9, src, dls.ErrOutOfRange)
}
