package sim_test

import (
	"fmt"
	"math"

	"dlsbatch/dls"
	"dlsbatch/dls/sim"
)

// A 100 nm monodisperse sample in water at 25 °C, seen at 173° with a
// 632.8 nm laser; Rayleigh weighting (no Mie function given).
func Example() {
	pop, err := sim.ParsePopulation("mono(100nm)")
	if err != nil {
		fmt.Println(err)
		return
	}
	cond := sim.Conditions{
		TemperatureK: 298.15,
		ViscosityPaS: 0.890022e-3,
		Optics:       dls.Optics{WavelengthM: 632.8e-9, AngleRad: 173 * math.Pi / 180, RefractiveIndex: 1.33162},
	}
	m, err := sim.NewModel(pop, cond, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	cfg := sim.DefaultConfig()
	cfg.NoNoise = true
	out, err := sim.Simulate(m, &cfg)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("channels %d, last lag %.3g s\n", len(out.TauS), out.TauS[len(out.TauS)-1])
	fmt.Printf("Γ̄ = %.2f /s, z-average %.2f nm, PDI %.3f\n", out.Truth.GammaMeanPerS, out.Truth.ZAvgM*1e9, out.Truth.PDI)
	fmt.Printf("g2(%.3g s) = %.4f\n", out.TauS[0], out.Runs[0].G2[0])
	// Output:
	// channels 200, last lag 3.36 s
	// Γ̄ = 3418.79 /s, z-average 100.00 nm, PDI 0.000
	// g2(2.5e-08 s) = 1.8998
}

// A bimodal mixture stated by intensity, 70 % at 30 nm and 30 % at 300 nm.
func ExampleParsePopulation() {
	p, err := sim.ParsePopulation("70% mono(30nm) + 30% mono(300nm) @intensity")
	fmt.Println(p, err)
	// Output:
	// 70%mono(30nm)+30%mono(300nm)@intensity <nil>
}
