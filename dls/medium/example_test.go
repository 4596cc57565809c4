package medium_test

import (
	"fmt"

	"dlsbatch/dls"
	"dlsbatch/dls/medium"
)

// Water at 25 °C and a 632.8 nm laser: IAPWS 2008 viscosity and IAPWS R9-97
// index, both at 0.101325 MPa (0.890022 mPa·s and 1.33162 as in the water
// tests; printed to the digits the output shows).
func ExampleLookup() {
	s, err := medium.Lookup("water")
	if err != nil {
		fmt.Println(err)
		return
	}
	p, err := s.Props(dls.KelvinFromCelsius(25), 632.8e-9, false)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("viscosity %.4f mPa·s, index %.5f\n", p.ViscosityPaS*1e3, p.RefractiveIndex)
	// Output: viscosity 0.8900 mPa·s, index 1.33162
}

// Outside its valid range a correlation is an error unless extrapolation is
// asked for; then the value comes with a warning.
func ExampleSolvent_Props_extrapolate() {
	s, _ := medium.Lookup("DMSO")
	_, err := s.Props(dls.KelvinFromCelsius(15), 633e-9, false)
	fmt.Println(err != nil)
	p, _ := s.Props(dls.KelvinFromCelsius(15), 633e-9, true)
	fmt.Println(len(p.Warnings))
	// Output:
	// true
	// 1
}

// A glycerol–water mixture by glycerol mass fraction (Cheng 2008 gives
// 6.002 mPa·s at 50 wt %, 20 °C; see TestGlycerolWaterCheng).
func ExampleGlycerolWater() {
	s, _ := medium.Lookup("glycerol-water:0.5")
	p, _ := s.Props(dls.KelvinFromCelsius(20), 632.8e-9, false)
	fmt.Printf("%s: %.2f mPa·s\n", s.Name, p.ViscosityPaS*1e3)
	// Output: glycerol-water:0.5: 6.00 mPa·s
}

// The viscosity of water from the IAPWS functions directly (1.0016 mPa·s at
// 20 °C, the ISO/TR 3666 value).
func ExampleWaterViscosityPaS() {
	mu, err := medium.WaterViscosityPaS(293.15)
	fmt.Printf("%.4f mPa·s %v\n", mu*1e3, err)
	// Output: 1.0016 mPa·s <nil>
}
