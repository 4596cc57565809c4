package linefit

import (
	"math"
	"testing"
)

func TestFitExactAndCovariance(t *testing.T) {
	// y = 2 + 3x at x = 0, 1, 2, 3 with unit weights: exact, χ² = 0.
	// Centred sums by hand: S = 4, x̄ = 1.5, Sxx = 5, so var(b) = 1/5,
	// var(a) = 1/4 + 2.25/5 = 0.7, cov = −0.3 (known uncertainties).
	l := Fit([]float64{0, 1, 2, 3}, []float64{2, 5, 8, 11}, nil, Options{KnownUncertainty: true})
	if math.Abs(l.A-2) > 1e-12 || math.Abs(l.B-3) > 1e-12 || l.Chi2 > 1e-20 || l.DOF != 2 {
		t.Fatalf("fit %+v", l)
	}
	for _, c := range []struct{ got, want float64 }{{l.VarB, 0.2}, {l.VarA, 0.7}, {l.Cov, -0.3}} {
		if math.Abs(c.got-c.want) > 1e-12 {
			t.Errorf("covariance %g, want %g", c.got, c.want)
		}
	}
	// Slope test: B = 3 with SE √0.2 → z = 6.708, p ≈ 2·Φ(−6.708) ≈ 2e-11.
	z, p := SlopeTest(l)
	if math.Abs(z-3/math.Sqrt(0.2)) > 1e-12 || !(p > 0 && p < 1e-10) {
		t.Errorf("slope test z %g p %g", z, p)
	}
}

// TestFitScaling checks each combination of Options on one data set.
// Residuals 1, −1, −1, 1 about y = 2 + 3x (a symmetric pattern the line
// cannot absorb): χ² = 4, ν = 2, χ²/ν = 2 (by hand). Relative weights
// scale the covariance by χ²/ν = 2, Birge by max(1, 2) = 2, known
// uncertainties not at all; var(b) is then 0.2 × scale (Sxx = 5 as above).
// With residuals ±0.5 instead (y2), χ²/ν = 0.5: Birge keeps 1, relative
// weights 0.5. Tolerance 1e-12: sums of a few exact binary values.
func TestFitScaling(t *testing.T) {
	x := []float64{0, 1, 2, 3}
	y := []float64{3, 4, 7, 12}
	y2 := []float64{2.5, 4.5, 7.5, 11.5}
	cases := []struct {
		name      string
		y         []float64
		o         Options
		scale     float64
		chi2      float64
		slopeTest string // "z" or "t"
	}{
		{"relative", y, Options{}, 2, 4, "t"},
		{"relative, Birge has no effect", y, Options{Birge: true}, 2, 4, "t"},
		{"known", y, Options{KnownUncertainty: true}, 1, 4, "z"},
		{"known with Birge, scatter above u", y, Options{KnownUncertainty: true, Birge: true}, 2, 4, "z"},
		{"known with Birge, scatter below u", y2, Options{KnownUncertainty: true, Birge: true}, 1, 1, "z"},
		{"relative, scatter below u", y2, Options{}, 0.5, 1, "t"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			l := Fit(x, c.y, nil, c.o)
			if math.Abs(l.Chi2-c.chi2) > 1e-12 || math.Abs(l.Scale-c.scale) > 1e-12 || math.Abs(l.VarB-0.2*c.scale) > 1e-12 {
				t.Errorf("χ² %g scale %g var(b) %g; want %g, %g, %g", l.Chi2, l.Scale, l.VarB, c.chi2, c.scale, 0.2*c.scale)
			}
			// The slope test follows the fit: a z-test (normal) for known
			// u, a t-test on ν = 2 otherwise. For the same statistic the
			// t-test's p-value is the larger (heavier tails).
			st, p := SlopeTest(l)
			pz := math.Erfc(math.Abs(st) / math.Sqrt2) // two-sided normal p (closed form)
			switch c.slopeTest {
			case "z":
				if math.Abs(p-pz) > 1e-12 {
					t.Errorf("z-test p %g, want %g", p, pz)
				}
			case "t":
				if !(p > pz) {
					t.Errorf("t-test p %g not above the normal %g", p, pz)
				}
			}
		})
	}
}
