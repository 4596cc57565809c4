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
// grid once even when many goroutines ask for it at the same time. It
// holds at most CacheSize grids and evicts the least recently used: the
// rate grid of a measurement depends on its temperature and viscosity
// (the size bounds), so a temperature series makes a new grid per
// temperature, each about 0.3 MB for 136 lags and 100 rates. A grid is
// the same whether it was cached or rebuilt, so eviction never changes a
// result.
type Cache struct {
	mu      sync.Mutex
	entries map[[32]byte][]*cacheEntry
	n       int
	tick    uint64
}

// CacheSize is the most grids a Cache holds.
const CacheSize = 32

type cacheEntry struct {
	tau  []float64
	gs   GridSettings
	key  [32]byte
	used uint64 // Cache.tick at the last request
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
		if c.n >= CacheSize {
			c.evict()
		}
		e = &cacheEntry{tau: append([]float64(nil), tauS...), gs: gs, key: key}
		c.entries[key] = append(c.entries[key], e)
		c.n++
	}
	c.tick++
	e.used = c.tick
	c.mu.Unlock()
	e.once.Do(func() { e.grid, e.err = buildGrid(e.tau, e.gs) })
	return e.grid, e.err
}

// evict removes the least recently requested entry (c.mu held). A
// goroutine still building or using it keeps its own pointer.
func (c *Cache) evict() {
	var old *cacheEntry
	for _, es := range c.entries {
		for _, e := range es {
			if old == nil || e.used < old.used {
				old = e
			}
		}
	}
	es := c.entries[old.key]
	es = slices.DeleteFunc(es, func(e *cacheEntry) bool { return e == old })
	if len(es) == 0 {
		delete(c.entries, old.key)
	} else {
		c.entries[old.key] = es
	}
	c.n--
}

// Len returns the number of distinct grids held.
func (c *Cache) Len() int {
	c.mu.Lock()
	defer c.mu.Unlock()
	return c.n
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
