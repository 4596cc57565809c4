package mie

import (
	"errors"
	"math"
	"strings"
	"testing"
)

const (
	testNWater  = 1.33162 // water at 632.8 nm, 25 °C (IAPWS R9-97)
	testLambdaM = 632.8e-9
	testNPS     = 1.58753 // polystyrene at 632.8 nm (Sultanova et al. 2009)
)

var testGold = complex(0.1838, 3.4313) // Au at 632.8 nm, Johnson & Christy (1972) interpolated

// TestRayleighLimit: for x ≪ 1 (and |m|x ≪ 1) the Mie intensity tends to
// the Rayleigh form k⁴a⁶|(m²−1)/(m²+2)|² (Bohren & Huffman 1983, §5.2) with
// a relative deviation of order x² (the next terms of a_1 and the leading
// b_1 and a_2 are x² smaller). Checked: the deviation shrinks by a factor
// close to 4 (0.2–0.3 allowed, i.e. order x² with higher-order terms) each
// time the diameter halves, and is below 2e-4 at 1 nm (x = 0.0066).
func TestRayleighLimit(t *testing.T) {
	for _, mp := range []complex128{testNPS, testGold} {
		for _, pol := range []Polarization{Vertical, Unpolarized} {
			for _, deg := range []float64{90, 173} {
				th := deg * math.Pi / 180
				prev := math.NaN()
				for _, d := range []float64{16e-9, 8e-9, 4e-9, 2e-9, 1e-9, 0.5e-9} {
					mie, err := Intensity(d, testLambdaM, testNWater, mp, th, pol)
					if err != nil {
						t.Fatal(err)
					}
					ray, err := RayleighIntensity(d, testLambdaM, testNWater, mp, th, pol)
					if err != nil {
						t.Fatal(err)
					}
					dev := math.Abs(mie/ray - 1)
					if !math.IsNaN(prev) {
						if r := dev / prev; r < 0.2 || r > 0.3 {
							t.Errorf("m=%v %v %v° d=%g: deviation %.3g, %.3g of the previous (want ≈ 1/4)", mp, pol, deg, d, dev, r)
						}
					}
					if d <= 1e-9 && dev > 2e-4 {
						t.Errorf("m=%v %v %v° d=%g: Mie/Rayleigh − 1 = %.3g", mp, pol, deg, d, dev)
					}
					prev = dev
				}
			}
		}
	}
}

// TestRayleighSecondOrder checks the x² term of |S1|²/|S1,Rayleigh|² − 1
// against the power series of the Mie coefficients (Bohren & Huffman 1983,
// §5.1; expansions from memory):
//
//	a_1 = −(2i/3)x³K·[1 + (3/5)x²(m²−2)/(m²+2)] + O(x⁶), K = (m²−1)/(m²+2)
//	b_1 = −(i/45)x⁵(m²−1),  a_2 = −(i/15)x⁵(m²−1)/(2m²+3)
//
// so that, with μ = cos θ,
//
//	|S1|²/|S1,R|² − 1 ≈ 2 Re{x²[(3/5)(m²−2)/(m²+2) + μ(m²+2)/30 + μ(m²+2)/(6(2m²+3))]}.
//
// Tolerance x³: the next terms are O(x⁴) for real m and O(x³) (the
// radiation-reaction term (4/9)x⁶K² of a_1) for absorbing m.
func TestRayleighSecondOrder(t *testing.T) {
	for _, mp := range []complex128{testNPS, testGold, 1.45} {
		for _, deg := range []float64{30, 90, 173} {
			th := deg * math.Pi / 180
			mu := complex(math.Cos(th), 0)
			for _, d := range []float64{16e-9, 4e-9, 1e-9} {
				mie, err := Intensity(d, testLambdaM, testNWater, mp, th, Vertical)
				if err != nil {
					t.Fatal(err)
				}
				ray, err := RayleighIntensity(d, testLambdaM, testNWater, mp, th, Vertical)
				if err != nil {
					t.Fatal(err)
				}
				x := SizeParameter(d, testLambdaM, testNWater)
				m := mp / complex(testNWater, 0)
				m2 := m * m
				delta := complex(x*x, 0) * (0.6*(m2-2)/(m2+2) + mu*(m2+2)/30 + mu*(m2+2)/(6*(2*m2+3)))
				if diff := math.Abs(mie/ray - 1 - 2*real(delta)); diff > x*x*x {
					t.Errorf("m=%v %v° x=%.4g: deviation %.6g, series %.6g (diff %.2g > x³)", mp, deg, x, mie/ray-1, 2*real(delta), diff)
				}
			}
		}
	}
}

// TestNumberWeightingReducesToD6: converting an intensity distribution of
// small spheres to number with N_j ∝ I_j/C(d_j) must equal N_j ∝ I_j/d_j⁶
// (the Rayleigh limit) ever more closely as the sizes shrink. Tolerance
// 5·x_max²: by the second-order series (TestRayleighSecondOrder) C/d⁶
// varies by at most about 2.4·x² over the grid for gold at 173° (0.7·x²
// for polystyrene), and normalising both distributions can double that.
func TestNumberWeightingReducesToD6(t *testing.T) {
	for _, scale := range []float64{1e-9, 1e-10} { // grids 1–10 nm and 0.1–1 nm
		var d, in []float64
		for j := 0; j < 19; j++ {
			dj := scale * (1 + 0.5*float64(j))
			d = append(d, dj)
			u := (dj - 5*scale) / (2 * scale)
			in = append(in, math.Exp(-u*u/2)) // an invented intensity peak
		}
		xMax := SizeParameter(d[len(d)-1], testLambdaM, testNWater)
		tol := 5 * xMax * xMax
		for _, mp := range []complex128{testNPS, testGold} {
			c, err := IntensityGrid(d, testLambdaM, testNWater, mp, 173*math.Pi/180, Vertical)
			if err != nil {
				t.Fatal(err)
			}
			nMie := make([]float64, len(d))
			nD6 := make([]float64, len(d))
			var sMie, sD6 float64
			for j := range d {
				nMie[j] = in[j] / c[j]
				nD6[j] = in[j] / math.Pow(d[j], 6)
				sMie += nMie[j]
				sD6 += nD6[j]
			}
			for j := range d {
				if r := relErr(nMie[j]/sMie, nD6[j]/sD6); r > tol {
					t.Errorf("m=%v d=%g: number fraction %.6g (Mie) vs %.6g (d⁶), rel %.2g > %.2g", mp, d[j], nMie[j]/sMie, nD6[j]/sD6, r, tol)
				}
			}
		}
	}
}

func logGrid(n int, lo, hi float64) []float64 {
	d := make([]float64, n)
	for j := range d {
		d[j] = lo * math.Pow(hi/lo, float64(j)/float64(n-1))
	}
	return d
}

// TestIntensityGridMatchesIntensity: the grid is the single-size function
// applied elementwise, including sizes past the stack buffer (x > 480).
// Tolerance 1e-15 relative: the same arithmetic in the same order.
func TestIntensityGridMatchesIntensity(t *testing.T) {
	d := append(logGrid(40, 1e-9, 10e-6), 100e-6, 300e-6)
	for _, pol := range []Polarization{Vertical, Unpolarized} {
		c, err := IntensityGrid(d, testLambdaM, testNWater, testGold, 173*math.Pi/180, pol)
		if err != nil {
			t.Fatal(err)
		}
		if len(c) != len(d) {
			t.Fatalf("len %d, want %d", len(c), len(d))
		}
		for j := range d {
			w, err := Intensity(d[j], testLambdaM, testNWater, testGold, 173*math.Pi/180, pol)
			if err != nil {
				t.Fatal(err)
			}
			if relErr(c[j], w) > 1e-15 {
				t.Errorf("%v d=%g: grid %.17g, single %.17g", pol, d[j], c[j], w)
			}
		}
	}
}

// TestIntensityGridAllocs: only the result is allocated for a DLS grid.
func TestIntensityGridAllocs(t *testing.T) {
	d := logGrid(100, 1e-9, 10e-6)
	allocs := testing.AllocsPerRun(20, func() {
		if _, err := IntensityGrid(d, testLambdaM, testNWater, complex(testNPS, 0), 173*math.Pi/180, Vertical); err != nil {
			t.Fatal(err)
		}
	})
	if allocs != 1 {
		t.Errorf("IntensityGrid allocates %v times per call, want 1 (the result)", allocs)
	}
}

func TestIntensityErrors(t *testing.T) {
	th := math.Pi / 2
	tests := []struct {
		name    string
		d       []float64
		lambda  float64
		n       float64
		m       complex128
		theta   float64
		pol     Polarization
		wantMsg string
	}{
		{"zero wavelength", []float64{1e-7}, 0, 1.33, 1.59, th, Vertical, "wavelength"},
		{"NaN medium", []float64{1e-7}, 633e-9, math.NaN(), 1.59, th, Vertical, "medium index"},
		{"negative k", []float64{1e-7}, 633e-9, 1.33, 1.59 - 0.01i, th, Vertical, "n + ik"},
		{"degrees", []float64{1e-7}, 633e-9, 1.33, 1.59, 173, Vertical, "radians"},
		{"bad polarization", []float64{1e-7}, 633e-9, 1.33, 1.59, th, Polarization(7), "polarization"},
		{"bad diameter in grid", []float64{1e-7, 2e-7, 3e-7, -1e-9}, 633e-9, 1.33, 1.59, th, Vertical, "diameter 3 of the grid"},
		{"NaN diameter", []float64{math.NaN()}, 633e-9, 1.33, 1.59, th, Vertical, "diameter"},
		{"too large", []float64{1e-7, 1}, 633e-9, 1.33, 1.59, th, Vertical, "maximum"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := IntensityGrid(tc.d, tc.lambda, tc.n, tc.m, tc.theta, tc.pol)
			if !errors.Is(err, ErrInvalidArgument) || !strings.Contains(err.Error(), tc.wantMsg) {
				t.Errorf("IntensityGrid error %v, want ErrInvalidArgument mentioning %q", err, tc.wantMsg)
			}
			if len(tc.d) == 1 {
				if _, err := Intensity(tc.d[0], tc.lambda, tc.n, tc.m, tc.theta, tc.pol); !errors.Is(err, ErrInvalidArgument) {
					t.Errorf("Intensity error %v, want ErrInvalidArgument", err)
				}
				if _, err := RayleighIntensity(tc.d[0], tc.lambda, tc.n, tc.m, tc.theta, tc.pol); !errors.Is(err, ErrInvalidArgument) {
					t.Errorf("RayleighIntensity error %v, want ErrInvalidArgument", err)
				}
			}
		})
	}
}

func TestPolarizationString(t *testing.T) {
	for p, want := range map[Polarization]string{Vertical: "vertical", Unpolarized: "unpolarized", 5: "Polarization(5)"} {
		if got := p.String(); got != want {
			t.Errorf("%d: %q, want %q", int(p), got, want)
		}
	}
}
