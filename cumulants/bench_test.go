package cumulants_test

import (
	"math/rand/v2"
	"testing"

	"dlsbatch/cumulants"
)

// BenchmarkFit fits one 200-channel correlogram (lognormal, PDI ≈ 0.02,
// noise 1e-3) with the default settings, range check included.
func BenchmarkFit(b *testing.B) {
	tau := multiTau(0.5e-6, 8, 200)
	g1, _, _ := logNormalG1(tau, 2000, 0.15)
	y := correlogram(g1, cumulants.G2, 0.9, 1, 1e-3, rand.New(rand.NewPCG(1, 1)))
	for _, c := range []struct {
		name  string
		check bool
	}{{"default", true}, {"no-range-check", false}} {
		b.Run(c.name, func(b *testing.B) {
			s := cumulants.DefaultSettings()
			s.RangeCheck = c.check
			b.ReportAllocs()
			for b.Loop() {
				if _, err := cumulants.Fit(tau, y, nil, cumulants.G2, &s); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// benchAcquisitions are the two bases of the correlated-noise model the
// benchmarks take: the model's variances for a stated duration and count
// rate, and those scaled to the far channels (neither stated).
var benchAcquisitions = []struct {
	name string
	acq  cumulants.Acquisition
}{{"model", cumulants.Acquisition{DurationS: 10, CountRateHz: 2e5}}, {"tail", cumulants.Acquisition{}}}

// BenchmarkFitCorrelated is BenchmarkFit/default with the correlated-noise
// standard errors: the model basis (duration and count rate given) and the
// tail basis (neither), and the truncation estimate.
func BenchmarkFitCorrelated(b *testing.B) {
	tau := multiTau(0.5e-6, 8, 200)
	g1, _, _ := logNormalG1(tau, 2000, 0.15)
	y := correlogram(g1, cumulants.G2, 0.9, 1, 1e-3, rand.New(rand.NewPCG(1, 1)))
	for _, c := range benchAcquisitions {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				r, err := cumulants.FitCorrelated(tau, y, nil, cumulants.G2, nil, c.acq)
				if err != nil || r.Correlated == nil {
					b.Fatal(err, r.Warnings)
				}
			}
		})
	}
	b.Run("truncation", func(b *testing.B) {
		r, err := cumulants.Fit(tau, y, nil, cumulants.G2, nil)
		if err != nil {
			b.Fatal(err)
		}
		for b.Loop() {
			if _, err := cumulants.TruncationBias(tau, cumulants.G2, nil, r); err != nil {
				b.Fatal(err)
			}
		}
	})
}

// BenchmarkChannelNoise builds the channel-noise model of a fit from its
// first lag on (model and tail bases, 200 lags) and evaluates one
// quadratic form, as a peak's uncertainty needs.
func BenchmarkChannelNoise(b *testing.B) {
	tau := multiTau(0.5e-6, 8, 200)
	g1, _, _ := logNormalG1(tau, 2000, 0.15)
	y := correlogram(g1, cumulants.G2, 0.9, 1, 1e-3, rand.New(rand.NewPCG(1, 1)))
	r, err := cumulants.Fit(tau, y, nil, cumulants.G2, nil)
	if err != nil {
		b.Fatal(err)
	}
	v := make([]float64, len(tau)-r.FitFirst)
	for i := range v {
		v[i] = 1
	}
	for _, c := range benchAcquisitions {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				cn, err := r.ChannelNoise(tau, cumulants.G2, c.acq, r.FitFirst)
				if err != nil {
					b.Fatal(err)
				}
				if !(cn.Quad(v) > 0) {
					b.Fatal("form not positive")
				}
			}
		})
	}
}
