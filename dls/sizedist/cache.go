package sizedist

import (
	"slices"
	"sync"

	"dlsbatch/dls/mie"
)

// WeightCacheSize is the number of diameter grids and optics a WeightCache
// holds; the oldest is dropped when a new one arrives. A batch normally has
// a handful (one per lag grid, temperature, solvent, wavelength, angle and
// particle index); a batch whose temperature changes from file to file
// gains nothing from the cache and keeps its memory bounded.
const WeightCacheSize = 32

// WeightCache holds the Mie intensities C(d_j) of recent diameter grids and
// optics, so that a batch whose measurements share them (the usual case:
// one lag grid, one temperature, one solvent and instrument) evaluates Mie
// theory once instead of once per measurement. A hit requires equal
// diameters, wavelength, medium index, particle index, angle and
// polarisation, bit for bit, so a cached value is exactly what New would
// compute. The zero value is an empty cache ready for use; it is safe for
// concurrent use and computes each entry once even when several goroutines
// ask for it at the same time.
type WeightCache struct {
	mu      sync.Mutex
	entries []*weightEntry // oldest first
}

type weightKey struct {
	lambdaM, nMedium, thetaRad float64
	mParticle                  complex128
	pol                        mie.Polarization
}

type weightEntry struct {
	key  weightKey
	diam []float64
	once sync.Once
	c    []float64
	err  error
}

// intensities returns mie.IntensityGrid of the arguments, from the cache
// when it holds them. The returned slice is shared and must not be changed.
func (wc *WeightCache) intensities(diamM []float64, lambdaM, nMedium float64, mParticle complex128, thetaRad float64, pol mie.Polarization) ([]float64, error) {
	k := weightKey{lambdaM: lambdaM, nMedium: nMedium, thetaRad: thetaRad, mParticle: mParticle, pol: pol}
	wc.mu.Lock()
	var e *weightEntry
	for _, c := range wc.entries {
		if c.key == k && slices.Equal(c.diam, diamM) {
			e = c
			break
		}
	}
	if e == nil {
		e = &weightEntry{key: k, diam: slices.Clone(diamM)}
		if len(wc.entries) == WeightCacheSize {
			copy(wc.entries, wc.entries[1:])
			wc.entries = wc.entries[:len(wc.entries)-1]
		}
		wc.entries = append(wc.entries, e)
	}
	wc.mu.Unlock()
	e.once.Do(func() { e.c, e.err = mie.IntensityGrid(e.diam, lambdaM, nMedium, mParticle, thetaRad, pol) })
	return e.c, e.err
}

// Len returns the number of entries held.
func (wc *WeightCache) Len() int {
	wc.mu.Lock()
	defer wc.mu.Unlock()
	return len(wc.entries)
}
