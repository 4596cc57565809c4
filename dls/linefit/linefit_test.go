package linefit

import (
	"math"
	"testing"
)

func TestFitExactAndCovariance(t *testing.T) {
	// y = 2 + 3x at x = 0, 1, 2, 3 with unit weights: exact, χ² = 0.
	// Centred sums by hand: S = 4, x̄ = 1.5, Sxx = 5, so var(b) = 1/5,
	// var(a) = 1/4 + 2.25/5 = 0.7, cov = −0.3 (known uncertainties).
	l := Fit([]float64{0, 1, 2, 3}, []float64{2, 5, 8, 11}, nil, true, false)
	if math.Abs(l.A-2) > 1e-12 || math.Abs(l.B-3) > 1e-12 || l.Chi2 > 1e-20 || l.DOF != 2 {
		t.Fatalf("fit %+v", l)
	}
	for _, c := range []struct{ got, want float64 }{{l.VarB, 0.2}, {l.VarA, 0.7}, {l.Cov, -0.3}} {
		if math.Abs(c.got-c.want) > 1e-12 {
			t.Errorf("covariance %g, want %g", c.got, c.want)
		}
	}
	// Residuals 1, −1, −1, 1 about y = 2 + 3x (a symmetric pattern the
	// line cannot absorb): χ² = 4, ν = 2; relative weights scale the
	// covariance by χ²/ν = 2, Birge by max(1, 2) = 2.
	y := []float64{3, 4, 7, 12}
	rel := Fit([]float64{0, 1, 2, 3}, y, nil, false, false)
	if math.Abs(rel.Chi2-4) > 1e-12 || math.Abs(rel.Scale-2) > 1e-12 || math.Abs(rel.VarB-0.4) > 1e-12 {
		t.Errorf("scaled fit %+v", rel)
	}
	if b := Fit([]float64{0, 1, 2, 3}, y, nil, true, true); math.Abs(b.Scale-2) > 1e-12 {
		t.Errorf("Birge scale %g, want 2", b.Scale)
	}
	// Slope test: B = 3 with SE √0.2 → z = 6.708, p ≈ 2·Φ(−6.708) ≈ 2e-11.
	z, p := SlopeTest(l, true)
	if math.Abs(z-3/math.Sqrt(0.2)) > 1e-12 || !(p > 0 && p < 1e-10) {
		t.Errorf("slope test z %g p %g", z, p)
	}
}
