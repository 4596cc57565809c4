package contin

import (
	"math"

	"gonum.org/v1/gonum/floats"
)

// This file holds the active-set method of Lawson & Hanson (1974, ch. 23)
// for
//
//	minimise ½·x'Hx − g'x  subject to x_j ≥ 0 for j < nc
//
// (variables nc … N−1 are free and never leave the passive set), written
// once over a linSolver that owns the factorisation of the passive-set
// subproblem. neSolver works on the normal equations H = G + α²R (the
// fast NNLS of Bro & De Jong 1997, with an incrementally updated Cholesky
// factor); qrSolver works on the augmented least-squares matrix
// [W½A; αL] with Householder QR and is the safe fallback when α is tiny.

// linSolver factorises the passive-set subproblem for the active-set
// driver. pas lists the passive variables in factor order.
type linSolver interface {
	// reset clears the factor (empty passive set).
	reset()
	// add appends variable t to the factor of pas; false when t is
	// numerically dependent on pas (the factor is then unchanged).
	add(pas []int, t int) bool
	// remove deletes position k from the factor; pas still holds it.
	remove(pas []int, k int)
	// solve sets s[pas[i]] to the unconstrained minimiser on pas.
	solve(pas []int, s []float64)
	// grad sets w = g − Hx (minus the gradient) for every variable, and
	// ru to the regulariser's part of the rounding bound (for tolAt).
	grad(pas []int, x, w, ru []float64)
	// tolAt returns the rounding bound of w_j after grad: an entry
	// w_j ≤ tolAt counts as zero. Only the candidates for addition need
	// it, so it is computed for them alone.
	tolAt(pas []int, x, ru []float64, j int) float64
	// lower returns the lower-triangular factor C (C·C' = H_PP, in pas
	// order) and its row stride.
	lower() ([]float64, int)
}

// solveStatus says how an active-set run ended.
type solveStatus int

const (
	solveConverged solveStatus = iota
	solveLimit                 // iteration bound reached; x is the last feasible iterate
)

// activeSet is the state of the Lawson–Hanson iteration, kept between
// calls so that the next regularisation strength starts from this one's
// passive set (warm start).
type activeSet struct {
	N, nc   int
	pas     []int // passive variables, factor order
	pos     []int // position of each variable in pas, −1 if active (held at 0)
	x, s, w []float64
	tol     []float64
	skip    []bool // variables whose addition did not help, until pas changes
	depHit  bool   // an addition was refused as numerically dependent
}

func newActiveSet(maxN int) *activeSet {
	a := &activeSet{
		pas:  make([]int, 0, maxN),
		pos:  make([]int, maxN),
		x:    make([]float64, maxN),
		s:    make([]float64, maxN),
		w:    make([]float64, maxN),
		tol:  make([]float64, maxN),
		skip: make([]bool, maxN),
	}
	return a
}

// init starts a cold problem with N variables of which the first nc are
// constrained: x = 0 and only the free variables passive.
func (a *activeSet) init(N, nc int) {
	a.N, a.nc = N, nc
	a.pas = a.pas[:0]
	for j := 0; j < N; j++ {
		a.pos[j] = -1
		a.x[j], a.s[j], a.w[j] = 0, 0, 0
		a.skip[j] = false
	}
	for j := nc; j < N; j++ {
		a.pas = append(a.pas, j)
		a.pos[j] = len(a.pas) - 1
	}
}

// refactor rebuilds lin's factor for the current passive set (after the
// problem changed, e.g. a new α). Variables that have become numerically
// dependent are moved to the active set at zero, which keeps x feasible.
func (a *activeSet) refactor(lin linSolver) {
	lin.reset()
	k := 0
	for _, j := range a.pas {
		if lin.add(a.pas[:k], j) {
			a.pas[k] = j
			a.pos[j] = k
			k++
		} else {
			a.pos[j] = -1
			a.x[j] = 0
			a.depHit = true
		}
	}
	a.pas = a.pas[:k]
	for j := 0; j < a.N; j++ {
		a.skip[j] = false
	}
}

func (a *activeSet) removeAt(lin linSolver, k int) {
	lin.remove(a.pas, k)
	copy(a.pas[k:], a.pas[k+1:])
	a.pas = a.pas[:len(a.pas)-1]
	for i := k; i < len(a.pas); i++ {
		a.pos[a.pas[i]] = i
	}
}

// run iterates from the current feasible x (x_j ≥ 0 on the constrained
// variables, zero off the passive set) to the constrained minimiser. It
// counts every addition and every interpolation step and stops after
// maxIter of them.
func (a *activeSet) run(lin linSolver, maxIter int) (iters int, st solveStatus) {
	a.depHit = false
	if !a.feasible(lin, false, &iters, maxIter) {
		return iters, solveLimit
	}
	for {
		lin.grad(a.pas, a.x, a.w, a.tol)
		t, best := -1, 0.0
		// The largest w_j above its rounding bound, the first of equal
		// ones; the bound is computed only for entries that would win.
		for j := 0; j < a.nc; j++ {
			if a.pos[j] < 0 && !a.skip[j] && a.w[j] > best && a.w[j] > lin.tolAt(a.pas, a.x, a.tol, j) {
				t, best = j, a.w[j]
			}
		}
		if t < 0 {
			return iters, solveConverged
		}
		if iters >= maxIter {
			return iters, solveLimit
		}
		iters++
		if !lin.add(a.pas, t) {
			a.skip[t] = true
			a.depHit = true
			continue
		}
		a.pos[t] = len(a.pas)
		a.pas = append(a.pas, t)
		lin.solve(a.pas, a.s)
		if !(a.s[t] > 0) {
			// Rounding: the variable with the largest gradient does not
			// enter positively. Take it out again and do not try it until
			// the passive set changes (this is what prevents cycling).
			a.removeAt(lin, len(a.pas)-1)
			a.pos[t] = -1
			a.skip[t] = true
			continue
		}
		for j := 0; j < a.N; j++ {
			a.skip[j] = false
		}
		if !a.feasible(lin, true, &iters, maxIter) {
			return iters, solveLimit
		}
	}
}

// feasible is the inner loop: solve on the passive set and, while the
// solution has non-positive constrained entries, step from x towards it
// as far as feasibility allows and drop the variables that reach zero.
// With solved, a.s already holds the passive-set solution. It returns
// false when the iteration bound was reached (x stays feasible).
func (a *activeSet) feasible(lin linSolver, solved bool, iters *int, maxIter int) bool {
	for {
		if !solved {
			lin.solve(a.pas, a.s)
		}
		solved = false
		kmin, amin := -1, math.Inf(1)
		for k, j := range a.pas {
			if j < a.nc && !(a.s[j] > 0) {
				r := 0.0
				if d := a.x[j] - a.s[j]; d > 0 {
					r = a.x[j] / d // in [0, 1]: x_j ≥ 0 ≥ s_j
				}
				if r < amin {
					kmin, amin = k, r
				}
			}
		}
		if kmin < 0 {
			for _, j := range a.pas {
				a.x[j] = a.s[j]
			}
			return true
		}
		if *iters >= maxIter {
			return false
		}
		*iters++
		for _, j := range a.pas {
			a.x[j] += amin * (a.s[j] - a.x[j])
		}
		a.x[a.pas[kmin]] = 0 // exact zero: guarantees progress
		for k := len(a.pas) - 1; k >= 0; k-- {
			j := a.pas[k]
			if j < a.nc && !(a.x[j] > 0) {
				a.x[j] = 0
				a.removeAt(lin, k)
				a.pos[j] = -1
			}
		}
	}
}

// neSolver factorises H_PP = G_PP + α²R_PP by a Cholesky factor that grows
// by one row per added variable (O(p²)) and shrinks by Givens rotations
// (O(p²)) when one leaves.
type neSolver struct {
	N         int       // variables
	S         int       // stride of G
	n         int       // rate points; R acts on variables < n
	G         []float64 // Gram matrix, full storage, stride S
	rband     []float64
	a2        float64
	g         []float64
	C         []float64 // lower factor, stride N
	z         []float64
	p         int
	tolFactor float64 // relative rounding bound of the gradient entries
	depTol    float64 // relative pivot below which a variable counts as dependent

	// Rows of G are formed on first use (ensure); the diagonal is always
	// there. have marks the rows formed; a formed row k has also written
	// column k, so a later row copies nothing and recomputes nothing.
	have []bool
	unit []float64 // unit-weight Gram matrix (stride S) when all weights equal c, else nil
	c    float64
	at   []float64 // kernel rows (the grid's, stride m), when unit is nil,
	w    []float64 // the weights W_i,
	ct   []float64 // and scratch for W·A_t
	m    int
	supp []int
	js   []int     // scratch of ensure: rows still to form,
	ls   []int     // their lengths,
	dv   []float64 // and their dot products
}

// ensure forms row t of G (and, by symmetry, column t): from the scaled
// unit-weight matrix, or as G_tj = Σ_i (W_i A_it)·A_ij over the two
// columns' common support (dots). An entry is formed once, by whichever
// of its two rows comes first.
func (e *neSolver) ensure(t int) {
	if e.have[t] {
		return
	}
	S := e.S
	row := e.G[t*S : (t+1)*S]
	if e.unit != nil {
		u := e.unit[t*S : (t+1)*S]
		for j, v := range u {
			row[j] = e.c * v
		}
	} else {
		m, supp := e.m, e.supp
		js, ls := e.js[:0], e.ls[:0]
		for j := 0; j < S; j++ {
			if j == t || e.have[j] {
				continue // the diagonal, or set when row j was formed
			}
			js, ls = append(js, j), append(ls, min(supp[t], supp[j]))
		}
		ct := e.ct[:supp[t]]
		for i, a := range e.at[t*m : t*m+supp[t]] {
			ct[i] = e.w[i] * a
		}
		v := e.dv[:len(js)]
		dots(ct, e.at, m, js, ls, v)
		for k, j := range js {
			row[j] = v[k]
			e.G[j*S+t] = v[k]
		}
	}
	e.have[t] = true
}

func (e *neSolver) hAt(j, k int) float64 {
	h := e.G[j*e.S+k]
	if d := k - j; j < e.n && k < e.n && d >= -2 && d <= 2 {
		h += e.a2 * e.rband[5*j+d+2]
	}
	return h
}

func (e *neSolver) reset() { e.p = 0 }

func (e *neSolver) add(pas []int, t int) bool {
	e.ensure(t)
	p, N := e.p, e.N
	row := e.C[p*N : p*N+p+1]
	for i, j := range pas[:p] {
		row[i] = e.hAt(j, t)
	}
	var ss float64
	for i := 0; i < p; i++ {
		ci := e.C[i*N : i*N+i]
		v := row[i]
		for k, c := range ci {
			v -= c * row[k]
		}
		v /= e.C[i*N+i]
		row[i] = v
		ss += v * v
	}
	htt := e.hAt(t, t)
	d2 := htt - ss
	if !(d2 > e.depTol*htt) {
		return false
	}
	row[p] = math.Sqrt(d2)
	e.p++
	return true
}

func (e *neSolver) remove(_ []int, k int) {
	p, N, C := e.p, e.N, e.C
	for i := k; i < p-1; i++ {
		copy(C[i*N:i*N+i+2], C[(i+1)*N:(i+1)*N+i+2])
	}
	for j := k; j < p-1; j++ {
		a, b := C[j*N+j], C[j*N+j+1]
		r := math.Hypot(a, b)
		c, s := 1.0, 0.0
		if r > 0 {
			c, s = a/r, b/r
		}
		C[j*N+j], C[j*N+j+1] = r, 0
		for i := j + 1; i < p-1; i++ {
			u, v := C[i*N+j], C[i*N+j+1]
			C[i*N+j] = c*u + s*v
			C[i*N+j+1] = c*v - s*u
		}
	}
	e.p--
}

func (e *neSolver) solve(pas []int, s []float64) {
	p, N, C, z := e.p, e.N, e.C, e.z
	for i, j := range pas[:p] {
		v := e.g[j]
		ci := C[i*N : i*N+i]
		for k, c := range ci {
			v -= c * z[k]
		}
		z[i] = v / C[i*N+i]
	}
	for i := p - 1; i >= 0; i-- {
		v := z[i]
		for k := i + 1; k < p; k++ {
			v -= C[k*N+i] * z[k]
		}
		z[i] = v / C[i*N+i]
	}
	for i, j := range pas[:p] {
		s[j] = z[i]
	}
}

// grad computes w = g − Gx − α²Rx, and ru_j = α²Σ_k |R_jk||x_k| for the
// rounding bound that tolAt completes,
//
//	tol_j = tolFactor·(|g_j| + Σ_k G_jk|x_k| + α²Σ_k |R_jk||x_k|),
//
// where G ≥ 0 entrywise (a Gram matrix of non-negative columns) and
// tolFactor = (m + N)·eps bounds the relative error of the dot products
// that formed G, g and Gx (Higham, Accuracy and Stability of Numerical
// Algorithms, 2002, §3.1). A relative test on each entry, rather than one
// scaled by ||H||·||x||, keeps small but significant gradients along
// ill-conditioned directions.
func (e *neSolver) grad(pas []int, x, w, tol []float64) {
	N, S := e.N, e.S
	w, tol = w[:N], tol[:N]
	copy(w, e.g[:N])
	for j := range tol {
		tol[j] = 0
	}
	for _, k := range pas {
		xk := x[k]
		if xk == 0 {
			continue
		}
		floats.AddScaled(w, -xk, e.G[k*S:k*S+N])
	}
	if a2 := e.a2; a2 != 0 {
		n, rb := e.n, e.rband
		x := x[:n]
		band := func(j int) {
			var v, u float64
			b := rb[5*j : 5*j+5]
			for d := max(-2, -j); d <= min(2, n-1-j); d++ {
				r := b[d+2] * x[j+d]
				v += r
				u += math.Abs(r)
			}
			w[j] -= a2 * v
			tol[j] += a2 * u
		}
		// The rows away from both ends have all five band entries; the
		// same terms in the same order as band, without the bounds.
		for j := 0; j < min(2, n); j++ {
			band(j)
		}
		for j := 2; j < n-2; j++ {
			b := rb[5*j : 5*j+5 : 5*j+5]
			xs := x[j-2 : j+3 : j+3]
			r0, r1, r2, r3, r4 := b[0]*xs[0], b[1]*xs[1], b[2]*xs[2], b[3]*xs[3], b[4]*xs[4]
			v := r0 + r1 + r2 + r3 + r4
			u := math.Abs(r0) + math.Abs(r1) + math.Abs(r2) + math.Abs(r3) + math.Abs(r4)
			w[j] -= a2 * v
			tol[j] += a2 * u
		}
		for j := max(2, n-2); j < n; j++ {
			band(j)
		}
	}
}

// tolAt returns tol_j of grad's comment: the same terms added in the same
// order as an elementwise sum over the passive rows would add them.
func (e *neSolver) tolAt(pas []int, x, ru []float64, j int) float64 {
	S := e.S
	t := math.Abs(e.g[j])
	for _, k := range pas {
		if xk := x[k]; xk != 0 {
			t += math.Abs(xk) * e.G[k*S+j]
		}
	}
	return (t + ru[j]) * e.tolFactor
}

func (e *neSolver) lower() ([]float64, int) { return e.C, e.N }

const eps = 0x1p-52

// lowerInverse sets inv (p×p, row-major) to Z = C⁻¹ for the lower
// triangular C with row stride cs.
func lowerInverse(C []float64, cs, p int, inv []float64) {
	for c := 0; c < p; c++ {
		for i := 0; i < c; i++ {
			inv[i*p+c] = 0
		}
		inv[c*p+c] = 1 / C[c*cs+c]
		for i := c + 1; i < p; i++ {
			var v float64
			ci := C[i*cs : i*cs+i]
			for k := c; k < i; k++ {
				v -= ci[k] * inv[k*p+c]
			}
			inv[i*p+c] = v / C[i*cs+i]
		}
	}
}

// passiveDF returns the effective number of degrees of freedom of the
// regularised solution on the passive set,
//
//	N_DF = tr[(G_PP + α²R_PP)⁻¹ G_PP] = p − α²·tr[H_PP⁻¹ R_PP],
//
// from Z = C⁻¹ (lowerInverse, stride p) of the factor C·C' = H_PP with
// rows in pas order. R_PP is banded, so only the entries of
// H_PP⁻¹ = Z'Z within the band of R are needed.
func passiveDF(inv []float64, pas, pos []int, n int, rband []float64, a2 float64) float64 {
	p := len(pas)
	if p == 0 {
		return 0
	}
	if a2 == 0 {
		return float64(p)
	}
	var tr float64
	for a, ja := range pas {
		if ja >= n {
			continue
		}
		for d := -2; d <= 2; d++ {
			jb := ja + d
			if jb < 0 || jb >= n || pos[jb] < 0 {
				continue
			}
			b := pos[jb]
			l0 := max(a, b)
			var zz float64
			for l := l0; l < p; l++ {
				zz += inv[l*p+a] * inv[l*p+b]
			}
			tr += rband[5*ja+d+2] * zz
		}
	}
	df := float64(p) - a2*tr
	if !(df > 0) {
		df = 0
	}
	return math.Min(df, float64(p))
}

// condF returns the Frobenius-norm condition estimate ||H_PP||_F·||Z||_F²
// (≥ ||H_PP||_F·||H_PP⁻¹||_F) from Z = C⁻¹ (stride p).
func (e *neSolver) condF(pas []int, inv []float64) float64 {
	p := len(pas)
	var h, z float64
	for a, ja := range pas {
		for b, jb := range pas {
			v := e.hAt(ja, jb)
			h += v * v
			if b <= a {
				z += inv[a*p+b] * inv[a*p+b]
			}
		}
	}
	return math.Sqrt(h) * z
}
