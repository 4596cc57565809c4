package cumulants

import (
	"fmt"
	"math"
)

// ChannelNoise is the covariance of a correlogram's channel noise under
// the correlator model that CorrelatedErrors uses (Schätzel 1990: one
// decay rate Γ̄, speckle, fourth cumulant, monitor normalisation and shot
// noise), C = D·R·D over the channels from a first lag on, in the units of
// the data: what a functional of the data that is linear in it (the
// peaks of an inversion, say) needs for its variance v'·C·v. It is not
// safe for concurrent use.
type ChannelNoise struct {
	// Basis says where D comes from: BasisSigma, BasisModel or BasisTail,
	// as for CorrelatedErrors.
	Basis string

	sp          noiseSpec
	kc          kernelConsts
	ch          []noiseChannel
	kd, f, step []float64    // kernel diagonal, D/√kd, exp(−Γ·Δτ) to the channel before
	b           []float64    // scratch of Quad
	bt, al      [][6]float64 // separable kernel terms of the channels with Γ·τ ≤ quadSepGammaTau
	deep        int          // first channel with Γ·τ > deepGammaTau (m: none)
}

// ChannelNoise returns the channel-noise covariance of the data that r
// was fitted to (tau all lags, as for Fit), over the channels from..end.
// D is the σ given with the data; else the model's lattice variances for
// the stated duration and count rate; else those of the model without a
// duration, scaled to the residuals of the far channels (as
// CorrelatedErrors). Like CorrelatedErrors it covers the nonlinear fit of
// g2 or g2 − 1 data; errors wrap ErrNoCorrelated.
func (r *Result) ChannelNoise(tau []float64, kind Kind, acq Acquisition, from int) (*ChannelNoise, error) {
	n := len(tau)
	if from < 0 || from >= n || len(r.Sigma) != n || len(r.Residuals) != n {
		return nil, fmt.Errorf("%w: channels %d… of %d lags", ErrNoCorrelated, from, n)
	}
	level, beta, err := r.noiseLevel(kind, acq)
	if err != nil {
		return nil, err
	}
	cn := &ChannelNoise{sp: noiseSpec{gamma: r.GammaPerS, beta: beta, rate: acq.CountRateHz}}
	sp := &cn.sp
	dts := make([]float64, n)
	ks := make([]int, n)
	sampleTimesTo(tau, dts, ks)
	// lattice variance of channel c for a duration durS (0: per second).
	lats := map[int64]*noiseLattice{}
	modelSD := func(c int, durS float64) float64 {
		key := latticeKey(dts[c])
		l := lats[key]
		if l == nil {
			l = newNoiseLattice(sp, dts[c])
			lats[key] = l
		}
		return level * l.channelSD(tau[c], dts[c], ks[c], beta, acq.CountRateHz, durS)
	}
	m := n - from
	d := make([]float64, m)
	switch {
	case !r.SigmaEstimated:
		cn.Basis = BasisSigma
		copy(d, r.Sigma[from:])
	case acq.DurationS > 0 && acq.CountRateHz > 0:
		cn.Basis = BasisModel
		for i := range d {
			d[i] = modelSD(from+i, acq.DurationS)
		}
	case r.farFitted:
		cn.Basis = BasisTail
		idx := fitChannels(r.FitFirst, r.FitLast, n, r.tailN, r.farFitted)
		f, _, err := r.tailScale(idx, func(i int) float64 { return modelSD(idx[i], 0) })
		if err != nil {
			return nil, err
		}
		for i := range d {
			d[i] = f * modelSD(from+i, 0)
		}
	default:
		return nil, fmt.Errorf("%w: the duration is not given and the baseline not reached", ErrNoCorrelated)
	}
	cn.kc = sp.consts()
	cn.ch = make([]noiseChannel, m)
	cn.kd, cn.f, cn.step, cn.b = make([]float64, m), make([]float64, m), make([]float64, m), make([]float64, m)
	for i := range m {
		cn.ch[i] = sp.channel(tau[from+i], dts[from+i])
		cn.kd[i] = cn.kc.kernel(&cn.ch[i], &cn.ch[i], 1) + cn.ch[i].shot
		if cn.kd[i] > 0 {
			cn.f[i] = d[i] / math.Sqrt(cn.kd[i])
		}
		if i > 0 {
			cn.step[i] = math.Exp(-sp.gamma * (cn.ch[i].tau - cn.ch[i-1].tau))
		}
	}
	cn.sepCoef()
	cn.deep = m
	for i := range m {
		if sp.gamma*cn.ch[i].tau > deepGammaTau {
			cn.deep = i
			break
		}
	}
	return cn, nil
}

// sepCoef sets the factors of pairsSeparable's six separable terms for
// each channel up to Γ·τ = quadSepGammaTau: the row factors β_t(j) and the
// column factors α_t(i) of its prefix sums, in its order of operations.
func (cn *ChannelNoise) sepCoef() {
	sf := cn.sp.sepFactors()
	cn.bt, cn.al = cn.bt[:0], cn.al[:0]
	for j := range cn.ch {
		c := &cn.ch[j]
		if cn.sp.gamma*c.tau > quadSepGammaTau {
			break
		}
		cn.bt = append(cn.bt, sf.row(c))
		cn.al = append(cn.al, sf.col(c))
	}
}

// deepGammaTau is the Γ·τ beyond which Quad sums a channel's pairs by its
// recurrence (g(τ) = exp(−Γτ) < 1e-17 there), and quadSepGammaTau the Γ·τ
// up to which it sums them through the separable kernel. Variables only so
// that tests can move them.
var (
	deepGammaTau    = 40.0
	quadSepGammaTau = 40.0
)

// Quad returns v'·C·v for v over the channels (len: the number of
// channels from the first lag asked for), in O(m). Pairs of channels with
// Γ·τ ≤ 40 are summed through the separable form of the kernel, as in
// CorrelatedErrors (there up to Γ·τ = 20: from 40 the prefix sums'
// differences keep about 14 digits rather than 15). Beyond Γ·τ = 40 every
// term of the kernel of a pair (i < j) but one carries G_j = g(τj)² <
// 1e-34, so the row takes that one, E²·(β²·(τj − τi + 1/(2Γ)) + 2β/r) with
// E = exp(−Γ·(τj − τi)), by a recurrence along the lags over every
// channel before it.
func (cn *ChannelNoise) Quad(v []float64) float64 {
	m := len(cn.ch)
	if len(v) != m {
		panic("cumulants: ChannelNoise.Quad: vector length differs from the channels")
	}
	b := cn.b
	diag := 0.0
	for i, x := range v {
		b[i] = x * cn.f[i]
		diag += cn.kd[i] * b[i] * b[i]
	}
	// pairsSeparable's sums for one column, with each channel's factors
	// computed once (sepCoef).
	sep := len(cn.al)
	off := 0.0
	var pre [6]float64
	for j := range sep {
		bt, al := &cn.bt[j], &cn.al[j]
		if j > 0 {
			v := 0.0
			for t, f := range bt {
				v += f * pre[t]
			}
			off += v * b[j]
		}
		for t, f := range al {
			pre[t] += f * b[j]
		}
	}
	// Channels the separable sums leave (only when quadSepGammaTau is moved
	// below deepGammaTau, as the tests do): one kernel per pair.
	ts := max(cn.deep, sep)
	for j := sep; j < ts; j++ {
		acc, eu := 0.0, 1.0
		for i := j - 1; i >= 0; i-- {
			eu *= cn.step[i+1]
			acc += cn.kc.kernel(&cn.ch[i], &cn.ch[j], eu) * b[i]
		}
		off += acc * b[j]
	}
	b2 := cn.sp.beta * cn.sp.beta
	ih2 := 1 / (2 * cn.sp.gamma)
	c1 := cn.kc.twoBR
	var s0, s1 float64 // Σ_{i<j} E_ij²·b_i and E_ij²·τ_i·b_i
	for j := 1; j < m; j++ {
		q := cn.step[j] * cn.step[j]
		s0 = q * (s0 + b[j-1])
		s1 = q * (s1 + cn.ch[j-1].tau*b[j-1])
		if j >= ts {
			off += b[j] * ((b2*(cn.ch[j].tau+ih2)+c1)*s0 - b2*s1)
		}
	}
	return diag + 2*off
}
