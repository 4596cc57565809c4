// Package profile writes the CPU and heap profiles of a run (go tool pprof
// reads them) and its execution trace (go tool trace: what each core did
// when, and the run's phases as regions) for whoever tunes the code; see
// DEVELOPERS.md.
package profile

import (
	"fmt"
	"os"
	"runtime"
	"runtime/pprof"
	"runtime/trace"

	"github.com/spf13/pflag"
)

// Files are the profiles a command line asks for (empty: none).
type Files struct{ CPU, Mem, Trace string }

// AddFlags registers --cpuprofile, --memprofile and --trace on fs for a
// command that does what ("run", "merge").
func (f *Files) AddFlags(fs *pflag.FlagSet, what string) {
	fs.StringVar(&f.CPU, "cpuprofile", "", "write a CPU profile of the "+what+" to this file (go tool pprof)")
	fs.StringVar(&f.Mem, "memprofile", "", "write a heap profile at the end of the "+what+" to this file (go tool pprof)")
	fs.StringVar(&f.Trace, "trace", "", "write an execution trace of the "+what+", its phases marked, to this file (go tool trace)")
}

// Begin starts the profiles named; end stops them and hands any error
// to say.
func (f *Files) Begin(say func(error)) (end func(), err error) {
	stop, err := Start(f.CPU, f.Mem, f.Trace)
	if err != nil {
		return nil, err
	}
	return func() {
		if err := stop(); err != nil {
			say(err)
		}
	}, nil
}

// Start begins a CPU profile into cpuFile and an execution trace into
// traceFile (each when not empty) and returns the function that ends them
// and writes a heap profile into memFile (when not empty), after a garbage
// collection so that it shows live memory.
func Start(cpuFile, memFile, traceFile string) (stop func() error, err error) {
	var cpu, tr *os.File
	if traceFile != "" {
		if tr, err = os.Create(traceFile); err != nil {
			return nil, fmt.Errorf("--trace: %w", err)
		}
		if err := trace.Start(tr); err != nil {
			tr.Close()
			return nil, fmt.Errorf("--trace: %w", err)
		}
	}
	if cpuFile != "" {
		if cpu, err = os.Create(cpuFile); err == nil {
			if err = pprof.StartCPUProfile(cpu); err != nil {
				cpu.Close()
			}
		}
		if err != nil {
			if tr != nil { // no trace left running
				trace.Stop()
				tr.Close()
			}
			return nil, fmt.Errorf("--cpuprofile: %w", err)
		}
	}
	return func() error {
		if tr != nil {
			trace.Stop()
			if err := tr.Close(); err != nil {
				return fmt.Errorf("--trace: %w", err)
			}
		}
		if cpu != nil {
			pprof.StopCPUProfile()
			if err := cpu.Close(); err != nil {
				return fmt.Errorf("--cpuprofile: %w", err)
			}
		}
		if memFile == "" {
			return nil
		}
		f, err := os.Create(memFile)
		if err != nil {
			return fmt.Errorf("--memprofile: %w", err)
		}
		defer f.Close()
		runtime.GC()
		if err := pprof.Lookup("allocs").WriteTo(f, 0); err != nil {
			return fmt.Errorf("--memprofile: %w", err)
		}
		return nil
	}, nil
}
