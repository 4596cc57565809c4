package sim_test

import (
	"fmt"
	"math"

	"dlsbatch/dls"
	"dlsbatch/dls/sim"
)

// A 100 nm sample measured photon by photon: four sub-runs of 0.25 s at a
// 2 µs base bin, β = 0.9 and a 5 % incoherent background. The output shows
// the set-up (it does not depend on the random draws); each sub-run's
// correlogram is in res.SubRuns, their mean and its standard error in
// res.Mean and res.SEM, and res.Output() gives Simulate's form.
func ExamplePhoton() {
	pop, _ := sim.ParsePopulation("mono(100nm)")
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
	grid, err := sim.NewGrid(sim.GridSpec{DtS: 2e-6, M: 8, TauMaxS: 0.02})
	if err != nil {
		fmt.Println(err)
		return
	}
	cfg := sim.PhotonConfig{Grid: grid, Beta: 0.9, CountRateHz: 1.9e5, BackgroundHz: 1e4, DurationS: 1, SubRuns: 4, Seed: 7}
	res, err := sim.Photon(m, &cfg)
	if err != nil {
		fmt.Println(err)
		return
	}
	// The grid: 16 channels of stage 0 and 8 of each stage up to 9, then
	// 9·2¹⁰·2 µs = 18.4 ms (10·2¹⁰·2 µs is beyond 20 ms); the intercept
	// 0.9·(190/200)² = 0.81225.
	fmt.Printf("%d sub-runs of %d bins, %d channels to %.3g s\n", len(res.SubRuns), res.BinsPerSubRun, len(res.TauS), res.TauS[len(res.TauS)-1])
	fmt.Printf("%d rate(s), %d coherence areas, intercept %.4f\n", len(res.Rates), len(res.Areas), res.BetaEff)
	// Output:
	// 4 sub-runs of 125000 bins, 89 channels to 0.0184 s
	// 1 rate(s), 2 coherence areas, intercept 0.8122
}
