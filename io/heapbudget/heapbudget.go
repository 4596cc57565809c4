// Package heapbudget gives the garbage collector of a run a heap budget:
// collect when the heap reaches the larger of a fixed floor and twice the
// live heap (what GOGC=100 alone would do), instead of every time the heap
// doubles from the few megabytes a batch keeps. The analysis allocates
// about as much per correlogram as the whole of what a run keeps, so with a
// small live heap the default collector runs every few milliseconds (12 %
// of a run's CPU on 1,000 files, measured): with a floor of 64 MiB it runs
// a tenth as often, and peak memory is the floor (plus the runtime's own)
// until the live heap passes half of it. See DEVELOPERS.md, "Memory of a
// whole run".
//
// The budget is the runtime's soft memory limit (runtime/debug
// SetMemoryLimit) with the proportional collector off, re-set after every
// collection from the live heap it measured. A GOGC or GOMEMLIMIT in the
// environment is the user's choice and wins: Start then does nothing.
package heapbudget

import (
	"math"
	"os"
	"runtime"
	"runtime/debug"
	"runtime/metrics"
	"sync"
)

// Floor is the default budget, in bytes.
const Floor = 64 << 20

// headroom is what the runtime holds besides the heap (stacks, metadata),
// which the memory limit counts.
const headroom = 8 << 20

// Start sets the budget (floor in bytes) and returns the function that
// restores the collector's settings as they were. It does nothing, and
// returns a function that does nothing, when GOGC or GOMEMLIMIT is set.
func Start(floor int64) (stop func()) {
	if os.Getenv("GOGC") != "" || os.Getenv("GOMEMLIMIT") != "" || floor <= 0 {
		return func() {}
	}
	b := &budget{floor: floor, limit: floor, sample: []metrics.Sample{{Name: "/gc/heap/live:bytes"}}}
	oldPercent := debug.SetGCPercent(-1)
	oldLimit := debug.SetMemoryLimit(floor)
	b.arm()
	return func() {
		b.mu.Lock()
		b.stopped = true
		b.mu.Unlock()
		debug.SetGCPercent(oldPercent)
		debug.SetMemoryLimit(oldLimit)
	}
}

type budget struct {
	floor int64
	// mu guards the rest: collections end on the cleanup goroutine, stop
	// comes from the caller's.
	mu      sync.Mutex
	stopped bool
	limit   int64
	sample  []metrics.Sample
}

// sentinel is an object that only a collection frees: its cleanup runs
// after every collection, re-sets the limit and arms a new one.
type sentinel struct{ _ [16]byte }

func (b *budget) arm() {
	s := new(sentinel)
	runtime.AddCleanup(s, func(b *budget) { b.collected() }, b)
}

// collected re-sets the limit from the live heap the last collection
// measured: max(floor, 2 × live + headroom).
func (b *budget) collected() {
	b.mu.Lock()
	defer b.mu.Unlock()
	if b.stopped {
		return
	}
	metrics.Read(b.sample)
	live := int64(0)
	if b.sample[0].Value.Kind() == metrics.KindUint64 {
		if v := b.sample[0].Value.Uint64(); v < math.MaxInt64/4 {
			live = int64(v)
		}
	}
	if limit := max(b.floor, 2*live+headroom); limit != b.limit {
		b.limit = limit
		debug.SetMemoryLimit(limit)
	}
	b.arm()
}
