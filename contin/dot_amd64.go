package contin

import "golang.org/x/sys/cpu"

// useAVX2 selects the vector kernels; a variable so that tests can compare
// them with plain Go.
var useAVX2 = cpu.X86.HasAVX2

// lanes4AVX2 is lanes4Generic for n > 0 elements at x, y0…y3.
//
//go:noescape
func lanes4AVX2(x, y0, y1, y2, y3 *float64, n int, acc *[16]float64)

// lanes1AVX2 is lanes1Generic for the n > 0 elements at x and y.
//
//go:noescape
func lanes1AVX2(x, y *float64, n int, acc *[4]float64)
