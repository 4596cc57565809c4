package contin

import (
	"fmt"
	"math"
	"sync"

	"gonum.org/v1/gonum/mat"
)

// Grid defaults and limits.
const (
	// DefaultNGamma is the number of decay-rate points when
	// GridSettings.NGamma is zero: 100 points over the default range of a
	// 0.5 µs–1 s lag window (7 decades) give about 14 points per decade,
	// inside the 12–20 per decade usually recommended for this problem.
	DefaultNGamma = 100
	// DefaultGammaMinTimesTauMax sets the slowest rate, Γmin = 0.2/τmax,
	// when GridSettings.GammaMinPerS is zero. Such a decay has fallen only
	// to exp(−0.2) ≈ 0.82 at the last lag; anything slower cannot be told
	// from a baseline offset.
	DefaultGammaMinTimesTauMax = 0.2
	// DefaultGammaMaxTimesTauMin sets the fastest rate, Γmax = 1/τmin, when
	// GridSettings.GammaMaxPerS is zero. Such a decay is down to
	// exp(−1) at the first lag; faster rates are seen only in the first few
	// lags and mostly end up fitting their noise.
	DefaultGammaMaxTimesTauMin = 1.0

	// MinPoints is the smallest number of lags (and of usable data points)
	// accepted.
	MinPoints = 8
	// MinGammaPoints and MaxGammaPoints bound GridSettings.NGamma.
	MinGammaPoints = 8
	MaxGammaPoints = 1000
)

// GridSettings chooses the decay-rate grid. The zero value (or a nil
// pointer) means the documented defaults.
type GridSettings struct {
	// NGamma is the number of log-spaced decay rates; 0 means DefaultNGamma.
	NGamma int
	// GammaMinPerS and GammaMaxPerS bound the rate grid in 1/s; 0 means
	// DefaultGammaMinTimesTauMax/τmax and DefaultGammaMaxTimesTauMin/τmin.
	GammaMinPerS, GammaMaxPerS float64
	// ChannelWidthS, when not nil, holds for every lag the sample time Δt
	// (s) of its channel. The kernel is then averaged over the channel's
	// triangular lag window of half-width Δt:
	//   A_ij = exp(−Γ_j τ_i)·[sinh(Γ_j Δt_i/2)/(Γ_j Δt_i/2)]²
	// Each Δt_i must lie in [0, τ_i]. nil means point sampling.
	ChannelWidthS []float64
}

// Grid is the discretised inverse Laplace problem for one lag grid and one
// rate grid: the log-spaced rates Γ_j, trapezoid weights w_j = Δln Γ
// (halved at both ends), the kernel A_ij = exp(−Γ_j τ_i) and the
// regulariser R = L'L of the second differences of x/w. A Grid is
// immutable once built and safe for concurrent use by many goroutines;
// everything that depends only on the grid is computed once (the unit-weight
// Gram matrix on first use).
type Grid struct {
	tau, gamma, w []float64
	m, n          int
	stride        int       // n+1: the Gram matrices carry the baseline column
	at            []float64 // (n+1)×m row-major: row j<n is column j of A, row n is all ones
	at2           []float64 // the same, squared (the diagonal of A'WA is W against it)
	supp          []int     // column j of A is zero from lag supp[j] on
	lagSq         []float64 // Σ_j A_ij² over the rates, by lag: tr(A'WA) = Σ_i W_i·lagSq_i
	rband         []float64 // n×5: R[j][j+d] at rband[5j+d+2], d = −2..2
	trR           float64
	settings      GridSettings
	warnings      []error

	unitOnce sync.Once
	gUnit    []float64 // (n+1)×(n+1) Gram matrix [A 1]'[A 1], full storage

	pool sync.Pool // *workspace
}

// NewGrid builds the grid for the lag times tauS (s, positive, strictly
// increasing, at least MinPoints). A nil s means the defaults. Errors wrap
// ErrTooFewPoints, ErrBadLag, ErrNonFinite, ErrBadSettings or ErrBadGrid.
// Doubts that do not stop the inversion (rates far outside the lag window,
// a coarse grid) are listed by Warnings.
func NewGrid(tauS []float64, s *GridSettings) (*Grid, error) {
	gs, err := normaliseGridSettings(tauS, s)
	if err != nil {
		return nil, err
	}
	return buildGrid(tauS, gs)
}

func checkLags(tau []float64) error {
	if len(tau) < MinPoints {
		return fmt.Errorf("contin grid: %d lags, need at least %d: %w", len(tau), MinPoints, ErrTooFewPoints)
	}
	for i, t := range tau {
		if math.IsNaN(t) || math.IsInf(t, 0) {
			return fmt.Errorf("contin grid: lag %d is %v: %w", i, t, ErrNonFinite)
		}
		if t <= 0 {
			return fmt.Errorf("contin grid: lag %d is %g s, must be positive: %w", i, t, ErrBadLag)
		}
		if i > 0 && t <= tau[i-1] {
			return fmt.Errorf("contin grid: lag %d (%g s) does not exceed lag %d (%g s): %w", i, t, i-1, tau[i-1], ErrBadLag)
		}
	}
	return nil
}

// normaliseGridSettings validates the lags and settings and fills in the
// defaults, so that equal effective grids have equal settings.
func normaliseGridSettings(tau []float64, s *GridSettings) (GridSettings, error) {
	var gs GridSettings
	if s != nil {
		gs = *s
	}
	if err := checkLags(tau); err != nil {
		return gs, err
	}
	m := len(tau)
	tmin, tmax := tau[0], tau[m-1]
	if gs.NGamma == 0 {
		gs.NGamma = DefaultNGamma
	}
	if gs.NGamma < MinGammaPoints || gs.NGamma > MaxGammaPoints {
		return gs, fmt.Errorf("contin grid: %d rate points, want %d to %d: %w", gs.NGamma, MinGammaPoints, MaxGammaPoints, ErrBadSettings)
	}
	for _, v := range []float64{gs.GammaMinPerS, gs.GammaMaxPerS} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return gs, fmt.Errorf("contin grid: rate bound %v: %w", v, ErrNonFinite)
		}
		if v < 0 {
			return gs, fmt.Errorf("contin grid: rate bound %g 1/s is negative: %w", v, ErrBadSettings)
		}
	}
	if gs.GammaMinPerS == 0 {
		gs.GammaMinPerS = DefaultGammaMinTimesTauMax / tmax
	}
	if gs.GammaMaxPerS == 0 {
		gs.GammaMaxPerS = DefaultGammaMaxTimesTauMin / tmin
	}
	if gs.GammaMinPerS >= gs.GammaMaxPerS {
		return gs, fmt.Errorf("contin grid: rate range [%g, %g] 1/s is empty: %w", gs.GammaMinPerS, gs.GammaMaxPerS, ErrBadGrid)
	}
	if gs.ChannelWidthS != nil {
		if len(gs.ChannelWidthS) != m {
			return gs, fmt.Errorf("contin grid: %d channel widths for %d lags: %w", len(gs.ChannelWidthS), m, ErrLength)
		}
		for i, d := range gs.ChannelWidthS {
			if math.IsNaN(d) || math.IsInf(d, 0) {
				return gs, fmt.Errorf("contin grid: channel width %d is %v: %w", i, d, ErrNonFinite)
			}
			if d < 0 || d > tau[i] {
				return gs, fmt.Errorf("contin grid: channel width %d is %g s, want 0 to the lag %g s: %w", i, d, tau[i], ErrBadSettings)
			}
		}
		gs.ChannelWidthS = append([]float64(nil), gs.ChannelWidthS...)
	}
	// Coverage of the lag window.
	if gs.GammaMaxPerS*tmax < 0.1 {
		return gs, fmt.Errorf("contin grid: fastest rate %g 1/s hardly decays by the last lag %g s: %w", gs.GammaMaxPerS, tmax, ErrBadGrid)
	}
	if gs.GammaMinPerS*tmin > 30 {
		return gs, fmt.Errorf("contin grid: slowest rate %g 1/s has decayed before the first lag %g s: %w", gs.GammaMinPerS, tmin, ErrBadGrid)
	}
	if gs.GammaMaxPerS*tmin > 700 {
		return gs, fmt.Errorf("contin grid: fastest rate %g 1/s underflows at the first lag %g s (Γ·τ > 700): %w", gs.GammaMaxPerS, tmin, ErrBadGrid)
	}
	return gs, nil
}

func buildGrid(tau []float64, gs GridSettings) (*Grid, error) {
	m, n := len(tau), gs.NGamma
	g := &Grid{
		tau:      append([]float64(nil), tau...),
		gamma:    make([]float64, n),
		w:        make([]float64, n),
		m:        m,
		n:        n,
		stride:   n + 1,
		at:       make([]float64, (n+1)*m),
		rband:    make([]float64, 5*n),
		settings: gs,
	}
	lo, hi := math.Log(gs.GammaMinPerS), math.Log(gs.GammaMaxPerS)
	h := (hi - lo) / float64(n-1)
	for j := range g.gamma {
		g.gamma[j] = math.Exp(lo + float64(j)*h)
		g.w[j] = h
	}
	g.gamma[0], g.gamma[n-1] = gs.GammaMinPerS, gs.GammaMaxPerS
	g.w[0], g.w[n-1] = h/2, h/2

	// Kernel, stored by columns (rows of at), with the baseline column last.
	for j, gam := range g.gamma {
		row := g.at[j*m : (j+1)*m]
		for i, t := range tau {
			row[i] = kernel(gam, t, gs.ChannelWidthS, i)
		}
	}
	ones := g.at[n*m : (n+1)*m]
	for i := range ones {
		ones[i] = 1
	}
	// Support of each column: entries below kernelCut times the column's
	// largest are set to zero, so that products over the long tail of a
	// fast decay are skipped exactly (they change G by less than 1e-50
	// relative).
	g.supp = make([]int, n+1)
	for j := 0; j <= n; j++ {
		row := g.at[j*m : (j+1)*m]
		var mx float64
		for _, v := range row {
			mx = math.Max(mx, v)
		}
		k := m
		for k > 1 && row[k-1] < kernelCut*mx {
			k--
		}
		for i := k; i < m; i++ {
			row[i] = 0
		}
		g.supp[j] = k
	}
	g.at2 = make([]float64, len(g.at))
	for i, v := range g.at {
		g.at2[i] = v * v
	}
	g.lagSq = make([]float64, m)
	for j := 0; j < n; j++ {
		for i, v := range g.at2[j*m : j*m+g.supp[j]] {
			g.lagSq[i] += v
		}
	}

	// Regulariser: rows of L are second differences of Gt = x/w at the
	// points −1 … n, with Gt = 0 at the two points beyond each end.
	// R = L'L is accumulated row by row into its band.
	for r := -1; r <= n; r++ {
		cols := [3]int{r - 1, r, r + 1}
		coef := [3]float64{1, -2, 1}
		for a := 0; a < 3; a++ {
			ja := cols[a]
			if ja < 0 || ja >= n {
				continue
			}
			for b := 0; b < 3; b++ {
				jb := cols[b]
				if jb < 0 || jb >= n {
					continue
				}
				g.rband[5*ja+(jb-ja)+2] += coef[a] * coef[b] / (g.w[ja] * g.w[jb])
			}
		}
	}
	for j := 0; j < n; j++ {
		g.trR += g.rband[5*j+2]
	}

	// Warnings about the coverage of the lag window.
	tmin, tmax := tau[0], tau[m-1]
	if gs.GammaMinPerS*tmax < 1e-2 {
		g.warnings = append(g.warnings, fmt.Errorf("contin grid: slowest rate %g 1/s decays by less than 1%% over the lags (Γ·τmax = %.2g): %w",
			gs.GammaMinPerS, gs.GammaMinPerS*tmax, ErrIllConditioned))
	}
	if gs.GammaMaxPerS*tmin > 30 {
		g.warnings = append(g.warnings, fmt.Errorf("contin grid: fastest rate %g 1/s has decayed by exp(−%.3g) at the first lag: %w",
			gs.GammaMaxPerS, gs.GammaMaxPerS*tmin, ErrIllConditioned))
	}
	if perDecade := float64(n-1) / math.Log10(gs.GammaMaxPerS/gs.GammaMinPerS); perDecade < 5 {
		g.warnings = append(g.warnings, fmt.Errorf("contin grid: %.3g rate points per decade is coarse: %w", perDecade, ErrIllConditioned))
	}
	g.pool.New = func() any { return newWorkspace(g) }
	return g, nil
}

// kernel returns exp(−Γτ), averaged over the triangular window of
// half-width widths[i] when widths is not nil.
func kernel(gam, tau float64, widths []float64, i int) float64 {
	e := -gam * tau
	if widths == nil || widths[i] == 0 {
		return math.Exp(e)
	}
	z := gam * widths[i] / 2
	if z < 1e-4 {
		f := 1 + z*z/6 // sinh(z)/z to O(z⁴), relative error below 1e-18
		return math.Exp(e) * f * f
	}
	// exp(−Γτ)·(sinh z/z)² = exp(−Γτ + 2z)·((1 − exp(−2z))/(2z))², which
	// cannot overflow because 2z = Γ·Δt ≤ Γ·τ.
	f := -math.Expm1(-2*z) / (2 * z)
	return math.Exp(e+2*z) * f * f
}

// unitGram returns [A 1]'[A 1] (full storage, stride n+1), computed once.
func (g *Grid) unitGram() []float64 {
	g.unitOnce.Do(func() {
		g.gUnit = make([]float64, g.stride*g.stride)
		gram(g.gUnit, g.stride, g.at, g.m, g.supp)
	})
	return g.gUnit
}

// gram sets dst (N×N, full) to b·b' for the N×m row-major b whose row j
// is zero from column supp[j] on, each entry the dot product (dot.go) of
// the two rows over their common support.
func gram(dst []float64, N int, b []float64, m int, supp []int) {
	js, ls, v := make([]int, 0, N), make([]int, 0, N), make([]float64, N)
	for j := 0; j < N; j++ {
		js, ls = js[:0], ls[:0]
		for k := j; k < N; k++ {
			js, ls = append(js, k), append(ls, min(supp[j], supp[k]))
		}
		dots(b[j*m:j*m+supp[j]], b, m, js, ls, v)
		for i, k := range js {
			dst[j*N+k] = v[i]
			dst[k*N+j] = v[i]
		}
	}
}

// kernelCut is the relative size below which kernel entries are zeroed.
const kernelCut = 1e-25

// rAt returns R_jk for grid indices j, k (zero for the baseline column).
func (g *Grid) rAt(j, k int) float64 {
	d := k - j
	if j >= g.n || k >= g.n || d < -2 || d > 2 {
		return 0
	}
	return g.rband[5*j+d+2]
}

// NLags returns the number of lags m.
func (g *Grid) NLags() int { return g.m }

// NGamma returns the number of rate points n.
func (g *Grid) NGamma() int { return g.n }

// TauS returns a copy of the lag times (s).
func (g *Grid) TauS() []float64 { return append([]float64(nil), g.tau...) }

// GammaPerS returns a copy of the decay rates Γ_j (1/s), ascending.
func (g *Grid) GammaPerS() []float64 { return append([]float64(nil), g.gamma...) }

// Weights returns a copy of the trapezoid weights w_j in ln Γ.
func (g *Grid) Weights() []float64 { return append([]float64(nil), g.w...) }

// Settings returns the grid settings with the defaults filled in.
func (g *Grid) Settings() GridSettings {
	s := g.settings
	s.ChannelWidthS = append([]float64(nil), s.ChannelWidthS...)
	if g.settings.ChannelWidthS == nil {
		s.ChannelWidthS = nil
	}
	return s
}

// Warnings returns doubts about the grid found when it was built (each
// wraps ErrIllConditioned); nil when there are none.
func (g *Grid) Warnings() []error { return append([]error(nil), g.warnings...) }

// Kernel returns a copy of the m×n kernel matrix A_ij.
func (g *Grid) Kernel() *mat.Dense {
	a := mat.NewDense(g.m, g.n, nil)
	for j := 0; j < g.n; j++ {
		for i := 0; i < g.m; i++ {
			a.Set(i, j, g.at[j*g.m+i])
		}
	}
	return a
}

// Regulariser returns a copy of the n×n matrix R = L'L, where L takes the
// second differences of x_j/w_j with zeros at two points beyond each end.
func (g *Grid) Regulariser() *mat.SymDense {
	r := mat.NewSymDense(g.n, nil)
	for j := 0; j < g.n; j++ {
		for k := j; k < g.n && k <= j+2; k++ {
			r.SetSym(j, k, g.rAt(j, k))
		}
	}
	return r
}

// normLx returns ||L x/w||, the norm of the second differences of Gt = x/w
// with the zero padding of the regulariser.
func (g *Grid) normLx(x []float64) float64 {
	n := g.n
	gt := func(j int) float64 {
		if j < 0 || j >= n {
			return 0
		}
		return x[j] / g.w[j]
	}
	var s float64
	for r := -1; r <= n; r++ {
		d := gt(r-1) - 2*gt(r) + gt(r+1)
		s += d * d
	}
	return math.Sqrt(s)
}
