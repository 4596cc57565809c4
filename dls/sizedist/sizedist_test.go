package sizedist

import (
	"errors"
	"fmt"
	"math"
	"sync"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"dlsbatch/dls"
)

// workedOptics is the Stokes–Einstein worked example: water at 25 °C
// (η = 0.890022 mPa·s, n = 1.33162), 632.8 nm, 173°; a 100 nm sphere has
// Γ = 3418.78 1/s (Γ = D·q² with D = k_B·T/(3π·η·d) and q = 4πn·sin(θ/2)/λ,
// worked in Python 3 outside the project and printed to 6 digits; the same
// value as dls.TestScatteringVectorAndRate). The 100.00 nm it maps back to
// is checked to ±0.005 nm, half the last printed digit.
var workedOptics = dls.Optics{WavelengthM: 632.8e-9, AngleRad: 173 * math.Pi / 180, RefractiveIndex: 1.33162}

func logGrid(lo, hi float64, n int) []float64 {
	g := make([]float64, n)
	for i := range g {
		g[i] = lo * math.Pow(hi/lo, float64(i)/float64(n-1))
	}
	return g
}

func TestDistributionMapsRatesToSizes(t *testing.T) {
	gam := []float64{1000, 3418.78, 10000}
	d, err := New(Input{GammaPerS: gam, Amplitude: []float64{0, 1, 0}, TempK: 298.15,
		ViscosityPaS: 0.890022e-3, Optics: workedOptics, ParticleIndex: complex(1.5875, 0)})
	if err != nil {
		t.Fatal(err)
	}
	// Sizes come out increasing: the largest rate is the smallest size.
	if !(d.DiameterNm[0] < d.DiameterNm[1] && d.DiameterNm[1] < d.DiameterNm[2]) {
		t.Fatalf("grid not increasing: %v", d.DiameterNm)
	}
	if !scalar.EqualWithinAbs(d.DiameterNm[1], 100.00, 0.005) {
		t.Errorf("Γ = 3418.78 1/s maps to %.4f nm, want 100.00", d.DiameterNm[1])
	}
	if d.Intensity[1] != 1 || d.Number[1] != 1 || d.Volume[1] != 1 {
		t.Errorf("a single bin must hold all of every weighting: %v %v %v", d.Intensity, d.Number, d.Volume)
	}
}

func TestDistributionRayleighWeighting(t *testing.T) {
	// For particles much smaller than the wavelength the scattered
	// intensity per particle is ∝ d⁶ (Rayleigh limit, Bohren & Huffman
	// 1983 §5.2), so with equal intensity in every bin the number weights
	// fall as d⁻⁶ and the volume weights as d⁻³. At 1–5 nm the size
	// parameter is below 0.035; the first Mie correction is of order x²,
	// so 3e-3 relative covers it.
	gam := logGrid(3418.78*100/5, 3418.78*100/1, 9)
	amp := make([]float64, len(gam))
	for i := range amp {
		amp[i] = 1
	}
	d, err := New(Input{GammaPerS: gam, Amplitude: amp, TempK: 298.15, ViscosityPaS: 0.890022e-3,
		Optics: workedOptics, ParticleIndex: complex(1.5875, 0)})
	if err != nil {
		t.Fatal(err)
	}
	last := len(gam) - 1
	for j := 0; j < last; j++ {
		r := d.DiameterNm[last] / d.DiameterNm[j]
		if got, want := d.Number[j]/d.Number[last], math.Pow(r, 6); !scalar.EqualWithinRel(got, want, 3e-3) {
			t.Errorf("bin %d: number ratio %.6g, want (d ratio)^6 = %.6g", j, got, want)
		}
		if got, want := d.Volume[j]/d.Volume[last], math.Pow(r, 3); !scalar.EqualWithinRel(got, want, 3e-3) {
			t.Errorf("bin %d: volume ratio %.6g, want (d ratio)^3 = %.6g", j, got, want)
		}
	}
	for _, w := range [][]float64{d.Intensity, d.Number, d.Volume} {
		s := 0.0
		for _, v := range w {
			s += v
		}
		if !scalar.EqualWithinAbs(s, 1, 1e-12) {
			t.Errorf("weights sum to %.15g", s)
		}
	}
}

func TestDistributionPercentiles(t *testing.T) {
	// Equal weights on a log grid: the cumulative is linear in ln d from
	// the lower edge of the first bin to the upper edge of the last, so
	// d50 is the geometric middle of the grid and d10, d90 sit 10 % and
	// 90 % of the way in ln d (exact, up to rounding).
	d := &Distribution{DiameterNm: logGrid(10, 1000, 21)}
	w := make([]float64, 21)
	for i := range w {
		w[i] = 1
	}
	lo, hi := math.Log(10)-0.5*math.Log(100)/20, math.Log(1000)+0.5*math.Log(100)/20
	for _, p := range []float64{0.1, 0.5, 0.9} {
		want := math.Exp(lo + p*(hi-lo))
		if got := d.Percentile(w, p); !scalar.EqualWithinRel(got, want, 1e-12) {
			t.Errorf("d%.0f = %.6g, want %.6g", 100*p, got, want)
		}
	}
	// All weight in one bin: every percentile lies inside that bin.
	one := make([]float64, 21)
	one[10] = 1
	for _, p := range []float64{0.1, 0.5, 0.9} {
		got := d.Percentile(one, p)
		if got < d.DiameterNm[9] || got > d.DiameterNm[11] {
			t.Errorf("single bin: d%.0f = %.4g outside the bin around %.4g", 100*p, got, d.DiameterNm[10])
		}
	}
}

func TestDistributionBadInput(t *testing.T) {
	base := Input{GammaPerS: []float64{1, 2}, Amplitude: []float64{1, 1}, TempK: 298, ViscosityPaS: 1e-3,
		Optics: workedOptics, ParticleIndex: complex(1.59, 0)}
	cases := []struct {
		name string
		edit func(*Input)
	}{
		{"length mismatch", func(in *Input) { in.Amplitude = []float64{1} }},
		{"negative amplitude", func(in *Input) { in.Amplitude = []float64{1, -1} }},
		{"NaN amplitude", func(in *Input) { in.Amplitude = []float64{1, math.NaN()} }},
		{"decreasing rates", func(in *Input) { in.GammaPerS = []float64{2, 1} }},
		{"bad optics", func(in *Input) { in.Optics.AngleRad = 0 }},
		{"no temperature", func(in *Input) { in.TempK = 0 }},
	}
	for _, c := range cases {
		in := base
		c.edit(&in)
		if _, err := New(in); err == nil {
			t.Errorf("%s: accepted", c.name)
		}
	}
	in := base
	in.Amplitude = []float64{0, 0}
	if _, err := New(in); !errors.Is(err, ErrEmpty) {
		t.Errorf("all-zero amplitudes: %v", err)
	}
}

// TestWeightCache: distributions computed through a WeightCache equal those
// computed without it bit for bit (the cache returns mie.IntensityGrid of
// the same arguments), for repeated and for changed optics, from many
// goroutines at once; a change of any optical input is a different entry,
// and the cache holds at most WeightCacheSize entries.
func TestWeightCache(t *testing.T) {
	gam := logGrid(20, 2e5, 60)
	amp := make([]float64, len(gam))
	for i := range amp {
		amp[i] = math.Exp(-math.Pow(math.Log(gam[i]/3000), 2))
	}
	base := Input{GammaPerS: gam, Amplitude: amp, TempK: 298.15, ViscosityPaS: 0.890022e-3,
		Optics: workedOptics, ParticleIndex: complex(1.5875, 0)}
	variants := []func(*Input){
		func(*Input) {},
		func(in *Input) { in.ParticleIndex = complex(0.1838, 3.4313) },
		func(in *Input) { in.Optics.AngleRad = math.Pi / 2 },
		func(in *Input) { in.Optics.WavelengthM = 532e-9 },
		func(in *Input) { in.Optics.RefractiveIndex = 1.40 },
		func(in *Input) { in.TempK = 310.15 },
	}
	var wc WeightCache
	var wg sync.WaitGroup
	errs := make(chan error, 4*len(variants))
	for rep := 0; rep < 4; rep++ {
		for k, v := range variants {
			wg.Add(1)
			go func() {
				defer wg.Done()
				in := base
				v(&in)
				want, err := New(in)
				if err != nil {
					errs <- err
					return
				}
				in.Cache = &wc
				got, err := New(in)
				if err != nil {
					errs <- err
					return
				}
				for j := range want.Number {
					if math.Float64bits(got.Number[j]) != math.Float64bits(want.Number[j]) ||
						math.Float64bits(got.Scatter[j]) != math.Float64bits(want.Scatter[j]) || got.Masked[j] != want.Masked[j] {
						errs <- fmt.Errorf("variant %d bin %d: cached %v, direct %v", k, j, got.Number[j], want.Number[j])
						return
					}
				}
			}()
		}
	}
	wg.Wait()
	close(errs)
	for err := range errs {
		t.Error(err)
	}
	if n := wc.Len(); n != len(variants) {
		t.Errorf("%d entries for %d distinct grids and optics", n, len(variants))
	}
	for k := 0; k < WeightCacheSize+5; k++ {
		in := base
		in.TempK = 290 + float64(k)
		in.Cache = &wc
		if _, err := New(in); err != nil {
			t.Fatal(err)
		}
	}
	if n := wc.Len(); n != WeightCacheSize {
		t.Errorf("%d entries, want the bound %d", n, WeightCacheSize)
	}
}
