package contin

import (
	"encoding/binary"
	"errors"
	"math"
	"math/rand/v2"
	"testing"
)

// FuzzInvert feeds Invert random finite inputs: a lag grid, a decay or
// arbitrary values, uncertainties (some infinite), any criterion. It must
// not panic; an error must wrap one of the package's sentinels; a result
// must be finite with non-negative amplitudes.
func FuzzInvert(f *testing.F) {
	f.Add(uint64(1), uint8(60), uint8(30), -3.0, -5.0, uint8(0), true, []byte{})
	f.Add(uint64(2), uint8(8), uint8(8), -1.0, 0.0, uint8(1), false, []byte{1, 2, 3, 4, 5, 6, 7, 8, 9})
	f.Add(uint64(3), uint8(200), uint8(100), -6.0, -12.0, uint8(2), true, []byte{0xff, 0xf0, 0, 0, 0, 0, 0, 0, 0x7f})
	f.Add(uint64(4), uint8(40), uint8(12), 0.0, 3.0, uint8(3), true, []byte{})
	f.Fuzz(func(t *testing.T, seed uint64, mb, nb uint8, logNoise, logLambda float64, crit uint8, base bool, raw []byte) {
		rng := rand.New(rand.NewPCG(seed, 7))
		m := MinPoints + int(mb)%193
		n := MinGammaPoints + int(nb)%113
		tau := make([]float64, m)
		t0 := math.Exp(math.Log(1e-7) + rng.Float64()*math.Log(1e3))
		ratio := 1 + 0.02 + rng.Float64()
		for i := range tau {
			tau[i] = t0 * math.Pow(ratio, float64(i))
		}
		if math.IsInf(tau[m-1], 0) || tau[m-1] > 1e6 {
			return
		}
		g, err := NewGrid(tau, &GridSettings{NGamma: n})
		if err != nil {
			if !isSentinel(err) {
				t.Fatalf("grid error without sentinel: %v", err)
			}
			return
		}
		if math.IsNaN(logNoise) || math.IsInf(logNoise, 0) {
			logNoise = -3
		}
		noise := math.Pow(10, math.Max(-8, math.Min(2, logNoise)))
		y := make([]float64, m)
		sig := make([]float64, m)
		gam := math.Exp(math.Log(1/tau[m-1]) + rng.Float64()*math.Log(tau[m-1]/tau[0]))
		for i := range y {
			y[i] = math.Exp(-gam*tau[i]) + noise*rng.NormFloat64()
			sig[i] = noise * (0.5 + rng.Float64())
		}
		for k := 0; k+9 <= len(raw); k += 9 {
			i := int(raw[k]) % m
			v := math.Float64frombits(binary.LittleEndian.Uint64(raw[k+1 : k+9]))
			switch {
			case math.IsNaN(v) || math.IsInf(v, 0):
				sig[i] = math.Inf(1)
			case math.Abs(v) < 1e100:
				y[i] = v
			}
		}
		s := DefaultSettings()
		s.Criterion = Criterion(crit % 4)
		s.Baseline = base
		if s.Criterion == Fixed {
			if math.IsNaN(logLambda) || math.IsInf(logLambda, 0) {
				logLambda = 0
			}
			s.Lambda = math.Pow(10, math.Max(-15, math.Min(5, logLambda)))
		}
		var sigma []float64
		if seed%3 != 0 {
			sigma = sig
		}
		r, err := Invert(g, y, sigma, s)
		if err != nil {
			if !isSentinel(err) {
				t.Fatalf("error without sentinel: %v", err)
			}
			return
		}
		checkFinite(t, r)
		if len(r.Amplitude) != n || len(r.Fitted) != m || r.Chosen < 0 || r.Chosen >= len(r.Scan) {
			t.Fatalf("shapes: %d amplitudes, %d fitted, chosen %d of %d", len(r.Amplitude), len(r.Fitted), r.Chosen, len(r.Scan))
		}
	})
}

func isSentinel(err error) bool {
	for _, s := range []error{ErrLength, ErrNonFinite, ErrBadSigma, ErrBadLag, ErrBadGrid, ErrTooFewPoints, ErrNoDecay, ErrBadSettings} {
		if errors.Is(err, s) {
			return true
		}
	}
	return false
}
