package mie_test

import (
	"fmt"
	"math"

	"dlsbatch/dls/mie"
)

// The worked example of Bohren & Huffman (1983), Appendix A. The book prints
// Qext = Qsca = 3.10543 from a single-precision run; double precision (and
// the 60-digit testdata/mie_mpmath.py, 3.1054247) rounds to 3.10542.
func ExampleCompute() {
	e, err := mie.Compute(5.212820, 1.55)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("Qext %.5f Qsca %.5f Qback %.5f g %.5f\n", e.Qext, e.Qsca, e.Qback, e.G)
	// Output:
	// Qext 3.10542 Qsca 3.10542 Qback 2.92534 g 0.63314
}

// Intensity weights of polystyrene spheres in water at 173° (unpolarised
// light), relative to the 100 nm sphere: about d⁶ at small sizes (the
// Rayleigh limit), flattening once the spheres reach a few hundred nm. The
// printed ratios are those of (|S1|² + |S2|²)/2 at 173° from the 60-digit
// testdata/mie_mpmath.py at x = π·d·n_w/λ, m = 1.58753/1.33162 (k cancels
// in the ratio): 8.477e-05, 0.01952, 1, 19.23, 40.69.
func ExampleIntensityGrid() {
	const (
		lambda = 632.8e-9
		nWater = 1.33162
	)
	nPS, _, err := mie.MaterialIndex("polystyrene", lambda)
	if err != nil {
		fmt.Println(err)
		return
	}
	d := []float64{20e-9, 50e-9, 100e-9, 200e-9, 500e-9}
	c, err := mie.IntensityGrid(d, lambda, nWater, nPS, 173*math.Pi/180, mie.Unpolarized)
	if err != nil {
		fmt.Println(err)
		return
	}
	for j := range d {
		fmt.Printf("d=%.0f nm  %.4g\n", d[j]*1e9, c[j]/c[2])
	}
	// Output:
	// d=20 nm  8.477e-05
	// d=50 nm  0.01952
	// d=100 nm  1
	// d=200 nm  19.23
	// d=500 nm  40.69
}

func ExampleMaterialIndex() {
	m, src, err := mie.MaterialIndex("Au", 532e-9)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(mie.FormatComplexIndex(m))
	fmt.Println(src)
	_, _, err = mie.MaterialIndex("Au", 1064e-9)
	fmt.Println(err)
	// Output:
	// 0.5439+2.2309i
	// Johnson & Christy, Phys. Rev. B 6, 4370-4379 (1972), doi:10.1103/PhysRevB.6.4370; interpolated table
	// mie: material Au: wavelength 1064 nm outside the tabulated range 405–830 nm: wavelength outside the material's data range
}

func ExampleParseComplexIndex() {
	m, err := mie.ParseComplexIndex("0.2+3.1i")
	fmt.Println(m, err)
	_, err = mie.ParseComplexIndex("1.59-0.01i")
	fmt.Println(err)
	// Output:
	// (0.2+3.1i) <nil>
	// mie: refractive index "1.59-0.01i" has a negative imaginary part: the convention here is m = n + ik with k ≥ 0 for absorption (Bohren & Huffman); write n − ik data with +k, e.g. 1.59+0.01i: invalid argument
}
