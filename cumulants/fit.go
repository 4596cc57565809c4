package cumulants

import (
	"fmt"
	"math"
	"sort"
)

// Kind says which correlation function the data hold.
type Kind int

// Correlation kinds. The zero value is not a kind.
const (
	G2       Kind = iota + 1 // normalised intensity autocorrelation g2 = B + β·g1², baseline ≈ 1
	G2Minus1                 // g2 − 1, baseline ≈ 0
	G1                       // field autocorrelation g1 (times an amplitude, plus an offset), baseline ≈ 0
)

func (k Kind) String() string {
	switch k {
	case G2:
		return "g2"
	case G2Minus1:
		return "g2-1"
	case G1:
		return "g1"
	}
	return fmt.Sprintf("Kind(%d)", int(k))
}

// nominalBaseline is the baseline of an ideal correlogram of kind k.
func (k Kind) nominalBaseline() float64 {
	if k == G2 {
		return 1
	}
	return 0
}

// LinearEstimate holds the values of the classic linear fit of ln(g2 − B)
// with the far-channel baseline fixed. It is always computed (it starts the
// nonlinear fit) and reported beside the chosen method's values.
type LinearEstimate struct {
	GammaPerS float64
	Mu2PerS2  float64
	PDI       float64
	Intercept float64
	Points    int // channels above 3σ that entered
}

// Result is the outcome of one cumulant fit. Rates are field decay rates in
// 1/s. Correlation-valued fields (Baseline, Fitted, Residuals, ResidualRMS)
// are in the units of the data y.
type Result struct {
	Method Method
	Order  int

	GammaPerS   float64 // Γ̄, the intensity-weighted mean decay rate
	GammaSEPerS float64 // standard error of Γ̄ from the fit
	Mu2PerS2    float64 // second cumulant μ2
	Mu3PerS3    float64 // third cumulant μ3; 0 at order 2
	PDI         float64 // polydispersity index μ2/Γ̄²
	PDISE       float64 // standard error of the PDI from the fit
	Intercept   float64 // coherence factor β (amplitude of g1 for g1 input)
	Baseline    float64 // fitted baseline B (fixed at FarBaseline for the linear method)

	// FarBaseline is the mean of the far channels; BaselineReached is false
	// when the correlation had not decayed there.
	FarBaseline     float64
	BaselineReached bool

	ResidualRMS    float64 // rms of data − model over the fit range
	ReducedChi2    float64 // Σ(r/σ)²/(points − parameters) over the fit range
	SigmaEstimated bool    // σ was estimated from the data, not given

	FitFirst, FitLast int // indices of the first and last channel fitted
	PointsUsed        int
	Iterations        int
	Converged         bool

	// RangeShift is the largest relative change of Γ̄ when the range end is
	// moved by ±25 %; RangeChecked says whether the check ran.
	RangeShift   float64
	RangeChecked bool

	Linear LinearEstimate

	// Correlated holds the standard errors under the noise model of a
	// photon correlator (FitCorrelated); nil from Fit, or when the model
	// does not apply (see FitCorrelated).
	Correlated *CorrelatedErrors
	// Truncation is the estimate of the second-order truncation bias
	// (FitCorrelated at order 2); nil otherwise.
	Truncation *Truncation
	// Unavailable says why Correlated or Truncation is nil after
	// FitCorrelated. These are not warnings about the fit.
	Unavailable []error

	Fitted    []float64 // model at every lag
	Residuals []float64 // data − model at every lag
	// Sigma is the standard uncertainty of each data point used as weight:
	// the σ given, or the local estimate (SigmaEstimated).
	Sigma    []float64
	Warnings []error

	farFitted bool // the far channels joined the nonlinear fit
	tailN     int  // number of far channels
}

// skipUnreadCov leaves out the covariance of fits whose standard errors
// are not read (prepared.skipCov). A variable only so that tests can
// compare with computing every covariance.
var skipUnreadCov = true

// rangeShiftLimit is the relative change of Γ̄ under the range check above
// which a warning is given (common practice: about 2 %).
const rangeShiftLimit = 0.02

// Fit runs a cumulant analysis of one correlogram: lag times tau in s,
// strictly increasing and positive; correlation values y of the given kind,
// one per lag; and optionally their standard uncertainties sigma (nil when
// not known: σ is then estimated from the data). A nil s means
// DefaultSettings.
//
// Errors about the data wrap one of the sentinels of this package; when
// they concern one point (a bad value, the start of a fit range that cannot
// be fitted) they are a *PointError carrying its index. Invalid settings
// give the error of Settings.Validate. Fit panics when the slices' lengths
// differ or kind is not G2, G2Minus1 or G1.
func Fit(tau, y, sigma []float64, kind Kind, s *Settings) (*Result, error) {
	return fit(tau, y, sigma, kind, s, false)
}

// fit is Fit; with noSE it computes no covariance at all (GammaSEPerS and
// PDISE stay 0, and the warning on a negative PDI compares with 1e-4
// alone), for callers that read only the fitted values.
func fit(tau, y, sigma []float64, kind Kind, s *Settings, noSE bool) (*Result, error) {
	if len(y) != len(tau) || (sigma != nil && len(sigma) != len(tau)) {
		panic("cumulants: lag, correlation and sigma lengths differ")
	}
	if kind != G2 && kind != G2Minus1 && kind != G1 {
		panic(fmt.Sprintf("cumulants: unknown correlation kind %d", int(kind)))
	}
	if s == nil {
		d := DefaultSettings()
		s = &d
	}
	if err := s.Validate(); err != nil {
		return nil, err
	}
	p, err := prepare(tau, y, sigma, kind, s)
	if err != nil {
		return nil, err
	}
	// Without σ the first fit only sets up the second: its standard
	// errors are wanted only if the second fails.
	p.skipCov = (p.sigmaEstimated || noSE) && skipUnreadCov
	p.noCurves = noSE && !p.sigmaEstimated && !s.RangeCheck && skipUnreadCov
	res, err := p.fit(s, p.last)
	p.skipCov = noSE && skipUnreadCov
	if err != nil {
		return nil, p.pointErr(p.first, err)
	}
	if p.sigmaEstimated {
		// Without σ the first fit weighted every channel alike. The noise of
		// a multi-tau correlator changes by orders of magnitude along the lag
		// axis (short sample times carry shot noise, long ones average it
		// away), so estimate σ locally from the first fit's residuals and fit
		// again with those weights, starting from the first fit.
		sigma0 := p.sigma
		p.sigma = LocalSigma(res.Residuals, p.first, res.FitLast, 1e-6*p.amp)
		p.start = res
		res2, err := p.fit(s, p.last)
		p.start = nil
		if err == nil {
			res = res2
		} else {
			// Keep the first fit, now with its standard errors (the same
			// fit again: same weights, same start). The range check
			// below then weights with the local σ, as it always has.
			local := p.sigma
			p.sigma = sigma0
			if res1, err1 := p.fit(s, p.last); err1 == nil {
				res = res1
			}
			p.sigma = local
		}
		res.SigmaEstimated = true
	}
	res.FarBaseline = p.farBase
	res.tailN = p.tailN
	res.BaselineReached = p.baseReached
	if !p.baseReached {
		res.Warnings = append(res.Warnings, fmt.Errorf("baseline not reached: the correlation has not decayed by the last channels (g1 ≈ %.2g there)", p.g1Tail))
	}
	if s.RangeCheck {
		p.rangeCheck(s, res)
	}
	// A PDI below zero by more than three standard errors (or 1e-4,
	// whichever is larger) cannot be a distribution's variance; nearer
	// zero it is the noise of a narrow sample.
	if res.PDI < -math.Max(3*res.PDISE, 1e-4) {
		res.Warnings = append(res.Warnings, fmt.Errorf("negative second cumulant (PDI %.3g ± %.2g): noise, or a fit range too short; reported as fitted", res.PDI, res.PDISE))
	}
	return res, nil
}

// prepared holds the data of one fit in the units of y together with the
// estimates that set up the fit.
type prepared struct {
	tau   []float64
	y     []float64
	sigma []float64
	e     int // power of g1 in the model: 2 for g2 and g2m1, 1 for g1

	sigmaEstimated bool
	farBase        float64
	amp            float64 // β₀: y − B₀ at the first channels
	first, last    int     // fit range, inclusive
	baseReached    bool
	g1Tail         float64
	tailN          int     // number of far channels
	start          *Result // warm start of a refit
	fixBase        bool    // hold the baseline at start.Baseline
	// skipCov leaves out the covariance (GammaSEPerS and PDISE stay 0) of
	// a fit whose standard errors nobody reads: the equal-weight first
	// pass, and range-check refits whose shift is within rangeShiftLimit.
	skipCov bool
	// Scratch space of nonlinear: channel indices, and lags, values and
	// weights of the points fitted (three blocks of cap(idxBuf)).
	idxBuf []int
	ptBuf  []float64
	logY   []float64 // ln(y − farBase) by channel once computed, else NaN (logResidual)
	// noCurves leaves out the model curve, residuals and goodness of fit
	// of a nonlinear fit (Fitted, Residuals, ResidualRMS, ReducedChi2 stay
	// empty): for fits of given σ whose fitted values alone are read.
	noCurves bool
}

// pointErr ties err to point i; an index past the data (no channel at or
// above the minimum lag) ties it to none.
func (p *prepared) pointErr(i int, err error) error {
	if i < 0 || i >= len(p.tau) {
		return err
	}
	return &PointError{Index: i, Err: err}
}

func prepare(tau, y, sigma []float64, kind Kind, s *Settings) (*prepared, error) {
	n := len(tau)
	p := &prepared{tau: tau, y: y, e: 2}
	if kind == G1 {
		p.e = 1
	}
	for i := 0; i < n; i++ {
		if !isFinite(tau[i]) || !isFinite(y[i]) || (sigma != nil && !isFinite(sigma[i])) {
			return nil, p.pointErr(i, fmt.Errorf("value is %w", ErrNonFinite))
		}
		if tau[i] <= 0 || (i > 0 && tau[i] <= tau[i-1]) {
			return nil, p.pointErr(i, fmt.Errorf("%w: lag times must be positive and increasing", ErrBadLag))
		}
		if sigma != nil && sigma[i] <= 0 {
			return nil, p.pointErr(i, fmt.Errorf("sigma %g: %w", sigma[i], ErrBadSigma))
		}
	}
	first := sort.SearchFloat64s(tau, s.MinTauS)
	if n-first < s.MinPoints {
		return nil, p.pointErr(first, fmt.Errorf("%w: %d channels at or above the minimum lag, need %d", ErrTooFewPoints, n-first, s.MinPoints))
	}
	p.first = first

	// Far channels: the last tenth, at least five.
	nt := max(5, (n-first)/10)
	p.tailN = nt
	tail := y[n-nt:]
	p.farBase = mean(tail)
	var tailSigma float64
	if sigma != nil {
		tailSigma = median(sigma[n-nt:])
	} else {
		tailSigma = diffNoise(tail)
	}

	// Noise at the first channels, where a multi-tau correlator is noisiest:
	// from σ if given, else from successive differences of up to 16
	// channels (the decay changes little over them unless it is faster
	// than the lag window resolves, which the range test below catches).
	hn := min(16, n-first)
	headSigma := diffNoise(y[first : first+hn])
	if sigma != nil {
		headSigma = median(sigma[first : first+hn])
	}
	// The intercept estimate averages the first 3 channels, or more (up to
	// 16) while their noise exceeds 5 % of the amplitude: at low count
	// rates the first channels are mostly shot noise.
	headN := min(3, n-first)
	head := mean(y[first : first+headN])
	for headN < hn && headSigma/math.Sqrt(float64(headN)) > 0.05*math.Abs(head-p.farBase) {
		headN++
		head = mean(y[first : first+headN])
	}
	nom := kind.nominalBaseline()
	headAmp, tailAmp := head-nom, p.farBase-nom
	if headAmp > 0 && tailAmp > 0.5*headAmp && headAmp > 5*tailSigma {
		return nil, p.pointErr(n-1, fmt.Errorf("%w within the lag window: the last channels are still at %.0f %% of the first (lags to %.3g s)", ErrNoDecay, 100*tailAmp/headAmp, tau[n-1]))
	}
	p.amp = head - p.farBase
	if !(p.amp > 5*tailSigma) || !(p.amp > 5*headSigma/math.Sqrt(float64(headN))) {
		return nil, p.pointErr(first, fmt.Errorf("%w: first channels %.4g ± %.2g, far channels %.4g ± %.2g", ErrNoSignal, head, headSigma/math.Sqrt(float64(headN)), p.farBase, tailSigma))
	}

	if sigma != nil {
		p.sigma = sigma
	} else {
		// Noise-free input would give σ = 0; floor it at 1e-6 of the
		// amplitude so that weights stay finite.
		sg := math.Max(tailSigma, 1e-6*p.amp)
		p.sigma = make([]float64, n)
		for i := range p.sigma {
			p.sigma[i] = sg
		}
		p.sigmaEstimated = true
	}

	// End of the fit range: the channel before g1 first stays below the
	// cutoff for two channels in a row.
	g1 := func(i int) float64 {
		v := (y[i] - p.farBase) / p.amp
		if v <= 0 {
			return 0
		}
		if p.e == 2 {
			return math.Sqrt(v)
		}
		return v
	}
	last := n - 1
	for i := first; i < n-1; i++ {
		if g1(i) < s.Cutoff && g1(i+1) < s.Cutoff {
			last = i - 1
			break
		}
	}
	if last-first+1 < s.MinPoints {
		return nil, p.pointErr(first, fmt.Errorf("%w: only %d channels before g1 falls below %.2g, need %d; the decay is too fast for the lag window (first lag %.3g s)", ErrTooFewPoints, last-first+1, s.Cutoff, s.MinPoints, tau[first]))
	}
	p.last = last
	// The baseline is reached when g1 had fallen below 0.05 before the far
	// channels begin.
	p.baseReached = false
	for i := first; i < n-nt; i++ {
		if g1(i) < 0.05 {
			p.baseReached = true
			break
		}
	}
	p.g1Tail = g1(n - nt)
	return p, nil
}

// fit runs the configured method over channels p.first..last.
func (p *prepared) fit(s *Settings, last int) (*Result, error) {
	lin, cov, err := p.linear(s.Order, last, s.Method == Linear)
	if err != nil {
		return nil, err
	}
	r := &Result{Method: s.Method, Order: s.Order, FitFirst: p.first, FitLast: last, PointsUsed: last - p.first + 1, Linear: lin}
	switch s.Method {
	case Linear:
		r.GammaPerS, r.Mu2PerS2, r.PDI, r.Intercept = lin.GammaPerS, lin.Mu2PerS2, lin.PDI, lin.Intercept
		r.Mu3PerS3 = cov.mu3
		r.Baseline = p.farBase
		r.Converged = true
		r.PointsUsed = lin.Points
		p.finish(r, last, 3+s.Order-2)
		r.GammaSEPerS, r.PDISE = cov.seGamma*math.Sqrt(r.scaleChi()), cov.sePDI*math.Sqrt(r.scaleChi())
	case Nonlinear:
		if err := p.nonlinear(s, lin, last, r); err != nil {
			return nil, err
		}
	}
	return r, nil
}

// scaleChi is the factor applied to the covariance: the reduced χ² when σ
// was estimated, else 1.
func (r *Result) scaleChi() float64 {
	if r.SigmaEstimated && r.ReducedChi2 > 0 {
		return r.ReducedChi2
	}
	return 1
}

// finish fills the model curve, residuals and goodness of fit.
func (p *prepared) finish(r *Result, last, nParams int) {
	n := len(p.tau)
	r.Fitted = make([]float64, n)
	r.Residuals = make([]float64, n)
	var ss, chi float64
	for i := 0; i < n; i++ {
		t := p.tau[i]
		f := math.Exp(-r.GammaPerS*t) * (1 + r.Mu2PerS2*t*t/2 - r.Mu3PerS3*t*t*t/6)
		if p.e == 2 {
			f *= f
		}
		r.Fitted[i] = r.Baseline + r.Intercept*f
		r.Residuals[i] = p.y[i] - r.Fitted[i]
		if i >= p.first && i <= last {
			ss += r.Residuals[i] * r.Residuals[i]
			z := r.Residuals[i] / p.sigma[i]
			chi += z * z
		}
	}
	k := last - p.first + 1
	r.ResidualRMS = math.Sqrt(ss / float64(k))
	if k > nParams {
		r.ReducedChi2 = chi / float64(k-nParams)
	}
	r.SigmaEstimated = p.sigmaEstimated
	r.Sigma = p.sigma
}

// rangeCheck refits with the end of the range moved by ±25 % of its length.
func (p *prepared) rangeCheck(s *Settings, r *Result) {
	span := r.FitLast - p.first
	ends := []int{p.first + int(math.Round(0.75*float64(span))), min(len(p.tau)-1, p.first+int(math.Round(1.25*float64(span))))}
	shift := 0.0
	significant := false
	ran := false
	p.start, p.fixBase = r, true
	defer func() { p.start, p.fixBase = nil, false }()
	for _, end := range ends {
		if end == r.FitLast || end-p.first+1 < s.MinPoints {
			continue
		}
		// The refit's standard error enters only the test of a shift above
		// rangeShiftLimit: fit without it first, and again with it (the
		// same fit, now with its covariance) when the shift is that large.
		p.skipCov = skipUnreadCov
		alt, err := p.fit(s, end)
		p.skipCov = false
		if err != nil || !(alt.GammaPerS > 0) {
			continue
		}
		ran = true
		d := math.Abs(alt.GammaPerS - r.GammaPerS)
		shift = math.Max(shift, d/r.GammaPerS)
		if !(d/r.GammaPerS > rangeShiftLimit) {
			continue
		}
		if alt, err = p.fit(s, end); err != nil {
			continue
		}
		// The two fits share their data, so the variance of their
		// difference is about the difference of their variances; a shift
		// beyond 3 such standard deviations is not noise.
		sd := math.Sqrt(math.Abs(alt.GammaSEPerS*alt.GammaSEPerS - r.GammaSEPerS*r.GammaSEPerS))
		if d/r.GammaPerS > rangeShiftLimit && d > 3*sd {
			significant = true
		}
	}
	r.RangeChecked = ran
	r.RangeShift = shift
	if significant {
		r.Warnings = append(r.Warnings, fmt.Errorf("fit range sensitive: mean decay rate moves %.1f %% when the range end moves by 25 %%, beyond its noise", 100*shift))
	}
}

func isFinite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

func mean(v []float64) float64 {
	s := 0.0
	for _, x := range v {
		s += x
	}
	return s / float64(len(v))
}

func median(v []float64) float64 {
	c := append([]float64(nil), v...)
	sort.Float64s(c)
	k := len(c)
	if k%2 == 1 {
		return c[k/2]
	}
	return (c[k/2-1] + c[k/2]) / 2
}

// diffNoise estimates the standard deviation of white noise on v from the
// median absolute successive difference: for independent normal errors the
// difference has standard deviation σ√2 and its MAD is 0.6745·σ√2.
func diffNoise(v []float64) float64 {
	if len(v) < 2 {
		return 0
	}
	d := make([]float64, len(v)-1)
	for i := range d {
		d[i] = math.Abs(v[i+1] - v[i])
	}
	return median(d) / (0.6745 * math.Sqrt2)
}
