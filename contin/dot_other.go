//go:build !amd64

package contin

// useAVX2 is false off amd64: plain Go computes the same bits.
var useAVX2 = false

func lanes4AVX2(x, y0, y1, y2, y3 *float64, n int, acc *[16]float64) {
	panic("contin: no AVX2 kernel on this architecture")
}

func lanes1AVX2(x, y *float64, n int, acc *[4]float64) {
	panic("contin: no AVX2 kernel on this architecture")
}
