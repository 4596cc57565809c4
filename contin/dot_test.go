package contin

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"
)

// TestDotKernelsAgree: dot and dots (four rows of unequal lengths) give
// the same bits with the AVX2 kernels as in plain Go (so results do not
// depend on the machine), and dots the same bits as dot, for every length
// from 0 to 200 at odd offsets and with values spread over ±20 decades;
// and each sum is within the dot-product error bound n·eps·Σ|x_i y_i|
// (Higham 2002, §3.1) of the exact sum (math/big, 300 bits).
func TestDotKernelsAgree(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	val := func() float64 { return r.NormFloat64() * math.Pow(10, 20*(r.Float64()-0.5)) }
	saved := useAVX2
	defer func() { useAVX2 = saved }()
	for n := 0; n <= 200; n++ {
		off := n % 3
		x := make([]float64, n+off)
		var ys [4][]float64
		for i := range x {
			x[i] = val()
		}
		for d := range ys {
			ys[d] = make([]float64, n+off)
			for i := range ys[d] {
				ys[d][i] = val()
			}
		}
		xs := x[off:]
		// Four rows of b of unequal lengths (n, n−1, n−5, n−2, clipped at
		// 0), through dots, and the first through dot alone.
		b := make([]float64, 4*(n+off))
		for d := range ys {
			copy(b[d*(n+off):], ys[d])
		}
		ls := []int{n, max(n-1, 0), max(n-5, 0), max(n-2, 0)}
		var got [2][5]float64
		for k, avx := range []bool{saved, false} {
			useAVX2 = avx
			dots(xs, b[off:], n+off, []int{0, 1, 2, 3}, ls, got[k][:4])
			got[k][4] = dot(xs, ys[0][off:])
		}
		if math.Float64bits(got[0][4]) != math.Float64bits(got[0][0]) {
			t.Fatalf("n=%d: dot %v, dots %v", n, got[0][4], got[0][0])
		}
		for d := range got[0] {
			if math.Float64bits(got[0][d]) != math.Float64bits(got[1][d]) {
				t.Fatalf("n=%d sum %d: kernel %v, plain Go %v", n, d, got[0][d], got[1][d])
			}
		}
		for d := 0; d < 4; d++ {
			exact, bound := new(big.Float).SetPrec(300), 0.0
			for i, v := range xs[:ls[d]] {
				p := new(big.Float).SetPrec(300).SetFloat64(v)
				p.Mul(p, new(big.Float).SetFloat64(ys[d][off+i]))
				exact.Add(exact, p)
				bound += math.Abs(v * ys[d][off+i])
			}
			e, _ := exact.Float64()
			if err := math.Abs(got[0][d] - e); !(err <= float64(ls[d])*eps*bound) {
				t.Fatalf("n=%d sum %d: %v, exact %v (error %.3g, bound %.3g)", n, d, got[0][d], e, err, float64(ls[d])*eps*bound)
			}
		}
	}
	if !saved {
		t.Log("no AVX2 on this machine: plain Go compared with itself")
	}
}

// TestInvertSameWithoutAVX2: whole inversions (both weight paths, search
// and full scan) give identical bits with and without the vector kernels.
func TestInvertSameWithoutAVX2(t *testing.T) {
	g, tau := testGrid(t)
	saved := useAVX2
	defer func() { useAVX2 = saved }()
	for k, c := range append(append([]recoveryCase{}, unimodalCases...), bimodalCases...) {
		y, sig := noisy(g1Of(c.pops, tau), 1e-3, uint64(50+k))
		for _, sigma := range [][]float64{sig, nil} {
			for _, full := range []bool{false, true} {
				s := DefaultSettings()
				s.FullScan = full
				var res [2]*Result
				for i, avx := range []bool{saved, false} {
					useAVX2 = avx
					// A fresh grid: the unit Gram matrix is formed once per grid.
					gs := g.Settings()
					gg, err := NewGrid(tau, &gs)
					if err != nil {
						t.Fatal(err)
					}
					if res[i], err = Invert(gg, y, sigma, s); err != nil {
						t.Fatal(err)
					}
				}
				if !sameBits(res[0].Amplitude, res[1].Amplitude) || res[0].Lambda != res[1].Lambda ||
					math.Float64bits(res[0].ChiSquare) != math.Float64bits(res[1].ChiSquare) {
					t.Errorf("%s sigma-nil=%v full=%v: results differ without AVX2", c.name, sigma == nil, full)
				}
			}
		}
	}
}

func sameBits(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
			return false
		}
	}
	return true
}
