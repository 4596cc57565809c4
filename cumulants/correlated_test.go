package cumulants_test

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"dlsbatch/cumulants"
)

// TestFitCorrelatedBasis checks which channel variances FitCorrelated
// uses, and when it gives none: the σ given, the noise model for a stated
// duration and count rate, the far channels' residuals otherwise; not for
// the linear method or g1 data (Unavailable wraps ErrNoCorrelated). The
// fit itself is Fit's (Γ̄ identical). Data: a 100-channel multi-tau
// correlogram (0.5 µs, Γ = 2000 /s, β = 0.9) with independent noise 1e-3.
func TestFitCorrelatedBasis(t *testing.T) {
	tau := multiTau(0.5e-6, 8, 100)
	g1, _, _ := logNormalG1(tau, 2000, 0)
	rng := rand.New(rand.NewPCG(3, 3))
	y := correlogram(g1, cumulants.G2, 0.9, 1, 1e-3, rng)
	y1 := correlogram(g1, cumulants.G1, 0.9, 0, 1e-3, rng)
	acq := cumulants.Acquisition{DurationS: 10, CountRateHz: 2e5}
	lin := cumulants.DefaultSettings()
	lin.Method = cumulants.Linear
	for _, c := range []struct {
		name  string
		y     []float64
		sigma []float64
		kind  cumulants.Kind
		s     *cumulants.Settings
		acq   cumulants.Acquisition
		basis string // "" for none
	}{
		{"σ given", y, constant(len(y), 1e-3), cumulants.G2, nil, acq, cumulants.BasisSigma},
		{"duration and count rate", y, nil, cumulants.G2, nil, acq, cumulants.BasisModel},
		{"duration only", y, nil, cumulants.G2, nil, cumulants.Acquisition{DurationS: 10}, cumulants.BasisTail},
		{"nothing stated", y, nil, cumulants.G2, nil, cumulants.Acquisition{}, cumulants.BasisTail},
		{"linear method", y, nil, cumulants.G2, &lin, acq, ""},
		{"g1 data", y1, nil, cumulants.G1, nil, acq, ""},
	} {
		t.Run(c.name, func(t *testing.T) {
			plain, err := cumulants.Fit(tau, c.y, c.sigma, c.kind, c.s)
			if err != nil {
				t.Fatal(err)
			}
			r, err := cumulants.FitCorrelated(tau, c.y, c.sigma, c.kind, c.s, c.acq)
			if err != nil {
				t.Fatal(err)
			}
			if r.GammaPerS != plain.GammaPerS || r.GammaSEPerS != plain.GammaSEPerS {
				t.Errorf("fit differs from Fit: Γ̄ %v ± %v, want %v ± %v", r.GammaPerS, r.GammaSEPerS, plain.GammaPerS, plain.GammaSEPerS)
			}
			if c.basis == "" {
				ok := false
				for _, e := range r.Unavailable {
					ok = ok || errors.Is(e, cumulants.ErrNoCorrelated)
				}
				if r.Correlated != nil || !ok {
					t.Errorf("correlated errors %+v, reasons %v; want none, with the reason", r.Correlated, r.Unavailable)
				}
				return
			}
			ce := r.Correlated
			if ce == nil {
				t.Fatalf("no correlated errors: %v", r.Unavailable)
			}
			if ce.Basis != c.basis || !(ce.GammaSEPerS > 0) || !(ce.PDISE > 0) || !(ce.ResidualRatio > 0) {
				t.Errorf("basis %s, SE %g, PDI SE %g, residual ratio %g; want basis %s and positive values", ce.Basis, ce.GammaSEPerS, ce.PDISE, ce.ResidualRatio, c.basis)
			}
		})
	}
}

// TestFitCorrelatedDuration checks the scaling law of the noise model:
// every term of the covariance of a correlator's estimate is proportional
// to 1/(T − τ) (Schätzel 1990), so quadrupling the duration halves the
// standard error. Tolerance 0.5 %: the lags reach 8 ms, and (T − τ)
// differs from T by up to 0.08 % at T = 10 s.
func TestFitCorrelatedDuration(t *testing.T) {
	tau := multiTau(0.5e-6, 8, 100)
	g1, _, _ := logNormalG1(tau, 2000, 0)
	y := correlogram(g1, cumulants.G2, 0.9, 1, 1e-3, rand.New(rand.NewPCG(5, 5)))
	se := func(durS float64) float64 {
		r, err := cumulants.FitCorrelated(tau, y, nil, cumulants.G2, nil, cumulants.Acquisition{DurationS: durS, CountRateHz: 2e5})
		if err != nil || r.Correlated == nil {
			t.Fatal(err, r.Unavailable)
		}
		return r.Correlated.GammaSEPerS
	}
	if got := se(40) / se(10); math.Abs(got-0.5) > 0.005*0.5 {
		t.Errorf("SE(40 s)/SE(10 s) = %.5f, want 0.5", got)
	}
}
