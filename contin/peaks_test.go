package contin

import (
	"math"
	"testing"
)

// logGrid returns n rates log-spaced from lo to hi and their trapezoid
// weights in ln Γ.
func logGrid(lo, hi float64, n int) (gam, w []float64) {
	h := math.Log(hi/lo) / float64(n-1)
	for j := 0; j < n; j++ {
		gam = append(gam, lo*math.Exp(float64(j)*h))
		w = append(w, h)
	}
	w[0], w[n-1] = h/2, h/2
	return gam, w
}

// gaussAmp returns amplitudes x_j = w_j·N(ln Γ_j; ln mode, s)·frac.
func gaussAmp(gam, w []float64, mode, s, frac float64) []float64 {
	x := make([]float64, len(gam))
	for j := range gam {
		u := math.Log(gam[j] / mode)
		x[j] = frac * w[j] * math.Exp(-u*u/(2*s*s)) / (s * math.Sqrt(2*math.Pi))
	}
	return x
}

func addTo(a, b []float64) []float64 {
	for i := range a {
		a[i] += b[i]
	}
	return a
}

func TestPeaks(t *testing.T) {
	gam, w := logGrid(10, 1e6, 101) // ln-step 0.115
	t.Run("gaussian mode between bins", func(t *testing.T) {
		// Mode 37 % of a bin away from a grid point. A parabola through
		// three samples of a Gaussian of width s = 2.6 steps locates its
		// vertex to O((h/s)²) of the offset, about 0.1 % of Γ here; 0.5 %.
		mode := gam[40] * math.Exp(0.37*math.Log(gam[1]/gam[0]))
		x := gaussAmp(gam, w, mode, 0.3, 1)
		p := Peaks(gam, x, nil)
		if len(p) != 1 {
			t.Fatalf("%d peaks", len(p))
		}
		if e := math.Abs(p[0].ModePerS/mode - 1); e > 0.005 {
			t.Errorf("mode %.5g, true %.5g", p[0].ModePerS, mode)
		}
		// Mean and width of the sampled log-normal: exp(s²/2)·mode and s,
		// to the trapezoid rule's accuracy on a smooth integrand (1e-3).
		if e := math.Abs(p[0].MeanPerS/(mode*math.Exp(0.045)) - 1); e > 1e-3 {
			t.Errorf("mean %.5g, want %.5g", p[0].MeanPerS, mode*math.Exp(0.045))
		}
		if math.Abs(p[0].SigmaLn-0.3) > 1e-3 || math.Abs(p[0].Fraction-1) > 1e-12 {
			t.Errorf("σ_ln %g fraction %g", p[0].SigmaLn, p[0].Fraction)
		}
		if got := PeaksMeanPerS(p); got != p[0].MeanPerS {
			t.Errorf("PeaksMeanPerS %g", got)
		}
	})
	t.Run("ripple is one peak", func(t *testing.T) {
		// A ±10 % ripple on a broad peak makes local maxima whose valleys
		// stay far above half the lower maximum.
		x := gaussAmp(gam, w, 1e3, 0.6, 1)
		for j := range x {
			x[j] *= 1 + 0.1*math.Sin(2*float64(j))
		}
		if p := Peaks(gam, x, nil); len(p) != 1 {
			t.Fatalf("%d peaks: %+v", len(p), p)
		}
	})
	t.Run("two peaks and a speck", func(t *testing.T) {
		x := gaussAmp(gam, w, 200, 0.15, 0.3)
		addTo(x, gaussAmp(gam, w, 2e4, 0.15, 0.695))
		x[95] += 0.005 // 0.5 % isolated bin: ripple by the 1 % rule
		p := Peaks(gam, x, nil)
		if len(p) != 2 {
			t.Fatalf("%d peaks: %+v", len(p), p)
		}
		// Fractions are of the total including the dropped speck: the two
		// Gaussians are each complete on the grid (trapezoid sums of a
		// normal density, exact to 1e-6 here).
		if math.Abs(p[0].Fraction-0.3) > 1e-6 || math.Abs(p[1].Fraction-0.695) > 1e-6 {
			t.Errorf("fractions %g %g", p[0].Fraction, p[1].Fraction)
		}
		if p[0].Hi >= p[1].Lo || math.Abs(p[0].ModePerS/200-1) > 0.005 || math.Abs(p[1].ModePerS/2e4-1) > 0.005 {
			t.Errorf("peaks %+v", p)
		}
		if p := Peaks(gam, x, &PeakSettings{MinFraction: 0.001}); len(p) != 3 {
			t.Errorf("with MinFraction 0.1 %%: %d peaks", len(p))
		}
	})
	t.Run("valley rule", func(t *testing.T) {
		// Two equal Gaussians 3σ apart: the density midway is
		// 2·exp(−1.125) ≈ 0.65 of a maximum, above the default 0.5, so one
		// peak; with Valley 0.7 they separate.
		s := 0.2
		x := gaussAmp(gam, w, 1e3, s, 0.5)
		addTo(x, gaussAmp(gam, w, 1e3*math.Exp(3*s), s, 0.5))
		if p := Peaks(gam, x, nil); len(p) != 1 {
			t.Errorf("default: %d peaks", len(p))
		}
		if p := Peaks(gam, x, &PeakSettings{Valley: 0.7}); len(p) != 2 {
			t.Errorf("valley 0.7: %d peaks", len(p))
		}
	})
	t.Run("edges and junk", func(t *testing.T) {
		x := make([]float64, len(gam))
		if p := Peaks(gam, x, nil); p != nil {
			t.Errorf("zero spectrum: %+v", p)
		}
		for j := range x {
			x[j] = float64(j) // rising to the last bin
		}
		// NaN and negative bins count as zero, which cuts off bins 1–2 as
		// a 0.06 % speck; the rest rises to its mode at the last bin.
		x[3], x[4] = math.NaN(), -5
		p := Peaks(gam, x, nil)
		if len(p) != 1 || !within(p[0].ModePerS, gam[len(gam)-1], 1e-12) || p[0].Lo != 5 || p[0].Hi != len(gam)-1 {
			t.Errorf("monotone: %+v", p)
		}
		if PeaksMeanPerS(nil) != 0 {
			t.Error("mean of no peaks")
		}
	})
	t.Run("length mismatch panics", func(t *testing.T) {
		defer func() {
			if recover() == nil {
				t.Error("no panic")
			}
		}()
		Peaks(gam, gam[:3], nil)
	})
}
