package contin

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"sort"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/stat/distuv"
)

// Status says how an inversion ended.
type Status int

// Statuses of Result and ScanRow.
const (
	// Converged: every active-set solve met its optimality test.
	Converged Status = iota
	// IterationLimit: at least one solve (for a ScanRow: this one) stopped
	// at Settings.MaxIter; its solution is the last feasible iterate.
	IterationLimit
	// NoSignal: the chosen solution is zero.
	NoSignal
)

// String returns "converged", "iteration-limit" or "no-signal".
func (s Status) String() string {
	switch s {
	case Converged:
		return "converged"
	case IterationLimit:
		return "iteration-limit"
	case NoSignal:
		return "no-signal"
	}
	return fmt.Sprintf("Status(%d)", int(s))
}

// ScanRow is one regularisation strength of the scan, kept for audit.
type ScanRow struct {
	Lambda float64 // dimensionless strength, α² = Lambda·tr(G)/tr(R)
	Alpha  float64 // α of the weighted problem
	// ChiSquare is V = Σ W_i r_i², the weighted residual sum of squares.
	ChiSquare float64
	// DegreesOfFreedom is N_DF = tr[(G_PP + α²R_PP)⁻¹G_PP] on the passive set.
	DegreesOfFreedom float64
	// NormLx is ||L x/w||, the norm of the second differences.
	NormLx float64
	// ProbReject is the F-test probability to reject against the
	// least-regularised row (0 for that row and for a fixed α).
	ProbReject float64
	// GCV is N_y·V/(N_y − N_DF)².
	GCV float64
	// Curvature is the signed Menger curvature of the L-curve at this row
	// (0 at both ends and for refinement rows).
	Curvature float64
	// Passive counts the unknowns off their bound, the baseline included.
	Passive    int
	Iterations int
	// QR reports that the augmented-matrix QR solver was used instead of
	// the normal equations (tiny α or a numerically dependent column).
	QR bool
	// Refined marks rows added by the refinement of ProbReject.
	Refined bool
	Status  Status
}

// Picks holds, for each criterion, the index into Result.Scan of the row
// that criterion chooses, or −1 when it was not evaluated (a fixed α, a
// scan too short for the L-curve, or GCV and L-curve after ProbReject's
// search, which solves only part of the lattice: see Settings.FullScan).
// ProbReject includes the refinement rows only when ProbReject is the
// selected criterion.
type Picks struct {
	ProbReject, GCV, LCurve int
}

// Result is the inversion of one decay.
type Result struct {
	// GammaPerS are the decay rates Γ_j (1/s) of the grid.
	GammaPerS []float64
	// Amplitude holds x_j ≥ 0, the amplitude of rate Γ_j per log bin, so
	// that the model is y(τ) ≈ Σ_j x_j exp(−Γ_j τ) + Baseline. For g1
	// data these are intensity-weighted amplitudes; they are not forced to
	// sum to one.
	Amplitude []float64
	// Baseline is the free constant term (0 without Settings.Baseline).
	Baseline float64
	// Fitted is the model at each lag and Residuals is y − Fitted.
	Fitted, Residuals []float64

	Criterion Criterion
	// Lambda and Alpha are the chosen strengths (α² = λ·tr(G)/tr(R)).
	Lambda, Alpha float64
	// ChiSquare, DegreesOfFreedom, NormLx, ProbReject and GCV are those of
	// the chosen row of Scan.
	ChiSquare, DegreesOfFreedom, NormLx, ProbReject, GCV float64
	// Points is N_y, the number of points with non-zero weight.
	Points int
	// SigmaEstimated reports that sigma was nil: the fit used equal
	// weights and NoiseSigma = sqrt(V₁/(N_y − N_DF)) is the noise level
	// estimated from the unit-weight residuals V₁ of the chosen solution.
	// ChiSquare, Alpha, GCV and the Scan are then expressed for weights
	// 1/NoiseSigma².
	SigmaEstimated bool
	NoiseSigma     float64
	// SumAmplitude is Σ x_j; MeanRatePerS is Σ x_jΓ_j / Σ x_j (0 when the
	// solution is zero).
	SumAmplitude, MeanRatePerS float64

	// Scan lists every strength solved, by increasing α (all NAlpha of
	// them, plus refinements, for a full scan); Chosen indexes the row the
	// criterion selected.
	Scan   []ScanRow
	Chosen int
	Picks  Picks
	// Iterations totals the active-set iterations of all solves;
	// QRSolves counts the solves done by the QR fallback.
	Iterations, QRSolves int
	Status               Status
	// Warnings lists doubts that did not stop the inversion; each wraps one
	// of the warning sentinels (ErrIterationLimit, ErrScanEdge, ...).
	Warnings []error

	// grid and refSolution (the solution at LambdaMin, N values) start
	// the least-regularised solve of a later InvertFrom.
	grid        *Grid
	refSolution []float64
}

// Thresholds of the solver.
const (
	// neDepTol: a Cholesky pivot d² below neDepTol·h_tt means the column is
	// numerically dependent in the normal equations; the solve is then
	// repeated with QR.
	neDepTol = 1e-10
	// edgeFraction: amplitude in the outer edgeBins bins at either end above
	// this fraction of the total raises ErrGridEdge.
	edgeFraction = 0.01
	edgeBins     = 3
)

// neCondMax: when the condition estimate of H_PP = G_PP + α²R_PP exceeds
// it, the normal equations may have lost more than about 7 digits and the
// solve is repeated with the QR solver. A variable only so that tests can
// force the QR path.
var neCondMax = 1e9

type workspace struct {
	sw, w, wy, fit []float64
	G, gv          []float64
	inv            []float64
	as             *activeSet
	ne             neSolver
	qr             *qrSolver
	sols           []float64
}

func newWorkspace(g *Grid) *workspace {
	N := g.n + 1
	ws := &workspace{
		sw:  make([]float64, g.m),
		w:   make([]float64, g.m),
		wy:  make([]float64, g.m),
		fit: make([]float64, g.m),
		G:   make([]float64, N*N),
		gv:  make([]float64, N),
		inv: make([]float64, N*N),
		as:  newActiveSet(N),
	}
	ws.ne = neSolver{
		S:      N,
		n:      g.n,
		G:      ws.G,
		rband:  g.rband,
		g:      ws.gv,
		C:      make([]float64, N*N),
		z:      make([]float64, N),
		depTol: neDepTol,
		have:   make([]bool, N),
		at:     g.at,
		w:      ws.w,
		ct:     make([]float64, g.m),
		m:      g.m,
		supp:   g.supp,
		js:     make([]int, 0, N),
		ls:     make([]int, 0, N),
		dv:     make([]float64, N),
	}
	return ws
}

// problem is one call of Invert in progress.
type problem struct {
	g          *Grid
	ws         *workspace
	y          []float64
	s          Settings
	N, ny      int
	trG        float64
	maxIter    int
	rows       []ScanRow
	solIdx     []int // row → index of its solution in ws.sols
	nsol       int
	totalIters int
	qrSolves   int
	qrReady    bool // ws.qr holds this problem's data rows
	ft         fTest
	pDone      []bool  // row → its ProbReject is set
	prev       *Result // InvertFrom's earlier inversion (same grid and N), or nil
	refRow     int     // the row solved at LambdaMin (ProbReject's reference)
}

// Invert computes the regularised non-negative inverse Laplace transform of
// the decay y(τ_i), one value per lag of g, with standard uncertainties
// sigma (weights 1/σ²). Typically y is g1 from the caller's g2 with
// the coherence factor and baseline of a cumulant fit.
//
// sigma may be nil: every point then gets the same weight and the noise
// level is estimated from the residuals (Result.SigmaEstimated). An entry
// +Inf gives its point zero weight (a way to mask lags without a new grid).
// Values of y at or below zero, which noise produces in the tail, are
// fitted as they are, with their weights: nothing is clipped or dropped.
//
// A nil s means DefaultSettings(). Errors wrap ErrLength, ErrNonFinite,
// ErrBadSigma, ErrTooFewPoints, ErrNoDecay or ErrBadSettings; numerical
// doubts are Result.Warnings. Invert panics if g is nil. It is safe to call
// concurrently with the same Grid.
func Invert(g *Grid, y, sigma []float64, s *Settings) (*Result, error) {
	return InvertFrom(g, y, sigma, s, nil)
}

// InvertFrom is Invert starting from prev, an earlier inversion on the
// same grid of similar data (a first pass with other weights, say): the
// least-regularised solve starts from prev's solution there instead of
// from x = 0, and ProbReject's search probes the lattice strengths at and
// above prev's choice first, starting from prev's chosen solution. The
// minimiser of each strictly convex subproblem does not depend on where
// the active-set iterations start, and any probe order ends with the same
// bracket, so neither the result (to rounding) nor the choice of λ
// depends on prev; a good prev saves most of the iterations, several
// solves, and the Gram rows of the variables a cold start tries on its
// way. A nil prev, or one from another grid or baseline setting, means a
// cold start.
func InvertFrom(g *Grid, y, sigma []float64, s *Settings, prev *Result) (*Result, error) {
	if g == nil {
		panic("contin: nil grid")
	}
	set := DefaultSettings()
	if s != nil {
		set = s
	}
	st, err := set.normalise()
	if err != nil {
		return nil, err
	}
	if len(y) != g.m {
		return nil, fmt.Errorf("contin: %d data values for %d lags: %w", len(y), g.m, ErrLength)
	}
	if st.Start != nil && len(st.Start) != g.n {
		return nil, fmt.Errorf("contin: %d start amplitudes for %d rates: %w", len(st.Start), g.n, ErrLength)
	}
	if sigma != nil && len(sigma) != g.m {
		return nil, fmt.Errorf("contin: %d uncertainties for %d lags: %w", len(sigma), g.m, ErrLength)
	}
	for i, v := range y {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("contin: data value %d (lag %g s) is %v: %w", i, g.tau[i], v, ErrNonFinite)
		}
	}
	ny := g.m
	for i, v := range sigma {
		switch {
		case math.IsNaN(v):
			return nil, fmt.Errorf("contin: uncertainty %d (lag %g s) is NaN: %w", i, g.tau[i], ErrNonFinite)
		case math.IsInf(v, 1):
			ny--
		case v <= 0 || math.IsInf(v, -1):
			return nil, fmt.Errorf("contin: uncertainty %d (lag %g s) is %g: %w", i, g.tau[i], v, ErrBadSigma)
		}
	}
	if ny < MinPoints {
		return nil, fmt.Errorf("contin: %d points with finite uncertainty, need at least %d: %w", ny, MinPoints, ErrTooFewPoints)
	}
	if err := checkDecay(g, y, sigma); err != nil {
		return nil, err
	}

	ws := g.pool.Get().(*workspace)
	defer g.pool.Put(ws)
	p := &problem{g: g, ws: ws, y: y, s: st, ny: ny}
	nr := 1
	if st.Criterion != Fixed {
		nr = st.NAlpha + st.Refine
	}
	p.rows = make([]ScanRow, 0, nr)
	p.solIdx = make([]int, 0, nr)
	p.pDone = make([]bool, 0, nr)
	p.N = g.n
	if st.Baseline {
		p.N = g.n + 1
	}
	p.maxIter = st.MaxIter
	if p.maxIter == 0 {
		p.maxIter = 3 * p.N
	}
	p.prepare(sigma)
	if prev != nil && prev.grid == g && len(prev.refSolution) == p.N {
		p.warmFromSolution(prev.refSolution)
		p.prev = prev
	} else if st.Start != nil {
		p.warmFromSolution(append(slices.Clone(st.Start), 0)[:p.N])
	}
	return p.run(sigma == nil)
}

// checkDecay rejects data whose first lags do not exceed their last lags by
// more than three standard errors of the two means.
func checkDecay(g *Grid, y, sigma []float64) error {
	idx := make([]int, 0, len(y))
	for i := range y {
		if sigma == nil || !math.IsInf(sigma[i], 1) {
			idx = append(idx, i)
		}
	}
	k := len(idx) / 10
	if k < 3 {
		k = 3
	}
	var yh, yt, vh, vt float64
	for _, i := range idx[:k] {
		yh += y[i]
		if sigma != nil {
			vh += sigma[i] * sigma[i]
		}
	}
	for _, i := range idx[len(idx)-k:] {
		yt += y[i]
		if sigma != nil {
			vt += sigma[i] * sigma[i]
		}
	}
	fk := float64(k)
	yh /= fk
	yt /= fk
	var se float64
	if sigma != nil {
		se = math.Sqrt(vh+vt) / fk
	} else {
		// Noise from successive differences: σ ≈ 1.4826·median|Δy|/√2
		// (median absolute deviation of a difference of two independent
		// normal values; common practice).
		d := make([]float64, 0, len(idx)-1)
		for j := 1; j < len(idx); j++ {
			d = append(d, math.Abs(y[idx[j]]-y[idx[j-1]]))
		}
		sort.Float64s(d)
		med := d[len(d)/2]
		if len(d)%2 == 0 {
			med = (d[len(d)/2-1] + d[len(d)/2]) / 2
		}
		sd := 1.4826 * med / math.Sqrt2
		se = sd * math.Sqrt(2/fk)
	}
	if !(yh-yt > 3*se) {
		return fmt.Errorf("contin: mean of the first %d points %.4g, of the last %d points %.4g, difference not above 3 standard errors (%.3g): %w",
			k, yh, k, yt, 3*se, ErrNoDecay)
	}
	return nil
}

// prepare forms the weights, the right-hand side [A 1]'Wy and the
// diagonal of the Gram matrix G = [A 1]'W[A 1]. The rows of G are
// formed when their variable first enters a passive set (neSolver.ensure):
// the gradient and the passive-set factor need only those, and typically
// a third of the rates ever become passive.
func (p *problem) prepare(sigma []float64) {
	g, ws := p.g, p.ws
	m, S := g.m, g.stride
	constant := true
	for i := range ws.sw {
		sw := 1.0
		if sigma != nil {
			sw = 1 / sigma[i] // 0 for +Inf
		}
		ws.sw[i] = sw
		ws.w[i] = sw * sw
		ws.wy[i] = sw * sw * p.y[i]
		if sw != ws.sw[0] {
			constant = false
		}
	}
	ne := &ws.ne
	for j := range ne.have {
		ne.have[j] = false
	}
	if constant {
		// Shared weights: rows are the grid's unit Gram matrix, scaled.
		ne.unit, ne.c = g.unitGram(), ws.sw[0]*ws.sw[0]
		for j := 0; j < S; j++ {
			ws.G[j*S+j] = ne.c * ne.unit[j*S+j]
		}
	}
	// A'Wy, and for per-point weights the diagonal G_jj = Σ_i W_i A_ij²:
	// the rows of A and of A² against Wy and W, four at a time.
	js, ls := ne.js[:0], ne.ls[:0]
	for j := 0; j < S; j++ {
		js, ls = append(js, j), append(ls, g.supp[j])
	}
	dots(ws.wy, g.at, m, js, ls, ws.gv)
	if !constant {
		ne.unit = nil
		d := ne.dv[:S]
		dots(ws.w, g.at2, m, js, ls, d)
		for j, v := range d {
			ws.G[j*S+j] = v
		}
	}
	p.trG = 0
	for j := 0; j < g.n; j++ {
		p.trG += ws.G[j*S+j]
	}
	ne.N = p.N
	ne.tolFactor = float64(g.m+p.N) * eps
	ws.as.init(p.N, g.n)
}

func (p *problem) a2Of(lambda float64) float64 { return lambda * p.trG / p.g.trR }

// solveAt solves for α² = a2 starting from the current active set, appends
// the scan row and stores the solution.
func (p *problem) solveAt(lambda, a2 float64, refined bool) int {
	g, ws, as := p.g, p.ws, p.ws.as
	row := ScanRow{Lambda: lambda, Alpha: math.Sqrt(a2), Refined: refined}
	ne := &ws.ne
	ne.a2 = a2
	as.refactor(ne)
	depBefore := as.depHit
	iters, st := as.run(ne, p.maxIter)
	useQR := as.depHit || depBefore
	if !useQR {
		lowerInverse(ne.C, ne.N, len(as.pas), ws.inv)
		useQR = !(ne.condF(as.pas, ws.inv) < neCondMax)
	}
	if useQR {
		if ws.qr == nil {
			ws.qr = newQRSolver(g.n+1, g.m+g.n+2, ne)
		}
		if !p.qrReady {
			ws.qr.setup(g, ws.sw, p.y, p.N)
			p.qrReady = true
		}
		ws.qr.setAlpha(math.Sqrt(a2))
		as.refactor(ws.qr)
		it, stq := as.run(ws.qr, p.maxIter)
		iters += it
		st = stq
		row.QR = true
		p.qrSolves++
		C, cs := ws.qr.lower()
		lowerInverse(C, cs, len(as.pas), ws.inv)
	}
	row.Iterations = iters
	p.totalIters += iters
	if st == solveLimit {
		row.Status = IterationLimit
	}
	// Statistics from the solution itself, not from the normal equations.
	x := as.x[:p.N]
	fit := ws.fit
	for i := range fit {
		fit[i] = 0
	}
	for _, j := range as.pas {
		xj := x[j]
		if xj == 0 {
			continue
		}
		floats.AddScaled(fit[:g.supp[j]], xj, g.at[j*g.m:j*g.m+g.supp[j]])
	}
	var V float64
	for i, f := range fit {
		r := ws.sw[i] * (p.y[i] - f)
		V += r * r
	}
	row.ChiSquare = V
	row.NormLx = g.normLx(x)
	row.Passive = len(as.pas)
	row.DegreesOfFreedom = passiveDF(ws.inv, as.pas, as.pos, g.n, g.rband, a2)

	k := p.nsol
	need := (k + 1) * p.N
	if len(ws.sols) < need {
		ws.sols = append(ws.sols, make([]float64, need-len(ws.sols))...)
	}
	copy(ws.sols[k*p.N:need], x)
	p.nsol++
	p.rows = append(p.rows, row)
	p.solIdx = append(p.solIdx, k)
	p.pDone = append(p.pDone, false)
	return len(p.rows) - 1
}

// warmFrom sets the active set to the stored solution of row r.
func (p *problem) warmFrom(r int) {
	p.warmFromSolution(p.ws.sols[p.solIdx[r]*p.N : (p.solIdx[r]+1)*p.N])
}

// warmFromSolution sets the active set to the feasible point sol (N
// values, non-negative on the rates).
func (p *problem) warmFromSolution(sol []float64) {
	as := p.ws.as
	as.pas = as.pas[:0]
	for j := 0; j < p.N; j++ {
		as.x[j] = sol[j]
		as.pos[j] = -1
		if j >= p.g.n || sol[j] > 0 {
			as.pos[j] = len(as.pas)
			as.pas = append(as.pas, j)
		}
	}
}

// latticeLambda returns strength k of the NAlpha log-spaced strengths
// from LambdaMin to LambdaMax (the ends exact).
func (s *Settings) latticeLambda(k int) float64 {
	switch k {
	case 0:
		return s.LambdaMin
	case s.NAlpha - 1:
		return s.LambdaMax
	}
	lo, hi := math.Log(s.LambdaMin), math.Log(s.LambdaMax)
	return math.Exp(lo + (hi-lo)*float64(k)/float64(s.NAlpha-1))
}

func (p *problem) run(estimateSigma bool) (*Result, error) {
	s := p.s
	nBase := 1
	full := s.Criterion != ProbReject || s.FullScan
	var lo, hi int // rows bracketing the target (search), hi < 0: none
	switch {
	case s.Criterion == Fixed:
		a2 := s.Alpha * s.Alpha
		lambda := a2 * p.g.trR / p.trG
		if s.Lambda > 0 {
			lambda = s.Lambda
			a2 = p.a2Of(lambda)
		}
		p.solveAt(lambda, a2, false)
	case full:
		nBase = s.NAlpha
		for k := 0; k < nBase; k++ {
			lambda := s.latticeLambda(k)
			p.solveAt(lambda, p.a2Of(lambda), false)
		}
	default:
		lo, hi = p.search()
	}
	var warns []error
	warns = append(warns, p.g.warnings...)
	if !full {
		nBase = 0
	}
	p.statistics(nBase, &warns)

	picks := Picks{ProbReject: -1, GCV: -1, LCurve: -1}
	chosen := 0
	if s.Criterion != Fixed {
		if full {
			lo, hi = p.baseBracket()
		}
		if s.Criterion == ProbReject && s.Refine > 0 && hi >= 0 {
			p.refine(lo, hi)
			p.statistics(0, nil)
		}
		picks.ProbReject = p.pickProbReject()
		if full {
			picks.GCV = p.pickGCV()
			if s.NAlpha >= 5 {
				picks.LCurve = p.pickLCurve()
			}
		}
		switch s.Criterion {
		case ProbReject:
			chosen = picks.ProbReject
		case GCV:
			chosen = picks.GCV
		case LCurve:
			chosen = picks.LCurve
			if chosen < 0 || p.rows[chosen].Curvature <= 0 {
				warns = append(warns, fmt.Errorf("contin: L-curve has no convex corner over λ in [%g, %g]; taking the largest curvature: %w",
					s.LambdaMin, s.LambdaMax, ErrNoCorner))
			}
		}
	}
	// Sort the rows by α (search and refinement rows were appended out of
	// order) and remap.
	order := make([]int, len(p.rows))
	for i := range order {
		order[i] = i
	}
	slices.SortStableFunc(order, func(a, b int) int { return cmp.Compare(p.rows[a].Lambda, p.rows[b].Lambda) })
	inv := make([]int, len(order))
	rows := make([]ScanRow, len(order))
	for newI, oldI := range order {
		inv[oldI] = newI
		rows[newI] = p.rows[oldI]
	}
	remap := func(i int) int {
		if i < 0 {
			return i
		}
		return inv[i]
	}
	picks.ProbReject, picks.GCV, picks.LCurve = remap(picks.ProbReject), remap(picks.GCV), remap(picks.LCurve)
	solOf := p.solIdx[chosen]
	chosen = inv[chosen]

	if s.Criterion != Fixed && (rows[chosen].Lambda == s.LambdaMin || rows[chosen].Lambda == s.LambdaMax) {
		warns = append(warns, fmt.Errorf("contin: %v chose λ = %.3g at the end of the scan [%g, %g]: %w",
			s.Criterion, rows[chosen].Lambda, s.LambdaMin, s.LambdaMax, ErrScanEdge))
	}
	var limited []string
	for _, r := range rows {
		if r.Status == IterationLimit {
			limited = append(limited, fmt.Sprintf("%.3g", r.Lambda))
		}
	}
	if len(limited) > 0 {
		warns = append(warns, fmt.Errorf("contin: active-set solver stopped after %d iterations at λ = %v: %w",
			p.maxIter, limited, ErrIterationLimit))
	}
	res := p.result(rows, chosen, solOf, picks, estimateSigma, warns)
	if s.Criterion != Fixed { // row 0 was solved at LambdaMin
		k := p.solIdx[p.refRow]
		res.refSolution = slices.Clone(p.ws.sols[k*p.N : (k+1)*p.N])
	}
	return res, nil
}

// fTest holds the reference of the probability to reject: V₀ (floored
// when the least-regularised fit is exact) and the F distribution with
// N_DF₀ and N_y − N_DF₀ degrees of freedom.
type fTest struct {
	v0, d1, d2 float64
	exact      bool // V₀ was below the floor
	fd         distuv.F
}

// reference sets p.ft from row 0, the least-regularised row.
func (p *problem) reference() {
	ref := p.rows[p.refRow]
	ny := float64(p.ny)
	ft := fTest{v0: ref.ChiSquare}
	if floor := 1e-14 * p.yWeightedSq(); ft.v0 < floor {
		ft.v0, ft.exact = floor, true
	}
	ft.d1 = math.Max(ref.DegreesOfFreedom, 1)
	ft.d2 = math.Max(ny-ref.DegreesOfFreedom, 1)
	ft.fd = distuv.F{D1: ft.d1, D2: ft.d2}
	p.ft = ft
}

// probReject returns the probability to reject of a row with weighted
// residual sum of squares v against the reference.
func (p *problem) probReject(v float64) float64 {
	ft := &p.ft
	f := (v - ft.v0) / ft.v0 * ft.d2 / ft.d1
	if !(f > 0) {
		return 0
	}
	pr := ft.fd.CDF(f)
	if math.IsNaN(pr) {
		return 1
	}
	return math.Min(math.Max(pr, 0), 1)
}

// search finds, on the lattice of NAlpha strengths that the full scan
// solves, the first strength whose probability to reject reaches the
// target, and returns the rows lo (below the target) and hi (at or above
// it; −1 when no strength reaches it, lo is then the largest).
//
// It starts at the middle of the lattice, or with InvertFrom at the
// strength just above the earlier choice, and steps towards the target
// by 1, 2, 4, … lattice strengths until the target is bracketed, then
// bisects the bracket. Each solve starts from the nearest strength solved,
// so that the steps stay short: a solve far from its start costs many
// active-set iterations, and a broad solution at a large λ the Gram rows
// of its many passive rates. The cold start solves the middle strength
// first (from Settings.Start or x = 0) and the reference λ = LambdaMin
// from it: a regularised problem takes fewer iterations from there than
// the nearly unregularised one.
//
// The bracket is the full scan's because V, and so P_reject, does not
// decrease as α grows: with Φ = ||Lx/w||², the minimisers x₁, x₂ at
// α₁ < α₂ satisfy V₁ + α₁²Φ₁ ≤ V₂ + α₁²Φ₂ and V₂ + α₂²Φ₂ ≤ V₁ + α₂²Φ₁;
// adding the two gives Φ₂ ≤ Φ₁, and then the first gives V₁ ≤ V₂ (the
// constraint x ≥ 0 does not enter). Every probe inside the bracket keeps
// P(klo) < target ≤ P(khi), so the order of the probes does not change
// the bracket found.
func (p *problem) search() (lo, hi int) {
	s := p.s
	t := s.TargetProbReject
	n := s.NAlpha
	k0 := n / 2
	prev := p.prev
	if prev != nil && !(prev.Criterion == ProbReject && prev.Lambda > s.LambdaMin && prev.Lambda < s.LambdaMax) {
		prev = nil
	}
	if prev != nil {
		k := 0
		for k+1 < n-1 && s.latticeLambda(k+1) <= prev.Lambda {
			k++
		}
		k0 = k + 1
	}
	first := -1
	if p.prev == nil {
		first = p.solveAt(s.latticeLambda(k0), p.a2Of(s.latticeLambda(k0)), false)
	}
	// The reference: from the middle strength's solution (cold) or from
	// the earlier inversion's reference (InvertFrom).
	p.refRow = p.solveAt(s.LambdaMin, p.a2Of(s.LambdaMin), false)
	p.reference()
	if first < 0 {
		if prev != nil {
			p.warmFromSolution(append(slices.Clone(prev.Amplitude), prev.Baseline)[:p.N])
		} else {
			p.warmFrom(p.refRow)
		}
		first = p.solveAt(s.latticeLambda(k0), p.a2Of(s.latticeLambda(k0)), false)
	}
	p.rows[first].ProbReject, p.pDone[first] = p.probReject(p.rows[first].ChiSquare), true
	klo, khi := 0, n // lattice indices; khi = n: not reached
	lo, hi = p.refRow, -1
	up := p.rows[first].ProbReject < t
	if up {
		klo, lo = k0, first
	} else {
		khi, hi = k0, first
	}
	for step := 1; ; step *= 2 {
		var k int
		if up {
			if khi < n || klo >= n-1 {
				break
			}
			k = min(klo+step, n-1)
		} else {
			if klo > 0 || khi <= 1 {
				break
			}
			k = max(khi-step, 1)
		}
		r := p.probe(k, lo, hi)
		if p.rows[r].ProbReject >= t {
			khi, hi = k, r
		} else {
			klo, lo = k, r
		}
	}
	for khi-klo > 1 {
		k := (klo + khi) / 2
		r := p.probe(k, lo, hi)
		if p.rows[r].ProbReject >= t {
			khi, hi = k, r
		} else {
			klo, lo = k, r
		}
	}
	return lo, hi
}

// probe solves lattice strength k, warm-started from whichever of the rows
// lo and hi (hi < 0: none) is nearer in log λ, and sets its P_reject.
func (p *problem) probe(k, lo, hi int) int {
	lambda := p.s.latticeLambda(k)
	from := lo
	if hi >= 0 && math.Log(p.rows[hi].Lambda/lambda) < math.Log(lambda/p.rows[lo].Lambda) {
		from = hi
	}
	p.warmFrom(from)
	r := p.solveAt(lambda, p.a2Of(lambda), false)
	p.rows[r].ProbReject, p.pDone[r] = p.probReject(p.rows[r].ChiSquare), true
	return r
}

// baseBracket returns, for a full scan, the first base row whose
// probability to reject reaches the target and the row before it (hi < 0
// when none does).
func (p *problem) baseBracket() (lo, hi int) {
	for i := 1; i < p.s.NAlpha; i++ {
		if p.rows[i].ProbReject >= p.s.TargetProbReject {
			return i - 1, i
		}
	}
	return 0, -1
}

// statistics fills GCV and, unless the criterion is Fixed, ProbReject of
// every row and the L-curve curvature of the first nBase rows (the base
// scan of a full scan; 0 for a search); doubts are appended to warns
// unless it is nil.
func (p *problem) statistics(nBase int, warns *[]error) {
	rows := p.rows
	ny := float64(p.ny)
	for i := range rows {
		r := &rows[i]
		den := ny - r.DegreesOfFreedom
		if den < 0.5 {
			den = 0.5
		}
		r.GCV = ny * r.ChiSquare / (den * den)
	}
	if p.s.Criterion == Fixed {
		return
	}
	p.reference()
	if p.ft.exact && warns != nil {
		*warns = append(*warns, fmt.Errorf("contin: least-regularised fit is exact (V = %.3g), F-test degenerate: %w", rows[p.refRow].ChiSquare, ErrIllConditioned))
	}
	for len(p.pDone) < len(rows) { // rows made without solveAt
		p.pDone = append(p.pDone, false)
	}
	for i := range rows {
		if !p.pDone[i] {
			rows[i].ProbReject = p.probReject(rows[i].ChiSquare)
			p.pDone[i] = true
		}
	}
	if nBase > 0 {
		p.lcurve(nBase)
	}
}

// lcurve fills the L-curve curvature of the first nBase rows (the base
// scan, in increasing α).
func (p *problem) lcurve(nBase int) {
	rows := p.rows
	// L-curve on the base rows, which are in increasing α. Points closer
	// than lcurveMinStep of the (scaled) curve's diagonal to the last kept
	// point are pruned first: on the plateau of the nearly unregularised solutions
	// they coincide to rounding, and their curvature would be noise.
	pts := make([][2]float64, nBase)
	x0, x1, y0, y1 := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	for k := 0; k < nBase; k++ {
		pts[k] = lpoint(rows[k])
		x0, x1 = math.Min(x0, pts[k][0]), math.Max(x1, pts[k][0])
		y0, y1 = math.Min(y0, pts[k][1]), math.Max(y1, pts[k][1])
	}
	// Scale both axes to unit range so the corner does not depend on
	// which of the two norms happens to spread more over the scan.
	sx, sy := x1-x0, y1-y0
	if !(sx > 0) {
		sx = 1
	}
	if !(sy > 0) {
		sy = 1
	}
	for k := range pts {
		pts[k] = [2]float64{(pts[k][0] - x0) / sx, (pts[k][1] - y0) / sy}
	}
	minStep := lcurveMinStep * math.Sqrt2
	kept := make([]int, 0, nBase)
	for k := 0; k < nBase; k++ {
		rows[k].Curvature = 0
		if len(kept) == 0 {
			kept = append(kept, k)
			continue
		}
		last := pts[kept[len(kept)-1]]
		if math.Hypot(pts[k][0]-last[0], pts[k][1]-last[1]) >= minStep {
			kept = append(kept, k)
		}
	}
	for i := 1; i+1 < len(kept); i++ {
		rows[kept[i]].Curvature = menger(pts[kept[i-1]], pts[kept[i]], pts[kept[i+1]])
	}
}

// lcurveMinStep is the smallest distance, as a fraction of the L-curve's
// extent in log–log space, between points used for its curvature.
const lcurveMinStep = 0.02

func (p *problem) yWeightedSq() float64 {
	var s float64
	for i, v := range p.y {
		r := p.ws.sw[i] * v
		s += r * r
	}
	return s
}

func lpoint(r ScanRow) [2]float64 {
	return [2]float64{0.5 * math.Log10(math.Max(r.ChiSquare, math.SmallestNonzeroFloat64)),
		math.Log10(math.Max(r.NormLx, math.SmallestNonzeroFloat64))}
}

// menger returns the signed curvature of the circle through three points,
// positive when the path a→b→c turns counter-clockwise (the corner of an
// L-curve traversed by increasing α).
func menger(a, b, c [2]float64) float64 {
	abx, aby := b[0]-a[0], b[1]-a[1]
	acx, acy := c[0]-a[0], c[1]-a[1]
	bcx, bcy := c[0]-b[0], c[1]-b[1]
	cross := abx*acy - aby*acx
	d := math.Hypot(abx, aby) * math.Hypot(acx, acy) * math.Hypot(bcx, bcy)
	if !(d > 0) {
		return 0
	}
	k := 2 * cross / d
	if math.IsNaN(k) || math.IsInf(k, 0) {
		return 0
	}
	return k
}

func (p *problem) pickProbReject() int {
	best, bd := 0, math.Inf(1)
	for i, r := range p.rows {
		if d := math.Abs(r.ProbReject - p.s.TargetProbReject); d < bd {
			best, bd = i, d
		}
	}
	return best
}

func (p *problem) pickGCV() int {
	best := 0
	for i, r := range p.rows {
		if r.Refined {
			continue
		}
		if r.GCV < p.rows[best].GCV {
			best = i
		}
	}
	return best
}

func (p *problem) pickLCurve() int {
	best := -1
	for i, r := range p.rows {
		if r.Refined || i == 0 || i == p.s.NAlpha-1 {
			continue
		}
		if best < 0 || r.Curvature > p.rows[best].Curvature {
			best = i
		}
	}
	return best
}

// refineTol is the distance from the target, in logit(P_reject), at
// which refine stops: 0.04 is ±0.01 in P_reject at the target 0.5, which
// is how close four bisection steps came (median 0.006, largest 0.016 on
// the 50 correlograms of BenchmarkAnalyze).
const refineTol = 0.04

// refine narrows the rows lo and hi that bracket the target probability
// to reject by at most Settings.Refine solves, warm-starting each from the
// lower end, and stops once a solve's P_reject is within refineTol of the
// target in logit. Each new strength is the regula falsi point of the
// bracket in (log λ, logit P_reject), where P_reject is close to linear
// (a lattice step spans about 0.33 to 0.64 around the target 0.5), with
// the Illinois rule: an end kept twice in a row has its distance from the
// target halved, so that the bracket shrinks from both sides (Dowell &
// Jarratt, BIT 11, 168, 1971). The point is kept within the middle 90 %
// of the bracket, and where an end's P_reject is 0 or 1 (no logit) the
// midpoint in log λ is taken, as a bisection would. The choice is then the
// solved row closest to the target (pickProbReject). Typically one or two
// solves reach what four bisection steps did.
func (p *problem) refine(lo, hi int) {
	t := p.s.TargetProbReject
	logit := func(v float64) float64 { return math.Log(v / (1 - v)) }
	ft := logit(t)
	flo, fhi := logit(p.rows[lo].ProbReject)-ft, logit(p.rows[hi].ProbReject)-ft
	kept := 0 // +1: hi was kept last step, −1: lo was
	for step := 0; step < p.s.Refine; step++ {
		x0, x1 := math.Log(p.rows[lo].Lambda), math.Log(p.rows[hi].Lambda)
		x := 0.5 * (x0 + x1)
		if !math.IsInf(flo, 0) && !math.IsInf(fhi, 0) && fhi > flo {
			f := -flo / (fhi - flo)
			x = x0 + (x1-x0)*math.Min(math.Max(f, 0.05), 0.95)
		}
		lambda := math.Exp(x)
		p.warmFrom(lo)
		r := p.solveAt(lambda, p.a2Of(lambda), true)
		pr := p.probReject(p.rows[r].ChiSquare)
		p.rows[r].ProbReject, p.pDone[r] = pr, true
		fr := logit(pr) - ft
		if pr >= t {
			hi, fhi = r, fr
			if kept == -1 { // lo kept a second time
				flo /= 2
			}
			kept = -1
		} else {
			lo, flo = r, fr
			if kept == 1 { // hi kept a second time
				fhi /= 2
			}
			kept = 1
		}
		if math.Abs(fr) <= refineTol {
			return
		}
	}
}

func (p *problem) result(rows []ScanRow, chosen, sol int, picks Picks, estimateSigma bool, warns []error) *Result {
	g := p.g
	n := g.n
	x := p.ws.sols[sol*p.N : (sol+1)*p.N]
	res := &Result{
		grid:      g,
		GammaPerS: g.GammaPerS(),
		Amplitude: slices.Clone(x[:n]),
		Fitted:    make([]float64, g.m),
		Residuals: make([]float64, g.m),
		Criterion: p.s.Criterion,
		Points:    p.ny,
		Scan:      rows,
		Chosen:    chosen,
		Picks:     picks,
		QRSolves:  p.qrSolves,
	}
	res.Iterations = p.totalIters
	if p.N > n {
		res.Baseline = x[n]
	}
	// Fitted_i = B + Σ_j x_j A_ij over the non-zero x_j, added column by
	// column in increasing j: the same additions in the same order as a
	// row-by-row sum, without visiting the zeros.
	fit := res.Fitted
	for i := range fit {
		fit[i] = res.Baseline
	}
	for j, xj := range x[:n] {
		if xj == 0 {
			continue
		}
		col := g.at[j*g.m : j*g.m+g.supp[j]]
		for i, a := range col {
			fit[i] += xj * a
		}
	}
	for i, f := range fit {
		res.Residuals[i] = p.y[i] - f
	}
	var sx, sxg float64
	for j, v := range res.Amplitude {
		sx += v
		sxg += v * g.gamma[j]
	}
	res.SumAmplitude = sx
	if sx > 0 {
		res.MeanRatePerS = sxg / sx
	}
	if estimateSigma {
		r := rows[chosen]
		den := math.Max(float64(p.ny)-r.DegreesOfFreedom, 1)
		s2 := r.ChiSquare / den
		res.SigmaEstimated = true
		if s2 > 0 {
			res.NoiseSigma = math.Sqrt(s2)
			for i := range rows {
				rows[i].ChiSquare /= s2
				rows[i].GCV /= s2
				rows[i].Alpha /= res.NoiseSigma
			}
		}
	}
	c := rows[chosen]
	res.Lambda, res.Alpha = c.Lambda, c.Alpha
	res.ChiSquare, res.DegreesOfFreedom, res.NormLx = c.ChiSquare, c.DegreesOfFreedom, c.NormLx
	res.ProbReject, res.GCV = c.ProbReject, c.GCV

	for _, r := range rows {
		if r.Status == IterationLimit {
			res.Status = IterationLimit
		}
	}
	if sx == 0 {
		res.Status = NoSignal
		warns = append(warns, fmt.Errorf("contin: all amplitudes are zero at λ = %.3g: %w", c.Lambda, ErrNoSignal))
	} else {
		var lo, hi float64
		for j := 0; j < edgeBins; j++ {
			lo += res.Amplitude[j]
			hi += res.Amplitude[n-1-j]
		}
		if lo > edgeFraction*sx {
			warns = append(warns, fmt.Errorf("contin: %.1f%% of the amplitude in the %d slowest rate bins (Γ ≤ %.3g 1/s): %w",
				100*lo/sx, edgeBins, g.gamma[edgeBins-1], ErrGridEdge))
		}
		if hi > edgeFraction*sx {
			warns = append(warns, fmt.Errorf("contin: %.1f%% of the amplitude in the %d fastest rate bins (Γ ≥ %.3g 1/s): %w",
				100*hi/sx, edgeBins, g.gamma[n-edgeBins], ErrGridEdge))
		}
	}
	res.Warnings = warns
	return res
}
