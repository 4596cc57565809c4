package heapbudget

import (
	"runtime"
	"runtime/debug"
	"testing"
	"time"
)

// limitNow is the runtime's soft memory limit in force.
func limitNow() int64 { return debug.SetMemoryLimit(-1) }

// With a live heap beyond half the floor the budget follows it: after a
// collection the limit is twice the live heap plus the headroom (what
// GOGC=100 would allow), never below the floor; stop restores the
// collector's settings. The live heap is 48 MiB of kept slices, measured
// by the runtime, so the expected limit is known to within what else the
// test process holds (a few MiB).
func TestBudgetFollowsLiveHeap(t *testing.T) {
	t.Setenv("GOGC", "")
	t.Setenv("GOMEMLIMIT", "")
	before := limitNow()
	const floor = 16 << 20
	stop := Start(floor)
	if got := limitNow(); got != floor {
		t.Fatalf("limit %d after Start, want the floor %d", got, floor)
	}
	keep := make([][]byte, 48)
	for i := range keep {
		keep[i] = make([]byte, 1<<20)
		keep[i][0] = 1
	}
	want := int64(2*48<<20 + headroom)
	var got int64
	for range 50 {
		runtime.GC()
		time.Sleep(10 * time.Millisecond) // cleanups run after the collection, on their own goroutine
		if got = limitNow(); got >= want {
			break
		}
	}
	if got < want || got > want+16<<20 {
		t.Errorf("limit %d MiB with 48 MiB live, want %d MiB (+ up to 16 MiB for the rest of the process)", got>>20, want>>20)
	}
	runtime.KeepAlive(keep)
	stop()
	if got := limitNow(); got != before {
		t.Errorf("limit %d after stop, want %d as before", got, before)
	}
	if p := debug.SetGCPercent(100); p < 0 {
		t.Errorf("GC percent %d after stop: the proportional collector was not restored", p)
	}
}

// A GOGC or GOMEMLIMIT in the environment wins: Start leaves the
// collector alone.
func TestEnvironmentWins(t *testing.T) {
	for _, env := range []string{"GOGC", "GOMEMLIMIT"} {
		t.Run(env, func(t *testing.T) {
			t.Setenv("GOGC", "")
			t.Setenv("GOMEMLIMIT", "")
			t.Setenv(env, "200")
			before := limitNow()
			stop := Start(16 << 20)
			if got := limitNow(); got != before {
				t.Errorf("limit %d with %s set, want %d unchanged", got, env, before)
			}
			stop()
		})
	}
}
