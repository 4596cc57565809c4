package sim

import (
	"math"
	"math/rand/v2"
	"testing"
)

// directG2 is the symmetrically normalised estimator written out from its
// definition: the counts binned by 2^stage (an incomplete last bin
// dropped), mean(n_j·n_(j+k)) / (mean(n_j)·mean(n_(j+k))) over the N − k
// products.
func directG2(n []int64, stage, k int) float64 {
	L := 1 << stage
	b := make([]int64, len(n)/L)
	for i := range b {
		for j := range L {
			b[i] += n[i*L+j]
		}
	}
	var p, a, d float64
	m := len(b) - k
	for j := 0; j < m; j++ {
		p += float64(b[j] * b[j+k])
		a += float64(b[j])
		d += float64(b[j+k])
	}
	return p * float64(m) / (a * d)
}

// TestCorrelatorMatchesDefinition feeds random counts to the correlator and
// compares every channel with the estimator computed from its definition
// (Schätzel's multi-tau scheme: stage s correlates sums of 2^s base bins;
// symmetric normalisation by the direct and delayed monitors). Both sides
// sum the same integers, so only the final floating-point division differs:
// tolerance 1e-12 relative.
func TestCorrelatorMatchesDefinition(t *testing.T) {
	custom := &Grid{DtS: 1e-6, M: 4}
	for _, ch := range [][2]int{{0, 3}, {0, 1}, {0, 7}, {3, 5}, {3, 9}, {5, 2}} {
		ts := math.Ldexp(1e-6, ch[0])
		custom.TauS = append(custom.TauS, float64(ch[1])*ts)
		custom.SampleS = append(custom.SampleS, ts)
		custom.Stage = append(custom.Stage, ch[0])
		custom.Index = append(custom.Index, ch[1])
	}
	std, err := NewGrid(GridSpec{DtS: 1e-6, M: 4, Channels: 40})
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name string
		grid *Grid
		bins int
		mean float64 // mean count per bin
	}{
		{"standard M=4, sparse counts", std, 40000, 0.3},
		{"standard M=4, odd length, dense counts", std, 33333, 7},
		{"custom stages with gaps, unsorted", custom, 5001, 2},
	}
	for ti, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			rng := rand.New(rand.NewPCG(42, uint64(ti)))
			n := make([]int64, tc.bins)
			for i := range n {
				// Counts with a slow modulation, so the lags see correlation.
				lam := tc.mean * (1 + 0.8*math.Sin(float64(i)/50))
				for s := rng.ExpFloat64(); s < lam; s += rng.ExpFloat64() {
					n[i]++
				}
			}
			cr, err := NewCorrelator(tc.grid)
			if err != nil {
				t.Fatal(err)
			}
			// Push twice with a Reset between: the second run must not see
			// the first.
			for range 2 {
				cr.Reset()
				for _, v := range n {
					cr.Push(v)
				}
			}
			if cr.Bins() != int64(len(n)) {
				t.Fatalf("Bins = %d, want %d", cr.Bins(), len(n))
			}
			got, err := cr.G2(nil)
			if err != nil {
				t.Fatal(err)
			}
			for c := range tc.grid.TauS {
				want := directG2(n, tc.grid.Stage[c], tc.grid.Index[c])
				if relErr(got[c], want) > 1e-12 {
					t.Errorf("channel %d (stage %d, k=%d): %.15g, want %.15g", c, tc.grid.Stage[c], tc.grid.Index[c], got[c], want)
				}
			}
		})
	}
}

func TestCorrelatorErrors(t *testing.T) {
	good, _ := NewGrid(GridSpec{DtS: 1e-6, M: 8, Channels: 24})
	bad := map[string]*Grid{
		"nil":          nil,
		"empty":        {DtS: 1e-6, M: 8},
		"lag mismatch": {DtS: 1e-6, M: 8, TauS: []float64{3e-6}, SampleS: []float64{1e-6}, Stage: []int{0}, Index: []int{2}},
		"sample time":  {DtS: 1e-6, M: 8, TauS: []float64{4e-6}, SampleS: []float64{1e-6}, Stage: []int{1}, Index: []int{2}},
		"zero index":   {DtS: 1e-6, M: 8, TauS: []float64{0}, SampleS: []float64{1e-6}, Stage: []int{0}, Index: []int{0}},
		"duplicate":    {DtS: 1e-6, M: 8, TauS: []float64{2e-6, 2e-6}, SampleS: []float64{1e-6, 1e-6}, Stage: []int{0, 0}, Index: []int{2, 2}},
		"short slices": {DtS: 1e-6, M: 8, TauS: []float64{2e-6}, SampleS: []float64{1e-6}},
	}
	for name, g := range bad {
		if _, err := NewCorrelator(g); err == nil {
			t.Errorf("%s: no error", name)
		}
	}
	cr, err := NewCorrelator(good)
	if err != nil {
		t.Fatal(err)
	}
	for range 10 {
		cr.Push(1)
	}
	// The longest lag (16·2 bins) has no product after 10 bins.
	if _, err := cr.G2(nil); err == nil {
		t.Error("G2 with too few bins: no error")
	}
	cr.Reset()
	for range 1000 {
		cr.Push(0)
	}
	if _, err := cr.G2(nil); err == nil {
		t.Error("G2 without counts: no error")
	}
}
