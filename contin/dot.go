package contin

// The Gram matrix G = [A 1]'W[A 1], the right-hand side and the diagonal
// are sums of products over the lags. They are formed by dot and dots
// below in one fixed order, on every machine: the products of the first
// 4⌊l/4⌋ elements are added in four lanes (element i in lane i mod 4),
// the lanes are combined as (s₀ + s₂) + (s₁ + s₃), and the remaining
// products are added one by one; every product is rounded before it is
// added (no fused multiply–add). On amd64 with AVX2 the lanes are one
// vector register per sum (dot_amd64.s), and dots runs four sums at once
// over the rows' common length, about 2.5 times as fast as four calls of
// gonum's SSE2 dot product; elsewhere plain Go computes the same bits
// (TestDotKernelsAgree, TestInvertSameWithoutAVX2).

// lanes4Generic adds x_i·y_d,i to acc[4d + i mod 4] for i < n (n a
// multiple of 4) and d = 0…3: the lanes of four sums. float64(·) keeps
// the compiler from fusing a product into the following addition.
func lanes4Generic(x, y0, y1, y2, y3 []float64, n int, acc *[16]float64) {
	for d, y := range [4][]float64{y0, y1, y2, y3} {
		a := (*[4]float64)(acc[4*d : 4*d+4])
		lanes1Generic(x, y, 0, n, a)
	}
}

// lanes1Generic adds x_i·y_i to acc[i mod 4] for from ≤ i < to (both
// multiples of 4).
func lanes1Generic(x, y []float64, from, to int, acc *[4]float64) {
	x, y = x[:to], y[:to]
	a0, a1, a2, a3 := acc[0], acc[1], acc[2], acc[3]
	for i := from; i < to; i += 4 {
		a0 += float64(x[i] * y[i])
		a1 += float64(x[i+1] * y[i+1])
		a2 += float64(x[i+2] * y[i+2])
		a3 += float64(x[i+3] * y[i+3])
	}
	acc[0], acc[1], acc[2], acc[3] = a0, a1, a2, a3
}

func lanes4(x, y0, y1, y2, y3 []float64, n int, acc *[16]float64) {
	if useAVX2 && n > 0 {
		lanes4AVX2(&x[0], &y0[0], &y1[0], &y2[0], &y3[0], n, acc)
		return
	}
	lanes4Generic(x, y0, y1, y2, y3, n, acc)
}

func lanes1(x, y []float64, from, to int, acc *[4]float64) {
	if useAVX2 && to > from {
		lanes1AVX2(&x[from], &y[from], to-from, acc)
		return
	}
	lanes1Generic(x, y, from, to, acc)
}

// finish combines the lanes of a sum over n elements and adds the
// products past the last multiple of 4.
func finish(acc *[4]float64, x, y []float64, n int) float64 {
	s := (acc[0] + acc[2]) + (acc[1] + acc[3])
	for i := n &^ 3; i < n; i++ {
		s += float64(x[i] * y[i])
	}
	return s
}

// dot returns Σ x_i·y_i over the first len(x) elements (y at least as
// long) in the order of the file comment.
func dot(x, y []float64) float64 {
	n := len(x)
	var acc [4]float64
	lanes1(x, y, 0, n&^3, &acc)
	return finish(&acc, x, y, n)
}

// dots sets out[k] to the dot product of x with row js[k] of the
// row-major matrix b (stride m) over the first ls[k] elements, each
// exactly as dot computes it. Four rows at a time share the loads of x
// over their common length; each then continues alone to its own.
func dots(x, b []float64, m int, js, ls []int, out []float64) {
	k := 0
	for ; k+3 < len(js); k += 4 {
		var acc [16]float64
		common := min(ls[k], ls[k+1], ls[k+2], ls[k+3]) &^ 3
		y := func(d int) []float64 { j := js[k+d]; return b[j*m : j*m+ls[k+d]] }
		lanes4(x, y(0), y(1), y(2), y(3), common, &acc)
		for d := 0; d < 4; d++ {
			a := (*[4]float64)(acc[4*d : 4*d+4])
			n := ls[k+d]
			lanes1(x, y(d), common, n&^3, a)
			out[k+d] = finish(a, x, y(d), n)
		}
	}
	for ; k < len(js); k++ {
		j := js[k]
		out[k] = dot(x[:ls[k]], b[j*m:j*m+ls[k]])
	}
}
