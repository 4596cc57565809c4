package main

import (
	"bufio"
	"bytes"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"syscall"
	"testing"
)

// BenchmarkRunPeakRSS runs the command as a child process on batches of
// 1,000, 5,000 and 20,000 demo files (all outputs, report included) and on
// one 100 MB file, and reports the child's peak resident set size
// (getrusage ru_maxrss) as MB-peak-RSS. The files are copies of the demo
// night, so every size has the same mix of samples. Run with
//
//	go test ./cmd/dlsbatch -run XX -bench PeakRSS -benchtime 1x
func BenchmarkRunPeakRSS(b *testing.B) {
	for _, n := range []int{1000, 5000, 20000} {
		b.Run(fmt.Sprintf("files=%d", n), func(b *testing.B) {
			in := copyDemo(b, n)
			for b.Loop() {
				rssOf(b, "run", in, "--out", filepath.Join(b.TempDir(), "out"), "-q")
			}
		})
	}
	b.Run("one-100MB-file", func(b *testing.B) {
		dir := b.TempDir()
		p := filepath.Join(dir, "huge.csv")
		// Written a line at a time: the child's peak RSS as getrusage reports
		// it includes what the parent held when it started the child.
		f, err := os.Create(p)
		if err != nil {
			b.Fatal(err)
		}
		w := bufio.NewWriter(f)
		w.WriteString("tau_s,g2\n")
		for i, n := 1, 0; n < 100<<20; i++ {
			k, _ := fmt.Fprintf(w, "%d.000000e-07,1.000000000\n", i)
			n += k
		}
		if err := w.Flush(); err != nil {
			b.Fatal(err)
		}
		f.Close()
		for b.Loop() {
			rssOf(b, "run", p, "--out", filepath.Join(b.TempDir(), "out"), "-q")
		}
	})
}

func rssOf(b *testing.B, args ...string) {
	b.Helper()
	cmd := child(b, args...)
	if out, err := cmd.CombinedOutput(); err != nil && !isExit(err, exitOK, exitSomeFailed, exitSpecFailed, exitFatal) {
		b.Fatalf("%v\n%s", err, out)
	}
	if ru, ok := cmd.ProcessState.SysUsage().(*syscall.Rusage); ok {
		b.ReportMetric(float64(ru.Maxrss)/1024, "MB-peak-RSS") // Linux reports KiB
	}
}

// copyDemo copies the demo night's files into n files under one folder,
// one subfolder per copy of the night, with the copy's number appended to
// each sample name: like a facility's many nights, every sample has its
// few runs, not thousands.
func copyDemo(b *testing.B, n int) string {
	b.Helper()
	src, _ := filepath.Glob(filepath.Join("..", "..", "testdata", "demo", "*.csv"))
	var data [][]byte
	for _, f := range src {
		d, err := os.ReadFile(f)
		if err != nil {
			b.Fatal(err)
		}
		data = append(data, d)
	}
	dir := filepath.Join(b.TempDir(), "in")
	for i := range n {
		sub := filepath.Join(dir, fmt.Sprintf("b%03d", i/len(data)))
		if i%len(data) == 0 {
			if err := os.MkdirAll(sub, 0o755); err != nil {
				b.Fatal(err)
			}
		}
		d := bytes.Replace(data[i%len(data)], []byte("# sample: "), []byte(fmt.Sprintf("# sample: night %d ", i/len(data))), 1)
		if err := os.WriteFile(filepath.Join(sub, filepath.Base(src[i%len(data)])), d, 0o644); err != nil {
			b.Fatal(err)
		}
	}
	return dir
}

// BenchmarkStartupOneFile builds the command and times a whole default run
// (report included) on one demo file, as a person at a terminal starts
// it: process start, flag parsing, the solvent tables, one analysis, every
// output, the lock and the swap of the set. ns/op is the wall time of one
// run.
//
//	go test ./cmd/dlsbatch -run XX -bench StartupOneFile -count 5
func BenchmarkStartupOneFile(b *testing.B) {
	bin := filepath.Join(b.TempDir(), "dlsbatch")
	if out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput(); err != nil {
		b.Fatalf("go build: %v\n%s", err, out)
	}
	in := filepath.Join("..", "..", "testdata", "demo", "01_ref-latex100-start.csv")
	out := filepath.Join(b.TempDir(), "out")
	for b.Loop() {
		cmd := exec.Command(bin, "run", in, "--out", out, "--force", "-q")
		if msg, err := cmd.CombinedOutput(); err != nil && !isExit(err, exitOK, exitSomeFailed) {
			b.Fatalf("%v\n%s", err, msg)
		}
	}
}
