package contin

import (
	"crypto/sha256"
	"encoding/binary"
	"math"
	"slices"
	"sync"
)

// Cache holds Grids keyed by a SHA-256 hash of the lag values and the
// effective grid settings (defaults filled in), so that a batch of
// correlograms sharing a lag grid builds the kernel and its derived matrices
// once. A hit is confirmed by comparing the stored lags and settings, so a
// hash collision can never return a wrong grid. The zero value is an empty
// cache ready for use; a Cache is safe for concurrent use and builds each
// grid once even when many goroutines ask for it at the same time. Entries
// are never evicted: a batch normally has a handful of distinct lag grids.
type Cache struct {
	mu      sync.Mutex
	entries map[[32]byte][]*cacheEntry
}

type cacheEntry struct {
	tau  []float64
	gs   GridSettings
	once sync.Once
	grid *Grid
	err  error
}

// Grid returns the grid for tauS and s, building it on first request.
// Arguments and errors are those of NewGrid; a failed build is cached too.
func (c *Cache) Grid(tauS []float64, s *GridSettings) (*Grid, error) {
	gs, err := normaliseGridSettings(tauS, s)
	if err != nil {
		return nil, err
	}
	key := gridKey(tauS, &gs)
	c.mu.Lock()
	if c.entries == nil {
		c.entries = make(map[[32]byte][]*cacheEntry)
	}
	var e *cacheEntry
	for _, cand := range c.entries[key] {
		if sameGrid(cand, tauS, &gs) {
			e = cand
			break
		}
	}
	if e == nil {
		e = &cacheEntry{tau: append([]float64(nil), tauS...), gs: gs}
		c.entries[key] = append(c.entries[key], e)
	}
	c.mu.Unlock()
	e.once.Do(func() { e.grid, e.err = buildGrid(e.tau, e.gs) })
	return e.grid, e.err
}

// Len returns the number of distinct grids held.
func (c *Cache) Len() int {
	c.mu.Lock()
	defer c.mu.Unlock()
	n := 0
	for _, es := range c.entries {
		n += len(es)
	}
	return n
}

func sameGrid(e *cacheEntry, tau []float64, gs *GridSettings) bool {
	return slices.Equal(e.tau, tau) && e.gs.NGamma == gs.NGamma &&
		e.gs.GammaMinPerS == gs.GammaMinPerS && e.gs.GammaMaxPerS == gs.GammaMaxPerS &&
		(e.gs.ChannelWidthS == nil) == (gs.ChannelWidthS == nil) &&
		slices.Equal(e.gs.ChannelWidthS, gs.ChannelWidthS)
}

func gridKey(tau []float64, gs *GridSettings) [32]byte {
	h := sha256.New()
	var b [8]byte
	put := func(v uint64) {
		binary.LittleEndian.PutUint64(b[:], v)
		h.Write(b[:])
	}
	put(uint64(len(tau)))
	for _, t := range tau {
		put(math.Float64bits(t))
	}
	put(uint64(gs.NGamma))
	put(math.Float64bits(gs.GammaMinPerS))
	put(math.Float64bits(gs.GammaMaxPerS))
	if gs.ChannelWidthS == nil {
		put(0)
	} else {
		put(1 + uint64(len(gs.ChannelWidthS)))
		for _, d := range gs.ChannelWidthS {
			put(math.Float64bits(d))
		}
	}
	var k [32]byte
	h.Sum(k[:0])
	return k
}
