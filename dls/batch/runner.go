package batch

import (
	"context"
	"errors"
	"runtime"
	"sort"
	"strconv"
	"sync"

	"dlsbatch/dls"
	"dlsbatch/dls/qc"
)

// Input is one item read from a file; see dls.Input.
type Input = dls.Input

// ReadFunc reads one file into its measurements. It must always return at
// least one Input, and must be safe for concurrent use.
type ReadFunc func(path string) []Input

// Runner analyses files in parallel.
type Runner struct {
	Read     ReadFunc
	Settings Settings
	// Workers is the number of files analysed at once; 0 means all cores.
	Workers int
	// Progress, when set, is called once per finished file from the
	// worker goroutines (it must be safe for concurrent use).
	Progress func(path string)
}

// Run reads and analyses every path and returns one result per measurement,
// sorted by file path (in the order given) and then by run label, whatever
// the number of workers. When ctx is cancelled it stops starting files and
// returns the results finished so far together with ctx.Err().
func (rn *Runner) Run(ctx context.Context, paths []string) ([]*dls.Result, error) {
	workers := rn.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, max(1, len(paths)))
	perFile := make([][]*dls.Result, len(paths))
	done := make([]bool, len(paths))
	jobs := make(chan int)
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range jobs {
				perFile[i] = rn.analyzeFile(paths[i])
				done[i] = true
				if rn.Progress != nil {
					rn.Progress(paths[i])
				}
			}
		}()
	}
	var stopped error
feed:
	for i := range paths {
		select {
		case <-ctx.Done():
			stopped = ctx.Err()
			break feed
		case jobs <- i:
		}
	}
	close(jobs)
	wg.Wait()
	var out []*dls.Result
	for i := range paths {
		if done[i] {
			out = append(out, perFile[i]...)
		}
	}
	return out, stopped
}

func (rn *Runner) analyzeFile(path string) []*dls.Result {
	inputs := rn.Read(path)
	res := make([]*dls.Result, 0, len(inputs))
	for _, in := range inputs {
		if in.Err != nil || in.M == nil {
			err := in.Err
			if err == nil {
				err = errors.New("reader returned no measurement")
			}
			r := &dls.Result{Identity: dls.Identity{File: in.File, Run: in.Run, Role: dls.RoleSample, Status: dls.StatusError, Message: err.Error()}}
			r.Flags = qc.Measurement(r, nil, rn.Settings.QC)
			res = append(res, r)
			continue
		}
		res = append(res, Analyze(in.M, &rn.Settings))
	}
	sort.SliceStable(res, func(i, j int) bool { return naturalLess(res[i].Run, res[j].Run) })
	return res
}

// naturalLess orders run labels with embedded numbers by value, so that r2
// comes before r10.
func naturalLess(a, b string) bool {
	for a != "" && b != "" {
		da, db := digitPrefix(a), digitPrefix(b)
		if da > 0 && db > 0 {
			na, _ := strconv.ParseUint(a[:da], 10, 64)
			nb, _ := strconv.ParseUint(b[:db], 10, 64)
			if na != nb {
				return na < nb
			}
			if da != db {
				return da < db
			}
			a, b = a[da:], b[db:]
			continue
		}
		if a[0] != b[0] {
			return a[0] < b[0]
		}
		a, b = a[1:], b[1:]
	}
	return len(a) < len(b)
}

func digitPrefix(s string) int {
	i := 0
	for i < len(s) && s[i] >= '0' && s[i] <= '9' && i < 18 {
		i++
	}
	return i
}
