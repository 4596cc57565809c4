package main

import (
	"bufio"
	"bytes"
	"context"
	"errors"
	"fmt"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"golang.org/x/sys/unix"

	"dlsbatch/io/report"
)

// TestMain lets the fault tests run this test binary as the command
// itself: with DLSBATCH_AS_MAIN set it runs main with the arguments after
// "--".
func TestMain(m *testing.M) {
	if os.Getenv("DLSBATCH_AS_MAIN") == "1" {
		for i, a := range os.Args {
			if a == "--" {
				os.Args = append([]string{"dlsbatch"}, os.Args[i+1:]...)
				break
			}
		}
		main()
		return
	}
	os.Exit(m.Run())
}

// child starts the command as a separate process.
func child(t testing.TB, args ...string) *exec.Cmd {
	t.Helper()
	cmd := exec.Command(os.Args[0], append([]string{"-test.run=^$", "--"}, args...)...)
	cmd.Env = append(os.Environ(), "DLSBATCH_AS_MAIN=1")
	return cmd
}

// faultBatch copies the demo night into four folders (100 files: 25 each), enough
// for a run to take a measurable time.
func faultBatch(t *testing.T) string {
	t.Helper()
	src := filepath.Join("..", "..", "testdata", "demo")
	files, err := filepath.Glob(filepath.Join(src, "*.csv"))
	if err != nil || len(files) == 0 {
		t.Fatal("no demo files")
	}
	dir := filepath.Join(t.TempDir(), "night")
	for k := range 4 {
		sub := filepath.Join(dir, fmt.Sprintf("block%d", k))
		if err := os.MkdirAll(sub, 0o755); err != nil {
			t.Fatal(err)
		}
		for _, f := range files {
			b, err := os.ReadFile(f)
			if err != nil {
				t.Fatal(err)
			}
			if err := os.WriteFile(filepath.Join(sub, filepath.Base(f)), b, 0o644); err != nil {
				t.Fatal(err)
			}
		}
	}
	return dir
}

// TestKillLeavesAVerifiableSet kills a run with SIGKILL at 12 random
// moments spread over a whole run (analysis, report, hashing, swap) and
// checks what is left each time: either no folder (the first run died
// before its swap) or a set that verify accepts whole. It never finds a
// mix of two runs or a half-written set.
func TestKillLeavesAVerifiableSet(t *testing.T) {
	if testing.Short() {
		t.Skip("runs the command 14 times")
	}
	in := faultBatch(t)
	out := filepath.Join(t.TempDir(), "out")
	args := []string{"run", in, "--out", out, "--force", "-q", "-j", "2"}
	// Time one whole run to spread the kills over it.
	start := time.Now()
	if b, err := child(t, args...).CombinedOutput(); err != nil && !isExit(err, exitSpecFailed, exitOK) {
		t.Fatalf("reference run: %v\n%s", err, b)
	}
	whole := time.Since(start)
	if v, err := report.Verify(out); err != nil || !v.OK() {
		t.Fatalf("reference run does not verify: %v %+v", err, v)
	}
	os.RemoveAll(out)
	rng := rand.New(rand.NewPCG(11, 12))
	for i := range 12 {
		delay := time.Duration(rng.Float64() * 1.2 * float64(whole))
		cmd := child(t, args...)
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		time.Sleep(delay)
		cmd.Process.Signal(syscall.SIGKILL)
		cmd.Wait()
		v, err := report.Verify(out)
		switch {
		case errors.Is(err, report.ErrNoManifest) && noFolder(out):
			t.Logf("kill %d after %v: no set yet", i, delay)
		case err != nil:
			t.Errorf("kill %d after %v: %v", i, delay, err)
		case !v.OK():
			t.Errorf("kill %d after %v: the set left does not verify: %+v", i, delay, v.Differences)
		default:
			t.Logf("kill %d after %v: a whole set (%d files checked)", i, delay, v.Checked)
		}
	}
}

// TestInterruptMarksIncomplete sends SIGINT early in the analysis: the run
// exits 130, and what it leaves verifies as an incomplete set whose only
// difference is that it is incomplete, with no verdicts.
func TestInterruptMarksIncomplete(t *testing.T) {
	if testing.Short() {
		t.Skip("runs the command")
	}
	in := faultBatch(t)
	out := filepath.Join(t.TempDir(), "out")
	cmd := child(t, "run", in, "--out", out, "--progress", "lines", "-j", "1", "--spec", filepath.Join("..", "..", "testdata", "demo-spec.csv"))
	pipe, err := cmd.StderrPipe()
	if err != nil {
		t.Fatal(err)
	}
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	// The signal comes while the analysis runs: after its first progress
	// line (10 of the 100 files), whatever the machine's speed.
	var stderr strings.Builder
	read := make(chan struct{})
	go func() {
		defer close(read)
		sc := bufio.NewScanner(pipe)
		signalled := false
		for sc.Scan() {
			stderr.WriteString(sc.Text() + "\n")
			if !signalled && strings.Contains(sc.Text(), "analysing") {
				cmd.Process.Signal(os.Interrupt)
				signalled = true
			}
		}
	}()
	ctx, cancel := context.WithTimeout(context.Background(), 20*time.Second)
	defer cancel()
	done := make(chan error, 1)
	go func() { <-read; done <- cmd.Wait() }()
	select {
	case err = <-done:
	case <-ctx.Done():
		cmd.Process.Kill()
		t.Fatal("the run did not stop after SIGINT")
	}
	if !isExit(err, exitInterrupted) {
		t.Fatalf("exit %v, want %d; stderr: %s", err, exitInterrupted, stderr.String())
	}
	v, verr := report.Verify(out)
	if verr != nil {
		t.Fatalf("verify: %v (stderr %s)", verr, stderr.String())
	}
	if v.Complete || len(v.Differences) != 1 || v.Differences[0].Kind != "set" {
		t.Fatalf("want an incomplete but otherwise intact set, got complete=%v %+v", v.Complete, v.Differences)
	}
	if n := v.Manifest.Files; n.Analysed >= n.Found || n.Found != 100 {
		t.Errorf("files %+v: want fewer than all 100 analysed", n)
	}
	b, _ := os.ReadFile(filepath.Join(out, "results.json"))
	if strings.Contains(string(b), `"verdict":{`) {
		t.Error("an incomplete set carries verdicts")
	}
}

func noFolder(p string) bool {
	_, err := os.Stat(p)
	return errors.Is(err, os.ErrNotExist)
}

func isExit(err error, codes ...int) bool {
	code := 0
	var ee *exec.ExitError
	if errors.As(err, &ee) {
		code = ee.ExitCode()
	} else if err != nil {
		return false
	}
	for _, c := range codes {
		if c == code {
			return true
		}
	}
	return false
}

// TestResumeAfterKill: a run killed with SIGKILL part way, then resumed,
// writes the bytes of an uninterrupted run (every output, the manifest
// with the report's hashes included) and takes the files finished before
// the kill from the journal instead of analysing them again.
func TestResumeAfterKill(t *testing.T) {
	if testing.Short() {
		t.Skip("runs the command")
	}
	in := faultBatch(t)
	tmp := t.TempDir()
	ref := filepath.Join(tmp, "ref")
	base := []string{"run", in, "-q", "-j", "2", "--progress", "none"}
	start := time.Now()
	if b, err := child(t, append(base, "--out", ref)...).CombinedOutput(); err != nil && !isExit(err, exitOK) {
		t.Fatalf("reference: %v\n%s", err, b)
	}
	whole := time.Since(start) // the kills fall at 30 % and 70 % of a run, whatever the machine's speed
	out := filepath.Join(tmp, "out")
	for _, delay := range []time.Duration{whole * 3 / 10, whole * 7 / 10} {
		os.RemoveAll(out)
		cmd := child(t, append(base, "--out", out)...)
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		time.Sleep(delay)
		cmd.Process.Signal(syscall.SIGKILL)
		cmd.Wait()
		var stderr strings.Builder
		res := child(t, append(base, "--out", out, "--resume")...)
		res.Stderr = &stderr
		if err := res.Run(); err != nil && !isExit(err, exitOK) {
			t.Fatalf("resume: %v\n%s", err, stderr.String())
		}
		for _, f := range []string{"results.csv", "samples.csv", "results.json", "manifest.json", "summary.txt"} {
			a, _ := os.ReadFile(filepath.Join(ref, f))
			b, _ := os.ReadFile(filepath.Join(out, f))
			if !bytes.Equal(a, b) {
				t.Errorf("kill after %v: %s differs from the uninterrupted run: %s", delay, f, firstDiff(a, b))
			}
		}
		t.Logf("kill after %v, then resume: %s", delay, strings.TrimSpace(stderr.String()))
		if _, err := os.Stat(filepath.Join(tmp, ".out.journal")); !errors.Is(err, os.ErrNotExist) {
			t.Error("the journal of a published run was kept")
		}
	}
}

// TestDiskFull fills the file system in the middle of a run: on a tmpfs of
// 1 MiB (full while the journal is written) and of 2 MiB (full while the
// report is written), mounted here (it needs the privilege to mount, as CI
// has; without it the test is skipped), a run of the demo night into a
// folder holding an earlier set fails with exit 1 and a message that says
// the folder is unchanged and that --resume takes up the work; the earlier
// set is still whole (verify); once the file system is grown, --resume
// writes the bytes of a run that never failed and leaves nothing beside
// the set.
func TestDiskFull(t *testing.T) {
	if testing.Short() {
		t.Skip("runs the command")
	}
	demo := filepath.Join("..", "..", "testdata", "demo")
	ref := filepath.Join(t.TempDir(), "ref")
	if code, _, stderr := runCmd(t, "run", demo, "--out", ref, "-q"); code != exitOK {
		t.Fatalf("reference: exit %d: %s", code, stderr)
	}
	for _, size := range []string{"1m", "2m"} {
		small := t.TempDir()
		if err := unix.Mount("tmpfs", small, "tmpfs", 0, "size="+size); err != nil {
			t.Skipf("cannot mount a small tmpfs here (%v): the test needs the privilege to mount", err)
		}
		t.Cleanup(func() { unix.Unmount(small, 0) })
		out := filepath.Join(small, "out")
		if code, _, stderr := runCmd(t, "run", filepath.Join(demo, "02_gold20-G2411-1.csv"), "--out", out, "-q"); code != exitOK {
			t.Fatalf("%s: earlier set: exit %d: %s", size, code, stderr)
		}
		earlier, err := os.ReadFile(filepath.Join(out, "manifest.json"))
		if err != nil {
			t.Fatal(err)
		}
		code, _, stderr := runCmd(t, "run", demo, "--out", out, "--force", "-q")
		if code != exitFatal || !strings.Contains(stderr, "no space left on device") || !strings.Contains(stderr, "the output folder is unchanged") ||
			!strings.Contains(stderr, "--resume") {
			t.Fatalf("%s: full disk: exit %d, %q; want exit %d, the cause, and what is left and what to do", size, code, stderr, exitFatal)
		}
		t.Logf("%s: %s", size, strings.TrimSpace(stderr))
		if now, _ := os.ReadFile(filepath.Join(out, "manifest.json")); !bytes.Equal(now, earlier) {
			t.Errorf("%s: the earlier set was replaced", size)
		}
		if code, _, stderr := runCmd(t, "verify", out); code != 0 {
			t.Errorf("%s: the earlier set does not verify: %s", size, stderr)
		}
		if err := unix.Mount("tmpfs", small, "tmpfs", unix.MS_REMOUNT, "size=32m"); err != nil {
			t.Fatal(err)
		}
		code, _, stderr = runCmd(t, "run", demo, "--out", out, "--resume", "-q")
		if code != exitOK || !strings.Contains(stderr, "resumed:") {
			t.Fatalf("%s: resume: exit %d: %s", size, code, stderr)
		}
		for _, f := range []string{"results.csv", "samples.csv", "results.json", "manifest.json", "summary.txt"} {
			a, _ := os.ReadFile(filepath.Join(ref, f))
			b, _ := os.ReadFile(filepath.Join(out, f))
			if !bytes.Equal(a, b) {
				t.Errorf("%s: %s after the full disk and --resume differs from a run that never failed: %s", size, f, firstDiff(a, b))
			}
		}
		if left, _ := filepath.Glob(filepath.Join(small, ".out.*")); len(left) != 0 {
			t.Errorf("%s: left beside the published set: %v", size, left)
		}
	}
}
