package cumulants

import (
	"errors"
	"fmt"
	"math"

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

// correlated computes the standard errors under the correlator noise model.
func (r *Result) correlated(tau []float64, kind Kind, acq Acquisition) (*CorrelatedErrors, error) {
	switch {
	case r.Method != Nonlinear:
		return nil, fmt.Errorf("%w for the %s method", ErrNoCorrelated, r.Method)
	case kind == G1:
		return nil, fmt.Errorf("%w for g1 data", ErrNoCorrelated)
	case !(r.GammaPerS > 0) || !(r.Intercept > 0):
		return nil, fmt.Errorf("%w: no positive decay rate and intercept", ErrNoCorrelated)
	}
	if !(acq.DurationS >= 0) || !(acq.CountRateHz >= 0) || math.IsInf(acq.DurationS, 0) || math.IsInf(acq.CountRateHz, 0) {
		return nil, fmt.Errorf("%w: duration %g s or count rate %g /s is not a non-negative number", ErrNoCorrelated, acq.DurationS, acq.CountRateHz)
	}
	// The noise of g2 scales with its baseline level.
	level := r.Baseline
	if kind == G2Minus1 {
		level = 1 + r.Baseline
	}
	if !(level > 0) {
		return nil, fmt.Errorf("%w: baseline level %g is not positive", ErrNoCorrelated, level)
	}
	beta := math.Min(r.Intercept/level, 1)
	sp := &noiseSpec{gamma: r.GammaPerS, beta: beta, rate: acq.CountRateHz}
	idx := fitChannels(r.FitFirst, r.FitLast, len(tau), r.tailN, r.farFitted)
	m := len(idx)
	dts, ks := sampleTimes(tau)

	// Channel standard deviations D in the units of the data.
	d := make([]float64, m)
	// model fills d from the lattice variances for a duration durS (0: per
	// second of measurement, lags neglected against the duration).
	model := func(durS float64) {
		// One lattice per sample time (the lag differences of one stage
		// agree to rounding: key them to 1e-9 relative).
		lat := map[int64]*noiseLattice{}
		for i, c := range idx {
			key := int64(math.Round(math.Log2(dts[c]) * 1e9))
			l := lat[key]
			if l == nil {
				l = newNoiseLattice(sp, dts[c])
				lat[key] = l
			}
			n := 1 / dts[c]
			if durS > 0 {
				n = math.Max(1, (durS-tau[c])/dts[c])
			}
			d[i] = level * math.Sqrt(l.variance(ks[c], beta, acq.CountRateHz*dts[c], n))
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
		ss, nt := 0.0, 0
		for i, c := range idx {
			if c > r.FitLast && d[i] > 0 {
				z := r.Residuals[c] / d[i]
				ss += z * z
				nt++
			}
		}
		if nt < 5 || !(ss > 0) {
			return nil, fmt.Errorf("%w: duration_s not given and too few far channels to scale the noise model", ErrNoCorrelated)
		}
		f := math.Sqrt(ss / float64(nt-1))
		for i := range d {
			d[i] *= f
		}
		dof = float64(nt - 1)
	default:
		return nil, fmt.Errorf("%w: the duration is not given and the baseline not reached", ErrNoCorrelated)
	}

	// Jacobian in the fit's scaled parameters (B, β, Γ/Γ̄, μ2/Γ̄², μ3/Γ̄³)
	// at the solution (rows of np), and the weights.
	np := 4
	if r.Order == 3 {
		np = 5
	}
	g0 := r.GammaPerS
	v := r.Mu2PerS2 / (g0 * g0)
	w3 := r.Mu3PerS3 / (g0 * g0 * g0)
	J := make([]float64, m*np)
	wt := make([]float64, m)
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
	// continuous kernel: B holds the rows of W·J·D/√kd, and R̃·B is
	// accumulated pair by pair (R̃ symmetric, its diagonal kd).
	ch := make([]noiseChannel, m)
	kd := make([]float64, m)
	for i, c := range idx {
		ch[i] = sp.channel(tau[c], dts[c])
		kd[i] = sp.kernel(&ch[i], &ch[i]) + ch[i].shot
	}
	b := make([]float64, m*np)  // rows of W·J·D/√kd
	kb := make([]float64, m*np) // rows of R̃·B
	for i := range m {
		f := 0.0
		if kd[i] > 0 {
			f = d[i] / math.Sqrt(kd[i])
		}
		for p := range np {
			b[i*np+p] = wt[i] * J[i*np+p] * f
			kb[i*np+p] = kd[i] * b[i*np+p]
		}
	}
	// E_|τj−τi| = exp(−Γ·(τj − τi)) for j > i is the product of the
	// factors between neighbouring channels (m exponentials instead of one
	// per pair; the lags increase). Every term of the kernel carries a
	// factor of at most E_|τj−τi| (g_j ≤ E·g_i), and E only falls as j
	// moves on, so the pairs beyond E < pairCut add below 1e-150 of the
	// diagonal to the sums and are left out.
	step := make([]float64, m)
	for i := 1; i < m; i++ {
		step[i] = math.Exp(-sp.gamma * (ch[i].tau - ch[i-1].tau))
	}
	const pairCut = 1e-150
	kc := sp.consts()
	for i := range m {
		bi := b[i*np : (i+1)*np]
		ki := kb[i*np : (i+1)*np]
		eu := 1.0
		for j := i + 1; j < m; j++ {
			eu *= step[j]
			if eu < pairCut {
				break
			}
			k := kc.kernel(&ch[i], &ch[j], eu)
			bj := b[j*np : (j+1)*np]
			kj := kb[j*np : (j+1)*np]
			for p := range np {
				ki[p] += k * bj[p]
				kj[p] += k * bi[p]
			}
		}
	}
	var meat [5][5]float64
	for p := range np {
		for q := p; q < np; q++ {
			s := 0.0
			for i := range m {
				s += b[i*np+p] * kb[i*np+q]
			}
			meat[p][q], meat[q][p] = s, s
		}
	}
	// cov = A⁻¹·meat·A⁻¹; the prediction needs tr(A⁻¹·meat).
	var left, cov [5][5]float64
	pred := 0.0
	for p := range np {
		for q := range np {
			s := 0.0
			for k := range np {
				s += ainv[p][k] * meat[k][q]
			}
			left[p][q] = s
		}
		pred -= left[p][p]
	}
	for p := range np {
		for q := range np {
			s := 0.0
			for k := range np {
				s += left[p][k] * ainv[k][q]
			}
			cov[p][q] = s
		}
	}
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
