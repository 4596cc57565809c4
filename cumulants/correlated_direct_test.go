package cumulants

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestCorrelatedMatchesDirect checks the pair sums of correlated (the
// pairs of channels with Γ·τ ≤ 20 through the six separable terms of the
// kernel and prefix sums, the others with one exponential per channel,
// products along the lags, pairs whose factor exp(−Γ·|τj − τi|) is below
// 1e-150 left out) against the direct evaluation of the same sandwich
// with one exponential and one kernel per pair (correlatedDirect): every
// basis, orders 2 and 3, a slow and a fast decay against the lag window
// (Γ·τ_max from about 4 to 1e4, so that the far channels' factors
// underflow). Tolerance 1e-11 relative: the two differ by rounding only,
// at most 1e-12 on these data (the standard errors are differences of
// the sandwich's terms, which magnify the rounding of its sums).
func TestCorrelatedMatchesDirect(t *testing.T) {
	tau := multiTauGrid(0.5e-6, 8, 200)
	for _, c := range []struct {
		name  string
		gamma float64
		order int
		sigma bool
		acq   Acquisition
	}{
		{"model", 2000, 2, false, Acquisition{DurationS: 10, CountRateHz: 2e5}},
		{"model, order 3", 2000, 3, false, Acquisition{DurationS: 10, CountRateHz: 2e5}},
		{"tail", 2000, 2, false, Acquisition{}},
		{"sigma", 2000, 2, true, Acquisition{DurationS: 10, CountRateHz: 2e5}},
		{"fast decay", 4e4, 2, false, Acquisition{DurationS: 100, CountRateHz: 3e5}},
		{"no shot noise", 500, 2, false, Acquisition{DurationS: 30}},
	} {
		t.Run(c.name, func(t *testing.T) {
			rng := rand.New(rand.NewPCG(7, 7))
			y := make([]float64, len(tau))
			var sigma []float64
			if c.sigma {
				sigma = make([]float64, len(tau))
			}
			for i, x := range tau {
				g := math.Exp(-c.gamma*x) * (1 + 0.05*c.gamma*c.gamma*x*x/2)
				y[i] = 1 + 0.9*g*g + 1e-3*rng.NormFloat64()
				if sigma != nil {
					sigma[i] = 1e-3
				}
			}
			s := DefaultSettings()
			s.Order = c.order
			r, err := Fit(tau, y, sigma, G2, &s)
			if err != nil {
				t.Fatal(err)
			}
			want, err := r.correlatedDirect(tau, G2, c.acq)
			if err != nil {
				t.Fatal(err)
			}
			// The default boundary of the separable sums, and two that put
			// it inside the decay, so that pairs across it are summed one
			// by one.
			defer func(v float64) { sepMaxGammaTau = v }(sepMaxGammaTau)
			for _, sepMax := range []float64{20, 1, 0.05} {
				sepMaxGammaTau = sepMax
				got, err := r.correlated(tau, G2, c.acq)
				if err != nil {
					t.Fatal(err)
				}
				compareCorrelated(t, sepMax, got, want)
			}
		})
	}
}

// compareCorrelated reports the standard errors of got that differ from
// want by more than 1e-11 relative.
func compareCorrelated(t *testing.T, sepMax float64, got, want *CorrelatedErrors) {
	t.Helper()
	for _, v := range []struct {
		name      string
		got, want float64
	}{
		{"Γ̄ SE", got.GammaSEPerS, want.GammaSEPerS},
		{"PDI SE", got.PDISE, want.PDISE},
		{"residual ratio", got.ResidualRatio, want.ResidualRatio},
		{"inflation", got.Inflation, want.Inflation},
	} {
		if math.Abs(v.got-v.want) > 1e-11*math.Abs(v.want) || !(v.want > 0) {
			t.Errorf("separable to Γτ %g: %s %.17g, direct %.17g", sepMax, v.name, v.got, v.want)
		}
	}
	if got.Basis != want.Basis || got.DOF != want.DOF {
		t.Errorf("basis %s, DOF %g; direct %s, %g", got.Basis, got.DOF, want.Basis, want.DOF)
	}
}

// correlatedDirect is correlated as first written: the kernel's
// exponential for every pair of channels and gonum's general matrix
// products, for TestCorrelatedMatchesDirect.
func (r *Result) correlatedDirect(tau []float64, kind Kind, acq Acquisition) (*CorrelatedErrors, error) {
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
	// at the solution, and the weights.
	np := 4
	if r.Order == 3 {
		np = 5
	}
	g0 := r.GammaPerS
	v := r.Mu2PerS2 / (g0 * g0)
	w3 := r.Mu3PerS3 / (g0 * g0 * g0)
	J := mat.NewDense(m, np, nil)
	wt := make([]float64, m)
	chi := 0.0
	for i, c := range idx {
		ti := tau[c] * g0
		ex := math.Exp(-ti)
		f := ex * (1 + v*ti*ti/2 - w3*ti*ti*ti/6)
		fe := f * f // g2 and g2 − 1: the model is B + β·f²
		bd := r.Intercept * 2 * f
		row := []float64{1, fe, bd * (-ti * f), bd * ex * ti * ti / 2, bd * ex * (-ti * ti * ti / 6)}
		for a := range np {
			J.Set(i, a, row[a])
		}
		wt[i] = 1 / (r.Sigma[c] * r.Sigma[c])
		chi += wt[i] * r.Residuals[c] * r.Residuals[c]
	}
	a := mat.NewSymDense(np, nil)
	for p := range np {
		for q := p; q < np; q++ {
			s := 0.0
			for i := range m {
				s += wt[i] * J.At(i, p) * J.At(i, q)
			}
			a.SetSym(p, q, s)
		}
	}
	var chol mat.Cholesky
	var ainv mat.SymDense
	if !chol.Factorize(a) || chol.InverseTo(&ainv) != nil {
		return nil, fmt.Errorf("%w: singular normal matrix", ErrNoCorrelated)
	}

	// Meat JᵀW·C·WJ with C_ij = D_i·D_j·R_ij, R from the continuous kernel.
	ch := make([]noiseChannel, m)
	kd := make([]float64, m)
	for i, c := range idx {
		ch[i] = sp.channel(tau[c], dts[c])
		kd[i] = sp.kernel(&ch[i], &ch[i]) + ch[i].shot
	}
	b := make([]float64, m*np) // rows of W·J·D/√kd
	for i := range m {
		f := 0.0
		if kd[i] > 0 {
			f = d[i] / math.Sqrt(kd[i])
		}
		for p := range np {
			b[i*np+p] = wt[i] * J.At(i, p) * f
		}
	}
	meat := mat.NewSymDense(np, nil)
	mt := make([]float64, np*np)
	for i := range m {
		bi := b[i*np : (i+1)*np]
		for p := range np {
			for q := p; q < np; q++ {
				mt[p*np+q] += kd[i] * bi[p] * bi[q]
			}
		}
		for j := i + 1; j < m; j++ {
			k := sp.kernel(&ch[i], &ch[j])
			bj := b[j*np : (j+1)*np]
			for p := range np {
				for q := p; q < np; q++ {
					mt[p*np+q] += k * (bi[p]*bj[q] + bj[p]*bi[q])
				}
			}
		}
	}
	for p := range np {
		for q := p; q < np; q++ {
			meat.SetSym(p, q, mt[p*np+q])
		}
	}
	var left, cov mat.Dense
	left.Mul(&ainv, meat)
	cov.Mul(&left, &ainv)
	var tr mat.Dense
	tr.Mul(&ainv, meat)
	pred := -mat.Trace(&tr)
	for i := range m {
		pred += wt[i] * d[i] * d[i]
	}
	ce := &CorrelatedErrors{Basis: basis, DOF: dof}
	if pred > 0 {
		ce.ResidualRatio = chi / pred
	}
	vg, vv, cgv := cov.At(2, 2), cov.At(3, 3), cov.At(2, 3)
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

// TestLatticeSumsMatchDirect checks the closed forms of the lattice sums
// (noiseLattice.sums, S1 and S2) against direct summation of the
// products over the points and the geometric tails beyond them
// (sumProdDirect), for lag indices 1–40 and Γ·Δt from 1e-4 to 800 (where
// e^(lf) itself would overflow). Tolerance 1e-13 relative: both sum
// positive terms; they differ by rounding.
func TestLatticeSumsMatchDirect(t *testing.T) {
	for _, g := range []float64{1e-4, 0.003, 0.1, 0.7, 3, 50, 800} {
		sp := &noiseSpec{gamma: 1, beta: 0.9, rate: 2e5}
		l := newNoiseLattice(sp, g)
		check := func(what string, got float64, c []int) {
			t.Helper()
			want := sumProdDirect(l, c)
			if math.Abs(got-want) > 1e-13*math.Abs(want) || math.IsNaN(got) {
				t.Errorf("Γ·Δt %g, %s over %v: %.17g, direct %.17g", g, what, c, got, want)
			}
		}
		check("S1", l.s1, []int{0, 0})
		check("S2", l.s2, []int{0, 0, 0, 0})
		for k := 1; k <= 40; k++ {
			tk, t2k, u, w := l.sums(k)
			check("T(k)", tk, []int{0, k})
			check("T(2k)", t2k, []int{-k, k})
			check("U", u, []int{k, k, -k, -k})
			check("W", w, []int{0, 0, k, -k})
		}
	}
}

// sumProdDirect returns Σ_d Π_i γ(d − c_i) over all integers d: the middle
// part by direct summation, the two geometric tails beyond the points in
// closed form (each factor there is exp(lf − g·|d − c_i|)).
func sumProdDirect(l *noiseLattice, c []int) float64 {
	lo, hi := c[0], c[0]
	for _, x := range c {
		lo, hi = min(lo, x), max(hi, x)
	}
	s := 0.0
	for d := lo; d <= hi; d++ {
		p := 1.0
		for _, x := range c {
			p *= l.gamma(d - x)
		}
		s += p
	}
	n := float64(len(c))
	var er, el float64
	for _, x := range c {
		er += float64(x - (hi + 1))
		el += float64((lo - 1) - x)
	}
	return s + (math.Exp(n*l.lf+l.g*er)+math.Exp(n*l.lf+l.g*el))/-math.Expm1(-n*l.g)
}
