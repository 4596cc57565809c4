package stats

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/stat"
)

func TestMedians(t *testing.T) {
	// Expected values: the examples of Python's statistics.median and
	// statistics.median_high (Python documentation), and hand counts for
	// the unsorted and single-value rows. All are exact in binary floating
	// point, so the tolerance is 0.
	cases := []struct {
		name      string
		v         []float64
		med, high float64
	}{
		{"odd", []float64{1, 3, 5}, 3, 3},
		{"even", []float64{1, 3, 5, 7}, 4, 5},
		{"unsorted even", []float64{5, 1, 3, 2}, 2.5, 3},
		{"one value", []float64{42}, 42, 42},
		{"negative", []float64{-1, -9, -4}, -4, -4},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			in := append([]float64(nil), c.v...)
			if got := Median(c.v); got != c.med {
				t.Errorf("Median = %g, want %g", got, c.med)
			}
			if got := MedianHigh(c.v); got != c.high {
				t.Errorf("MedianHigh = %g, want %g", got, c.high)
			}
			for i := range in {
				if in[i] != c.v[i] {
					t.Fatalf("input modified: %v, was %v", c.v, in)
				}
			}
		})
	}
}

// TestMedianAgainstGonum compares with gonum's empirical quantile, which
// for an odd count is the median and for an even count the lower middle
// value (so the median is its mean with the next order statistic). Random
// data from a seeded generator; tolerance 0 for the odd case (both pick
// one datum) and 1 ulp-level relative for the mean of two values.
func TestMedianAgainstGonum(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for n := 1; n <= 40; n++ {
		v := make([]float64, n)
		for i := range v {
			v[i] = rng.NormFloat64()*10 + 50
		}
		s := sortedCopy(v)
		lo := stat.Quantile(0.5, stat.Empirical, s, nil)
		if n%2 == 1 {
			if Median(v) != lo || MedianHigh(v) != lo {
				t.Errorf("n=%d: median %g, high %g, gonum %g", n, Median(v), MedianHigh(v), lo)
			}
			continue
		}
		hi := s[n/2]
		if want := (lo + hi) / 2; !scalar.EqualWithinRel(Median(v), want, 1e-15) {
			t.Errorf("n=%d: median %g, want %g", n, Median(v), want)
		}
		if MedianHigh(v) != hi || hi < lo {
			t.Errorf("n=%d: high median %g, want %g (lower %g)", n, MedianHigh(v), hi, lo)
		}
	}
}

func TestMeanSD(t *testing.T) {
	// 2, 4, 4, 4, 5, 5, 7, 9: mean 5, Σ(x − x̄)² = 32, s = √(32/7) =
	// 2.138089935… (closed form; Python's statistics.stdev agrees). The
	// sums are exact in binary, so only the square root rounds: 1e-15.
	m, sd := MeanSD([]float64{2, 4, 4, 4, 5, 5, 7, 9})
	if m != 5 || !scalar.EqualWithinRel(sd, math.Sqrt(32.0/7), 1e-15) {
		t.Errorf("MeanSD = %g, %g; want 5, %g", m, sd, math.Sqrt(32.0/7))
	}
	if m, sd := MeanSD([]float64{3.5}); m != 3.5 || sd != 0 {
		t.Errorf("one value: %g, %g; want 3.5, 0", m, sd)
	}
	// Against gonum on seeded random data: the same estimator, summed in
	// another order with a compensation term, so equal to rounding (1e-12
	// relative is far above the ~n·1e-16 that the order can change).
	rng := rand.New(rand.NewPCG(3, 4))
	for n := 2; n <= 50; n += 6 {
		v := make([]float64, n)
		for i := range v {
			v[i] = 100 + rng.NormFloat64()
		}
		m, sd := MeanSD(v)
		gm, gsd := stat.MeanStdDev(v, nil)
		if !scalar.EqualWithinRel(m, gm, 1e-12) || !scalar.EqualWithinRel(sd, gsd, 1e-12) {
			t.Errorf("n=%d: %g ± %g, gonum %g ± %g", n, m, sd, gm, gsd)
		}
	}
}

func TestCountDistinct(t *testing.T) {
	// Expected counts by hand from the rule |b − a| > atol + rtol·|b| for
	// neighbours a ≤ b (NumPy isclose's test). Counts are integers: exact.
	cases := []struct {
		name       string
		v          []float64
		atol, rtol float64
		want       int
	}{
		{"empty", nil, 0, 0, 0},
		{"exact", []float64{3, 1, 2, 1, 3}, 0, 0, 3},
		{"relative merges near equal", []float64{1, 1 + 1e-10, 2}, 0, 1e-9, 2},
		{"relative keeps apart", []float64{1, 1 + 1e-8, 2}, 0, 1e-9, 3},
		{"relative to the larger", []float64{100, 100.00005}, 0, 1e-6, 1},
		{"absolute: zero and tiny merge", []float64{0, 1e-12, 10}, 1e-9 * 10, 0, 2},
		{"relative alone keeps zero and tiny apart", []float64{0, 1e-12, 10}, 0, 1e-9, 3},
		{"chain of small steps", []float64{0, 0.4, 0.8, 1.2}, 0.5, 0, 1},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := CountDistinct(c.v, c.atol, c.rtol); got != c.want {
				t.Errorf("CountDistinct(%v, %g, %g) = %d, want %d", c.v, c.atol, c.rtol, got, c.want)
			}
		})
	}
}

func TestIsFinite(t *testing.T) {
	// IEEE 754 classes (common practice).
	cases := []struct {
		x    float64
		want bool
	}{
		{0, true}, {-1.5, true}, {math.MaxFloat64, true}, {math.SmallestNonzeroFloat64, true},
		{math.Inf(1), false}, {math.Inf(-1), false}, {math.NaN(), false},
	}
	for _, c := range cases {
		if got := IsFinite(c.x); got != c.want {
			t.Errorf("IsFinite(%g) = %v, want %v", c.x, got, c.want)
		}
	}
}

func TestMedianPanicsOnEmpty(t *testing.T) {
	defer func() {
		if recover() == nil {
			t.Error("no panic on an empty slice")
		}
	}()
	Median(nil)
}
