package contin

import "math"

// qrSolver solves the passive-set subproblems of the augmented
// least-squares problem
//
//	minimise || [W½A  W½1] x − [W½y] ||²
//	         || [ αL    0 ]     [  0 ] ||
//
// by Householder QR, adding one column in O(rows·p) and refactoring the
// trailing columns when one leaves. It never forms A'WA, so it keeps its
// accuracy when α is tiny and G + α²R is too ill-conditioned for the
// normal equations (Lawson & Hanson 1974, ch. 23–24).
type qrSolver struct {
	N, rows int
	M       []float64 // rows×N, column-major
	b       []float64 // rows
	qr      []float64 // rows×N, column-major: R on and above the diagonal, reflectors below
	tau     []float64
	qtb     []float64
	r       []float64 // scratch
	C       []float64 // N×N lower factor for lower()
	p       int
	colNorm []float64
	depTol  float64
	ne      *neSolver // same problem on the normal equations, for grad and tol
	g       *Grid
	alpha   float64 // α of the regularisation rows now in M
}

func newQRSolver(maxN, maxRows int, ne *neSolver) *qrSolver {
	return &qrSolver{
		ne:      ne,
		M:       make([]float64, maxRows*maxN),
		b:       make([]float64, maxRows),
		qr:      make([]float64, maxRows*maxN),
		tau:     make([]float64, maxN),
		qtb:     make([]float64, maxRows),
		r:       make([]float64, maxRows),
		C:       make([]float64, maxN*maxN),
		colNorm: make([]float64, maxN),
		depTol:  100 * eps,
	}
}

// setup fills the data rows of the augmented matrix for the grid g,
// square-root weights sw and data y, with N = n (no baseline) or n+1
// unknowns; setAlpha then fills the regularisation rows. The data rows are
// the same for every α of one inversion, so setup runs once per Invert.
func (q *qrSolver) setup(g *Grid, sw, y []float64, N int) {
	m, n := g.m, g.n
	rows := m + n + 2
	q.N, q.rows, q.g = N, rows, g
	for j := 0; j < N; j++ {
		col := q.M[j*rows : (j+1)*rows]
		a := g.at[j*m : (j+1)*m]
		for i := 0; i < m; i++ {
			col[i] = sw[i] * a[i]
		}
		reg := col[m:]
		for i := range reg {
			reg[i] = 0
		}
	}
	for i := 0; i < m; i++ {
		q.b[i] = sw[i] * y[i]
	}
	for i := m; i < rows; i++ {
		q.b[i] = 0
	}
	q.alpha = math.NaN()
}

// setAlpha fills the regularisation rows α·L (column j holds
// α·(1, −2, 1)/w_j at rows j, j+1, j+2 of the block) and the column norms
// ||M_j|| = sqrt(G_jj + α²R_jj), then clears the factor.
func (q *qrSolver) setAlpha(alpha float64) {
	g, m, rows := q.g, q.g.m, q.rows
	if alpha != q.alpha {
		for j := 0; j < g.n && j < q.N; j++ {
			reg := q.M[j*rows+m : (j+1)*rows]
			c := alpha / g.w[j]
			reg[j], reg[j+1], reg[j+2] = c, -2*c, c
		}
		q.alpha = alpha
	}
	a2 := alpha * alpha
	for j := 0; j < q.N; j++ {
		q.colNorm[j] = math.Sqrt(q.ne.G[j*q.ne.S+j] + a2*g.rAt(j, j))
	}
	q.reset()
}

// norm2 is the Euclidean norm without scaling: the entries here are
// weighted kernel values and data, far from overflow or underflow.
func norm2(v []float64) float64 {
	var s float64
	for _, x := range v {
		s += x * x
	}
	return math.Sqrt(s)
}

func (q *qrSolver) reset() {
	q.p = 0
	copy(q.qtb[:q.rows], q.b[:q.rows])
}

// applyReflector applies reflector c (I − τ v v', v = [1; qr below (c,c)])
// to v[c:] of the vector x.
func (q *qrSolver) applyReflector(c int, x []float64) {
	tc := q.tau[c]
	if tc == 0 {
		return
	}
	rows := q.rows
	v := q.qr[c*rows+c+1 : (c+1)*rows]
	xs := x[c+1 : rows]
	d := x[c]
	for i, vi := range v {
		d += vi * xs[i]
	}
	d *= tc
	x[c] -= d
	for i, vi := range v {
		xs[i] -= d * vi
	}
}

func (q *qrSolver) add(_ []int, t int) bool {
	q.ne.ensure(t) // grad works on the normal equations' rows
	return q.addCol(t, false)
}

func (q *qrSolver) addCol(t int, force bool) bool {
	p, rows := q.p, q.rows
	if p >= rows {
		return false
	}
	col := q.qr[p*rows : (p+1)*rows]
	copy(col, q.M[t*rows:(t+1)*rows])
	for c := 0; c < p; c++ {
		q.applyReflector(c, col)
	}
	alpha := col[p]
	xnorm := norm2(col[p+1:])
	beta := alpha
	tau := 0.0
	if xnorm != 0 {
		beta = -math.Copysign(math.Hypot(alpha, xnorm), alpha)
		tau = (beta - alpha) / beta
		s := 1 / (alpha - beta)
		for i := p + 1; i < rows; i++ {
			col[i] *= s
		}
	}
	if !force && !(math.Abs(beta) > q.depTol*q.colNorm[t]) {
		return false
	}
	col[p] = beta
	q.tau[p] = tau
	q.applyReflector(p, q.qtb)
	q.p++
	return true
}

func (q *qrSolver) remove(pas []int, k int) {
	q.p = k
	copy(q.qtb[:q.rows], q.b[:q.rows])
	for c := 0; c < k; c++ {
		q.applyReflector(c, q.qtb)
	}
	for _, j := range pas[k+1:] {
		q.addCol(j, true)
	}
}

func (q *qrSolver) solve(pas []int, s []float64) {
	p, rows := q.p, q.rows
	z := q.r[:p]
	for i := p - 1; i >= 0; i-- {
		v := q.qtb[i]
		for j := i + 1; j < p; j++ {
			v -= q.qr[j*rows+i] * z[j]
		}
		z[i] = v / q.qr[i*rows+i]
	}
	for i, j := range pas[:p] {
		s[j] = z[i]
	}
}

// grad and tol use the normal equations: the gradient g − Hx is a forward
// product, accurate to eps·(|g| + |H||x|) however ill-conditioned H is;
// only solving with H_PP needs the QR factor.
func (q *qrSolver) grad(pas []int, x, w, ru []float64) { q.ne.grad(pas, x, w, ru) }

func (q *qrSolver) tolAt(pas []int, x, ru []float64, j int) float64 {
	return q.ne.tolAt(pas, x, ru, j)
}

func (q *qrSolver) lower() ([]float64, int) {
	N, rows := q.N, q.rows
	for j := 0; j < q.p; j++ {
		sg := 1.0
		if q.qr[j*rows+j] < 0 {
			sg = -1
		}
		for i := j; i < q.p; i++ {
			q.C[i*N+j] = sg * q.qr[i*rows+j]
		}
	}
	return q.C, N
}
