package cumulants

import (
	"errors"
	"fmt"
	"math"
	"sync"

	"gonum.org/v1/gonum/mat"
)

// Basis of the channel variances in CorrelatedErrors.
const (
	// BasisModel: the variances of the noise model for the stated
	// duration and count rate (σ estimated from the data otherwise).
	BasisModel = "model"
	// BasisSigma: the σ given with the data.
	BasisSigma = "sigma"
	// BasisTail: the noise model's variances (with the count rate when
	// stated), scaled to the residuals of the far channels (duration or
	// count rate not stated; noisy, and high on average: see doc.go).
	BasisTail = "tail"
)

// CorrelatedErrors are the standard errors of a nonlinear cumulant fit
// when the channel noise is that of a photon correlator, correlated from
// channel to channel: the sandwich A⁻¹·(JᵀW·C·WJ)·A⁻¹ with A = JᵀWJ, the
// fit's weights W and the noise covariance C = D·R·D, R the correlation
// matrix of the noise model (see correlator.go) and D the channel
// standard deviations of Basis.
type CorrelatedErrors struct {
	GammaSEPerS float64 // standard error of Γ̄, 1/s
	PDISE       float64 // standard error of the PDI
	Basis       string  // BasisSigma, BasisModel or BasisTail
	// ResidualRatio is the fit's Σw·r² over the value the noise covariance
	// predicts for it, E[Σw·r²] = Σw·D² − tr(A⁻¹·JᵀW·C·WJ): near 1 when
	// the model describes the noise, well above it when something else
	// (dust, a misfit, a drifting baseline) adds to the residuals.
	ResidualRatio float64
	// Inflation is GammaSEPerS over the fit's standard error under
	// independent channel noise (Result.GammaSEPerS).
	Inflation float64
	// DOF is the degrees of freedom of the channel variances' scale: 0
	// (infinite) for the model, the far channels less one for the tail
	// basis, the fitted points less the parameters for σ given (the
	// convention of a given σ's fit).
	DOF float64
}

// ErrNoCorrelated reports a fit the correlator noise model does not cover.
var ErrNoCorrelated = errors.New("correlated-noise standard errors not available")

// FitCorrelated is Fit followed by the standard errors under the noise of
// a photon correlator (Result.Correlated) and, for a second-order fit, the
// truncation estimate (Result.Truncation, see TruncationBias), for a
// correlogram accumulated
// over acq.DurationS at acq.CountRateHz (either may be zero: unknown). The
// channel variances are, in this order of preference, the σ given, the
// noise model's for the stated duration and count rate, or the fit's own
// estimate scaled to its residuals. The fit itself, and Result.GammaSEPerS
// and PDISE, are Fit's. Only the nonlinear method on g2 or g2 − 1 data is
// covered; otherwise, or when the covariance cannot be formed, Correlated
// stays nil and Result.Unavailable says why (the fit itself stands).
func FitCorrelated(tau, y, sigma []float64, kind Kind, s *Settings, acq Acquisition) (*Result, error) {
	res, err := Fit(tau, y, sigma, kind, s)
	if err != nil {
		return nil, err
	}
	if ce, err := res.correlated(tau, kind, acq); err != nil {
		res.Unavailable = append(res.Unavailable, err)
	} else {
		res.Correlated = ce
	}
	if res.Order == 2 {
		if tr, err := TruncationBias(tau, kind, s, res); err != nil {
			res.Unavailable = append(res.Unavailable, err)
		} else {
			res.Truncation = tr
		}
	}
	return res, nil
}

// noiseLevel checks that the correlator noise model applies to the fit r
// of data of kind with acquisition acq, and returns the baseline level
// the noise of g2 scales with and the coherence factor relative to it.
func (r *Result) noiseLevel(kind Kind, acq Acquisition) (level, beta float64, err error) {
	switch {
	case r.Method != Nonlinear:
		return 0, 0, fmt.Errorf("%w for the %s method", ErrNoCorrelated, r.Method)
	case kind == G1:
		return 0, 0, fmt.Errorf("%w for g1 data", ErrNoCorrelated)
	case !(r.GammaPerS > 0) || !(r.Intercept > 0):
		return 0, 0, fmt.Errorf("%w: no positive decay rate and intercept", ErrNoCorrelated)
	}
	if !(acq.DurationS >= 0) || !(acq.CountRateHz >= 0) || math.IsInf(acq.DurationS, 0) || math.IsInf(acq.CountRateHz, 0) {
		return 0, 0, fmt.Errorf("%w: duration %g s or count rate %g /s is not a non-negative number", ErrNoCorrelated, acq.DurationS, acq.CountRateHz)
	}
	// The noise of g2 scales with its baseline level.
	level = r.Baseline
	if kind == G2Minus1 {
		level = 1 + r.Baseline
	}
	if !(level > 0) {
		return 0, 0, fmt.Errorf("%w: baseline level %g is not positive", ErrNoCorrelated, level)
	}
	return level, math.Min(r.Intercept/level, 1), nil
}

// tailScale returns the factor that scales the model's standard deviations
// (without a duration) to the residuals of the far channels, those of the
// fitted channels idx beyond r.FitLast (sd(i): the model's σ of idx[i]),
// and the number of far channels it rests on.
func (r *Result) tailScale(idx []int, sd func(i int) float64) (f float64, nt int, err error) {
	ss := 0.0
	for i, c := range idx {
		if c <= r.FitLast {
			continue
		}
		if s := sd(i); s > 0 {
			z := r.Residuals[c] / s
			ss += z * z
			nt++
		}
	}
	if nt < 5 || !(ss > 0) {
		return 0, 0, fmt.Errorf("%w: duration_s not given and too few far channels to scale the noise model", ErrNoCorrelated)
	}
	return math.Sqrt(ss / float64(nt-1)), nt, nil
}

// correlated computes the standard errors under the correlator noise model.
func (r *Result) correlated(tau []float64, kind Kind, acq Acquisition) (*CorrelatedErrors, error) {
	level, beta, err := r.noiseLevel(kind, acq)
	if err != nil {
		return nil, err
	}
	sp := &noiseSpec{gamma: r.GammaPerS, beta: beta, rate: acq.CountRateHz}
	idx := fitChannels(r.FitFirst, r.FitLast, len(tau), r.tailN, r.farFitted)
	m := len(idx)
	np := 4
	if r.Order == 3 {
		np = 5
	}
	w := corrPool.Get().(*corrWork)
	defer corrPool.Put(w)
	w.grow(len(tau), m, np)
	dts, ks := w.dts, w.ks
	sampleTimesTo(tau, dts, ks)

	// Channel standard deviations D in the units of the data.
	d := w.d
	// model fills d from the lattice variances for a duration durS (0: per
	// second of measurement, lags neglected against the duration).
	model := func(durS float64) {
		// One lattice per sample time (the lag differences of one stage
		// agree to rounding: key them to 1e-9 relative).
		w.keys = w.keys[:0]
		for i, c := range idx {
			key := latticeKey(dts[c])
			l := w.lattice(key)
			if l == nil {
				l = w.addLattice(key, sp, dts[c])
			}
			d[i] = level * l.channelSD(tau[c], dts[c], ks[c], beta, acq.CountRateHz, durS)
		}
	}
	var basis string
	dof := 0.0
	switch {
	case !r.SigmaEstimated:
		basis = BasisSigma
		dof = float64(r.PointsUsed - 2 - r.Order)
		for i, c := range idx {
			d[i] = r.Sigma[c]
		}
	case acq.DurationS > 0 && acq.CountRateHz > 0:
		basis = BasisModel
		model(acq.DurationS)
	case r.farFitted:
		// The far channels' noise is nearly independent from channel to
		// channel and hardly absorbed by the fit (only B is fitted there),
		// so their residuals fix the scale 1/T of the model's variances.
		basis = BasisTail
		model(0)
		f, nt, err := r.tailScale(idx, func(i int) float64 { return d[i] })
		if err != nil {
			return nil, err
		}
		for i := range d {
			d[i] *= f
		}
		dof = float64(nt - 1)
	default:
		return nil, fmt.Errorf("%w: the duration is not given and the baseline not reached", ErrNoCorrelated)
	}

	// Jacobian in the fit's scaled parameters (B, β, Γ/Γ̄, μ2/Γ̄², μ3/Γ̄³)
	// at the solution (rows of np), and the weights.
	g0 := r.GammaPerS
	v := r.Mu2PerS2 / (g0 * g0)
	w3 := r.Mu3PerS3 / (g0 * g0 * g0)
	J, wt := w.J, w.wt
	chi := 0.0
	for i, c := range idx {
		ti := tau[c] * g0
		ex := math.Exp(-ti)
		f := ex * (1 + v*ti*ti/2 - w3*ti*ti*ti/6)
		fe := f * f // g2 and g2 − 1: the model is B + β·f²
		bd := r.Intercept * 2 * f
		row := [5]float64{1, fe, bd * (-ti * f), bd * ex * ti * ti / 2, bd * ex * (-ti * ti * ti / 6)}
		copy(J[i*np:(i+1)*np], row[:np])
		wt[i] = 1 / (r.Sigma[c] * r.Sigma[c])
		chi += wt[i] * r.Residuals[c] * r.Residuals[c]
	}
	a := mat.NewSymDense(np, nil)
	for p := range np {
		for q := p; q < np; q++ {
			s := 0.0
			for i := range m {
				s += wt[i] * J[i*np+p] * J[i*np+q]
			}
			a.SetSym(p, q, s)
		}
	}
	var chol mat.Cholesky
	var ainvS mat.SymDense
	if !chol.Factorize(a) || chol.InverseTo(&ainvS) != nil {
		return nil, fmt.Errorf("%w: singular normal matrix", ErrNoCorrelated)
	}
	var ainv [5][5]float64
	for p := range np {
		for q := range np {
			ainv[p][q] = ainvS.At(p, q)
		}
	}

	// Meat JᵀW·C·WJ = Bᵀ·R̃·B with C_ij = D_i·D_j·R_ij, R from the
	// continuous kernel: B holds the rows of W·J·D/√kd, R̃ is symmetric
	// with the diagonal kd, and meat = Σ kd_i·b_i·b_iᵀ + X + Xᵀ with
	// X = Σ_{i<j} R̃_ij·b_i·b_jᵀ.
	ch, kd := w.ch, w.kd
	kc := sp.consts()
	for i, c := range idx {
		ch[i] = sp.channel(tau[c], dts[c])
		kd[i] = kc.kernel(&ch[i], &ch[i], 1) + ch[i].shot // E_0 = exp(−0) = 1
	}
	b := w.b // rows of W·J·D/√kd
	var meat, x [5][5]float64
	for i := range m {
		f := 0.0
		if kd[i] > 0 {
			f = d[i] / math.Sqrt(kd[i])
		}
		bi := b[i*np : (i+1)*np]
		for p := range np {
			bi[p] = wt[i] * J[i*np+p] * f
		}
		for p := range np {
			for q := p; q < np; q++ {
				meat[p][q] += kd[i] * bi[p] * bi[q]
			}
		}
	}
	sep := pairsSeparable(sp, ch, b, np, &x)
	// The pairs (i, j) with i < j and j ≥ sep, one kernel each:
	// E_|τj−τi| = exp(−Γ·(τj − τi)) is the product of the factors between
	// neighbouring channels (the lags increase). Every term of the kernel
	// carries a factor of at most E (g_j = E·g_i), times lags and 1/Γ of at
	// most Γ·τ_max/Γ, and E only falls as i moves away from j, so the pairs
	// beyond E < pairCut, which add less than 1e-140 of the diagonal to
	// the sums, are left out.
	step := w.step
	for i := 1; i < m && sep < m; i++ {
		step[i] = math.Exp(-sp.gamma * (ch[i].tau - ch[i-1].tau))
	}
	const pairCut = 1e-150
	for j := sep; j < m; j++ {
		bj := b[j*np : (j+1)*np]
		var v [5]float64 // Σ_i R̃_ij·b_i
		eu := 1.0
		for i := j - 1; i >= 0; i-- {
			if eu *= step[i+1]; eu < pairCut {
				break
			}
			k := kc.kernel(&ch[i], &ch[j], eu)
			bi := b[i*np : (i+1)*np]
			for p := range np {
				v[p] += k * bi[p]
			}
		}
		for p := range np {
			for q := range np {
				x[p][q] += v[p] * bj[q]
			}
		}
	}
	for p := range np {
		for q := p; q < np; q++ {
			meat[p][q] += x[p][q] + x[q][p]
			meat[q][p] = meat[p][q]
		}
	}
	// cov = A⁻¹·meat·A⁻¹; the prediction needs tr(A⁻¹·meat).
	left := mul5(&ainv, &meat, np)
	pred := 0.0
	for p := range np {
		pred -= left[p][p]
	}
	cov := mul5(&left, &ainv, np)
	for i := range m {
		pred += wt[i] * d[i] * d[i]
	}
	ce := &CorrelatedErrors{Basis: basis, DOF: dof}
	if pred > 0 {
		ce.ResidualRatio = chi / pred
	}
	vg, vv, cgv := cov[2][2], cov[3][3], cov[2][3]
	ce.GammaSEPerS = math.Sqrt(math.Max(0, vg)) * g0
	dv, dg := 1.0, -2*v // PDI = v/g² at g = 1
	ce.PDISE = math.Sqrt(math.Max(0, dv*dv*vv+dg*dg*vg+2*dv*dg*cgv))
	if r.GammaSEPerS > 0 {
		ce.Inflation = ce.GammaSEPerS / r.GammaSEPerS
	}
	if !isFinite(ce.GammaSEPerS) || !isFinite(ce.PDISE) || !isFinite(ce.ResidualRatio) {
		return nil, fmt.Errorf("%w: non-finite covariance", ErrNoCorrelated)
	}
	return ce, nil
}

// sepMaxGammaTau bounds Γ·τ of the channels whose pairs pairsSeparable
// sums: there 1/G = e^(2Γτ) stays below 1e18, and the differences τj − τi
// formed from the prefix sums lose at most a factor 2Γτ ≤ 40 in relative
// precision. A variable only so that tests can move the boundary between
// the two ways of summing.
var sepMaxGammaTau = 20.0

// pairsSeparable adds to x the pair sum X = Σ_{i<j<sep} R̃_ij·b_i·b_jᵀ over
// the first sep channels (those with Γ·τ ≤ sepMaxGammaTau; ch by
// increasing lag, b rows of np) and returns sep. For τi < τj the kernel
// (noiseSpec.kernel, with E = g_j/g_i, G = g², g_i·g_j·E = G_j and
// min(G_i, G_j) = G_j) is a sum of six products of a function of i and
// one of j:
//
//	R̃_ij = (G_j/G_i)·[β²(τj − τi + 1/(2Γ)) + c1]
//	     + G_j·[4β³(τj − τi + 1/Γ) + c2]
//	     + G_i·G_j·[(β² − 2β³)(τi + τj) + β²/(2Γ) − 3β³/Γ + c1]
//
// with c1 = 2β/r and c2 = 4β²/r (0 without shot noise), so X is
// Σ_j Σ_t β_t(j)·P_t(j)·b_jᵀ with the prefix sums P_t(j) = Σ_{i<j} α_t(i)·b_i:
// O(sep) work instead of O(sep²) kernels (TestCorrelatedMatchesDirect).
func pairsSeparable(sp *noiseSpec, ch []noiseChannel, b []float64, np int, x *[5][5]float64) int {
	sep := 0
	for sep < len(ch) && sp.gamma*ch[sep].tau <= sepMaxGammaTau {
		sep++
	}
	sf := sp.sepFactors()
	var pre [6][5]float64
	for j := range sep {
		c := &ch[j]
		bj := b[j*np : (j+1)*np]
		if j > 0 {
			bt := sf.row(c)
			var v [5]float64
			for t, f := range bt {
				for p := range np {
					v[p] += f * pre[t][p]
				}
			}
			for p := range np {
				for q := range np {
					x[p][q] += v[p] * bj[q]
				}
			}
		}
		for t, f := range sf.col(c) {
			for p := range np {
				pre[t][p] += f * bj[p]
			}
		}
	}
	return sep
}

// sepFactors are the constants of the separable form of the kernel (see
// pairsSeparable): β², β³, 1/Γ, 2β/r, 4β²/r and the constant of the
// third term.
type sepFactors struct{ b2, b3, ih, c1, c2, k3 float64 }

func (sp *noiseSpec) sepFactors() sepFactors {
	be := sp.beta
	b2 := be * be
	b3 := b2 * be
	ih := 1 / sp.gamma
	var c1, c2 float64
	if r := sp.rate; r > 0 {
		c1, c2 = 2*be/r, 4*b2/r
	}
	return sepFactors{b2: b2, b3: b3, ih: ih, c1: c1, c2: c2, k3: b2*ih/2 - 3*b3*ih + c1}
}

// row returns the factors β_t(j) of channel j's row in the six terms.
func (f *sepFactors) row(c *noiseChannel) [6]float64 {
	b2, b3, ih := f.b2, f.b3, f.ih
	return [6]float64{
		c.G * (b2*c.tau + b2*ih/2 + f.c1), -b2 * c.G,
		c.G * (4*b3*(c.tau+ih) + f.c2), -4 * b3 * c.G,
		c.G * ((b2-2*b3)*c.tau + f.k3), (b2 - 2*b3) * c.G,
	}
}

// col returns the factors α_t(i) of channel i in the prefix sums.
func (f *sepFactors) col(c *noiseChannel) [6]float64 {
	iG := 1 / c.G
	return [6]float64{iG, c.tau * iG, 1, c.tau, c.G, c.G * c.tau}
}

// corrWork is the scratch space of correlated, reused through corrPool:
// every slice is written in full before it is read.
type corrWork struct {
	dts             []float64 // by lag
	ks              []int
	d, wt, kd, step []float64 // by fitted channel
	J, b            []float64 // rows of np
	ch              []noiseChannel
	keys            []int64 // sample-time keys of the lattices in use
	lats            []*noiseLattice
	buf             []float64
}

var corrPool = sync.Pool{New: func() any { return new(corrWork) }}

// grow sizes the slices for n lags, m fitted channels and np parameters.
func (w *corrWork) grow(n, m, np int) {
	need := n + 4*m + 2*m*np
	if cap(w.buf) < need {
		w.buf = make([]float64, need)
	}
	f := w.buf[:need]
	take := func(k int) []float64 {
		s := f[:k:k]
		f = f[k:]
		return s
	}
	w.dts = take(n)
	w.d, w.wt, w.kd, w.step = take(m), take(m), take(m), take(m)
	w.J, w.b = take(m*np), take(m*np)
	if cap(w.ks) < n {
		w.ks = make([]int, n)
	}
	w.ks = w.ks[:n]
	if cap(w.ch) < m {
		w.ch = make([]noiseChannel, m)
	}
	w.ch = w.ch[:m]
}

// latticeKey is the key of the lattice of sample time dt: the lag
// differences of one multi-tau stage agree to rounding, so they are keyed
// to 1e-9 relative.
func latticeKey(dt float64) int64 { return int64(math.Round(math.Log2(dt) * 1e9)) }

// channelSD is the model's standard deviation, relative to the baseline
// level, of the channel at lag tau with sample time dt (k sample times)
// for a measurement of durS seconds (0: per second of measurement, the lag
// neglected against the duration), coherence factor beta and count rate
// rateHz.
func (l *noiseLattice) channelSD(tau, dt float64, k int, beta, rateHz, durS float64) float64 {
	n := 1 / dt
	if durS > 0 {
		n = math.Max(1, (durS-tau)/dt)
	}
	return math.Sqrt(l.variance(k, beta, rateHz*dt, n))
}

// lattice returns the lattice in use with the given key, or nil.
func (w *corrWork) lattice(key int64) *noiseLattice {
	for i, k := range w.keys {
		if k == key {
			return w.lats[i]
		}
	}
	return nil
}

// addLattice puts the lattice of sample time dt in use under key, reusing
// the storage of an earlier one.
func (w *corrWork) addLattice(key int64, sp *noiseSpec, dt float64) *noiseLattice {
	i := len(w.keys)
	w.keys = append(w.keys, key)
	if i == len(w.lats) {
		w.lats = append(w.lats, &noiseLattice{})
	}
	w.lats[i].reset(sp, dt)
	return w.lats[i]
}

// mul5 is the product of the leading n×n blocks of a and b.
func mul5(a, b *[5][5]float64, n int) (c [5][5]float64) {
	for p := range n {
		for q := range n {
			s := 0.0
			for k := range n {
				s += a[p][k] * b[k][q]
			}
			c[p][q] = s
		}
	}
	return c
}
