package main

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"dlsbatch/io/report"
)

// TestWatch: files written slowly into a watched folder are analysed once
// each is complete (a half-written file is not), the set verifies after
// every update, and a restarted watch takes everything from the journal.
// Timing: settle 300 ms, poll 100 ms; the test waits up to 20 s for each
// state (generous for a loaded machine, asserts no duration).
func TestWatch(t *testing.T) {
	if testing.Short() {
		t.Skip("runs a watch for a few seconds")
	}
	demo, _ := filepath.Glob(filepath.Join("..", "..", "testdata", "demo", "0[2-4]_*.csv"))
	in := filepath.Join(t.TempDir(), "instrument")
	os.MkdirAll(in, 0o755)
	out := filepath.Join(t.TempDir(), "out")
	watch := func(ctx context.Context) (chan int, *lockedText) {
		done := make(chan int, 1)
		var stderr lockedText
		go func() {
			var b strings.Builder
			code := run(ctx, []string{"watch", in, "--out", out, "--settle", "300ms", "--poll", "100ms", "-q"},
				env{stdin: strings.NewReader(""), stdout: &b, stderr: &stderr})
			done <- code
		}()
		return done, &stderr
	}
	waitFor := func(what string, ok func() bool) {
		t.Helper()
		for end := time.Now().Add(20 * time.Second); time.Now().Before(end); time.Sleep(50 * time.Millisecond) {
			if ok() {
				return
			}
		}
		t.Fatalf("timed out waiting for %s", what)
	}
	rows := func() int {
		b, err := os.ReadFile(filepath.Join(out, "results.csv"))
		if err != nil {
			return -1
		}
		return strings.Count(string(b), "\n") - 1
	}
	ctx, cancel := context.WithCancel(context.Background())
	done, stderr := watch(ctx)
	// The first file arrives whole; the second is written in two halves,
	// 1 s apart: it must not be analysed half-written.
	b0, _ := os.ReadFile(demo[0])
	os.WriteFile(filepath.Join(in, filepath.Base(demo[0])), b0, 0o644)
	waitFor("the first file", func() bool { return rows() == 1 })
	b1, _ := os.ReadFile(demo[1])
	half := filepath.Join(in, filepath.Base(demo[1]))
	os.WriteFile(half, b1[:len(b1)/2], 0o644)
	time.Sleep(time.Second / 10)
	if rows() != 1 {
		t.Fatal("a half-written file was taken")
	}
	f, _ := os.OpenFile(half, os.O_APPEND|os.O_WRONLY, 0o644)
	time.Sleep(200 * time.Millisecond)
	f.Write(b1[len(b1)/2:])
	f.Close()
	waitFor("the second file", func() bool { return rows() == 2 })
	if v, err := report.Verify(out); err != nil || !v.OK() {
		t.Fatalf("set after an update does not verify: %v %+v", err, v)
	}
	for _, l := range strings.Split(string(mustRead(t, filepath.Join(out, "results.csv"))), "\n")[1:] {
		if strings.Contains(l, ",error,") {
			t.Errorf("a row is an error (half-written file analysed?): %.120s", l)
		}
	}
	// The watch holds the folder between its publications: another run
	// into it is refused as busy, and the set stays the watch's.
	if code, _, errs := runCmd(t, "run", demo[2], "--out", out, "--force", "-q"); code != exitUsage || !strings.Contains(errs, "is being written by process") {
		t.Errorf("a run into the watched folder: exit %d, %q; want a usage error naming the watch's process", code, errs)
	}
	if rows() != 2 {
		t.Errorf("the watched set has %d rows after the refused run, want 2", rows())
	}
	cancel()
	if code := <-done; code != exitOK {
		t.Fatalf("watch exit %d: %s", code, stderr.String())
	}
	// A restart redoes nothing: both files come from the journal.
	ctx, cancel = context.WithCancel(context.Background())
	done, stderr = watch(ctx)
	waitFor("the restarted watch to publish", func() bool { return strings.Contains(stderr.String(), "updated") })
	// A second watch of the folder stops at once, as a usage error.
	ctx2, cancel2 := context.WithCancel(context.Background())
	second, errs2 := watch(ctx2)
	select {
	case code := <-second:
		if code != exitUsage || !strings.Contains(errs2.String(), "is being written by process") {
			t.Errorf("a second watch of the folder: exit %d, %q; want a usage error naming the first", code, errs2.String())
		}
	case <-time.After(20 * time.Second):
		t.Error("a second watch of the folder did not stop")
		cancel2()
		<-second
	}
	cancel2()
	cancel()
	<-done
	if !strings.Contains(stderr.String(), "resumed: 2 files taken from the journal") {
		t.Errorf("restart analysed again: %s", stderr.String())
	}
	if _, err := os.Stat(filepath.Join(filepath.Dir(out), ".out.lock")); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("the ended watch left its lock file (%v)", err)
	}
}

func mustRead(t *testing.T, p string) []byte {
	t.Helper()
	b, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// lockedText is a strings.Builder that a running command writes while the
// test reads it.
type lockedText struct {
	mu sync.Mutex
	b  strings.Builder
}

func (l *lockedText) Write(p []byte) (int, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.Write(p)
}

func (l *lockedText) String() string {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.String()
}
