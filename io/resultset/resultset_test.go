package resultset

import (
	"errors"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
)

func write(t *testing.T, p, s string) {
	t.Helper()
	if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(p, []byte(s), 0o644); err != nil {
		t.Fatal(err)
	}
}

func read(t *testing.T, p string) string {
	t.Helper()
	b, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// TestCommitReplacesWhole: a new set replaces the old one whole: a file
// only the old set had is gone, and no staging folder is left.
func TestCommitReplacesWhole(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	s, err := Open(out, nil, false)
	if err != nil {
		t.Fatal(err)
	}
	write(t, filepath.Join(s.Staging, "results.csv"), "old")
	write(t, filepath.Join(s.Staging, "report", "sample-0002.html"), "old page")
	if err := s.Commit(); err != nil {
		t.Fatal(err)
	}
	if _, err := Open(out, nil, false); !errors.Is(err, ErrExists) {
		t.Fatalf("reopen without force: %v, want ErrExists", err)
	}
	s, err = Open(out, nil, true)
	if err != nil {
		t.Fatal(err)
	}
	write(t, filepath.Join(s.Staging, "results.csv"), "new")
	if got := read(t, filepath.Join(out, "results.csv")); got != "old" {
		t.Fatalf("set changed before commit: %q", got)
	}
	if err := s.Commit(); err != nil {
		t.Fatal(err)
	}
	if got := read(t, filepath.Join(out, "results.csv")); got != "new" {
		t.Errorf("results.csv %q after commit", got)
	}
	if _, err := os.Stat(filepath.Join(out, "report", "sample-0002.html")); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("a page of the old set survived: %v", err)
	}
	left, _ := filepath.Glob(filepath.Join(dir, ".out.staging-*"))
	if len(left) != 0 {
		t.Errorf("staging folders left: %v", left)
	}
}

// TestAbortKeepsPrevious: an aborted run leaves the previous set as it was.
func TestAbortKeepsPrevious(t *testing.T) {
	out := filepath.Join(t.TempDir(), "out")
	s, _ := Open(out, nil, false)
	write(t, filepath.Join(s.Staging, "manifest.json"), "v1")
	if err := s.Commit(); err != nil {
		t.Fatal(err)
	}
	s, err := Open(out, nil, true)
	if err != nil {
		t.Fatal(err)
	}
	write(t, filepath.Join(s.Staging, "manifest.json"), "v2")
	s.Abort()
	if got := read(t, filepath.Join(out, "manifest.json")); got != "v1" {
		t.Errorf("manifest %q after abort, want v1", got)
	}
	if _, err := os.Stat(s.Staging); !errors.Is(err, os.ErrNotExist) {
		t.Error("staging folder left after abort")
	}
}

// TestLock: a second Open of a folder being written fails at once with
// ErrBusy and names this process; after the first is done it succeeds.
// (flock locks belong to open file descriptions, so two Opens in one
// process conflict just as two processes do.)
func TestLock(t *testing.T) {
	out := filepath.Join(t.TempDir(), "out")
	s, err := Open(out, nil, false)
	if err != nil {
		t.Fatal(err)
	}
	_, err = Open(out, nil, true)
	if !errors.Is(err, ErrBusy) || !strings.Contains(err.Error(), "process "+strconv.Itoa(os.Getpid())) {
		t.Fatalf("second open: %v, want ErrBusy naming pid %d", err, os.Getpid())
	}
	s.Abort()
	s2, err := Open(out, nil, true)
	if err != nil {
		t.Fatalf("open after release: %v", err)
	}
	s2.Abort()
}

// TestLockFileRemoved: a run that commits or aborts leaves no lock file
// beside the folder; one left by a killed run (a PID, no flock held) is
// taken over and removed in turn.
func TestLockFileRemoved(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	lock := filepath.Join(dir, ".out.lock")
	gone := func(when string) {
		t.Helper()
		if _, err := os.Stat(lock); !errors.Is(err, os.ErrNotExist) {
			t.Errorf("%s: lock file %s left (%v)", when, lock, err)
		}
	}
	s, err := Open(out, nil, false)
	if err != nil {
		t.Fatal(err)
	}
	write(t, filepath.Join(s.Staging, "results.csv"), "a")
	if err := s.Commit(); err != nil {
		t.Fatal(err)
	}
	gone("after Commit")
	if s, err = Open(out, nil, true); err != nil {
		t.Fatal(err)
	}
	s.Abort()
	gone("after Abort")
	write(t, lock, "99999999\n") // a killed run's
	if s, err = Open(out, nil, true); err != nil {
		t.Fatalf("open over a stale lock file: %v", err)
	}
	if got := strings.TrimSpace(read(t, lock)); got != strconv.Itoa(os.Getpid()) {
		t.Errorf("lock file holds %q, want this process's PID", got)
	}
	s.Abort()
	gone("after taking over a stale lock file")
}

// TestLockExclusiveWhileRemoved: goroutines opening the same folder over
// and over (each open is its own flock, as another process's would be)
// never hold it two at once, although every release removes the lock file
// that others may have open. A race test: without the check that the path
// still names the locked file, it saw two holders in 7 of 10 runs.
func TestLockExclusiveWhileRemoved(t *testing.T) {
	out := filepath.Join(t.TempDir(), "out")
	var holders, most, taken atomic.Int32
	var wg sync.WaitGroup
	for range 4 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for range 1000 {
				s, err := Open(out, nil, true)
				if errors.Is(err, ErrBusy) {
					continue
				}
				if err != nil {
					t.Error(err)
					return
				}
				n := holders.Add(1)
				for m := most.Load(); n > m && !most.CompareAndSwap(m, n); m = most.Load() {
				}
				taken.Add(1)
				runtime.Gosched() // hold it a little, so that others try meanwhile
				holders.Add(-1)
				s.Abort()
			}
		}()
	}
	wg.Wait()
	if m := most.Load(); m != 1 {
		t.Errorf("at most %d holders at once, want 1", m)
	}
	if taken.Load() == 0 {
		t.Error("no open succeeded")
	}
}

// TestHeldLock: a Lock held across two runs into its folder (a watch's):
// each run opens and commits under it, another opener meanwhile is
// refused as busy, the lock file stays until Release removes it, and a
// Lock is refused, as Open is, for a folder inside an input folder.
func TestHeldLock(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	l, err := TakeLock(out, nil)
	if err != nil {
		t.Fatal(err)
	}
	for k, data := range []string{"first", "second"} {
		s, err := l.Open(nil, true)
		if err != nil {
			t.Fatalf("run %d under the lock: %v", k, err)
		}
		write(t, filepath.Join(s.Staging, "results.csv"), data)
		if _, err := Open(out, nil, true); !errors.Is(err, ErrBusy) {
			t.Errorf("run %d: another open: %v, want ErrBusy", k, err)
		}
		if err := s.Commit(); err != nil {
			t.Fatal(err)
		}
		if got := read(t, filepath.Join(out, "results.csv")); got != data {
			t.Errorf("run %d published %q, want %q", k, got, data)
		}
		if _, err := Open(out, nil, true); !errors.Is(err, ErrBusy) {
			t.Errorf("between runs: another open: %v, want ErrBusy", err)
		}
	}
	l.Release()
	if _, err := os.Stat(filepath.Join(dir, ".out.lock")); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("lock file left after Release (%v)", err)
	}
	s, err := Open(out, nil, true)
	if err != nil {
		t.Fatalf("open after Release: %v", err)
	}
	s.Abort()
	in := filepath.Join(dir, "in")
	if _, err := TakeLock(filepath.Join(in, "out"), []string{in}); err == nil || !strings.Contains(err.Error(), "inside") {
		t.Errorf("a lock for a folder inside an input folder: %v, want a refusal", err)
	}
	if _, err := os.Stat(in); !errors.Is(err, os.ErrNotExist) {
		t.Error("refusing the lock created the input folder")
	}
}

// TestRefusals: a folder of other files, a file, an input folder, a folder
// inside one, a folder holding an input, and a symbolic link into an input
// folder are all refused before anything is written.
func TestRefusals(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "data")
	write(t, filepath.Join(in, "a.csv"), "x")
	write(t, filepath.Join(dir, "thesis", "chapter1.tex"), "x")
	write(t, filepath.Join(dir, "afile"), "x")
	if err := os.Symlink(in, filepath.Join(dir, "link")); err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name, out, want string
	}{
		{"foreign files", filepath.Join(dir, "thesis"), "which no result set holds"},
		{"a file", filepath.Join(dir, "afile"), "not a folder"},
		{"the input", in, "is the input"},
		{"inside the input", filepath.Join(in, "out"), "inside the input"},
		{"holds the input", dir, "holds the input"},
		{"link to the input", filepath.Join(dir, "link"), "is the input"},
	} {
		s, err := Open(tc.out, []string{in}, true)
		if err == nil {
			s.Abort()
			t.Errorf("%s: accepted", tc.name)
			continue
		}
		if !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: %v, want %q", tc.name, err, tc.want)
		}
	}
	if got := read(t, filepath.Join(dir, "thesis", "chapter1.tex")); got != "x" {
		t.Error("a refused folder was changed")
	}
}

// TestSymlinkedOut: --out naming a link to a folder writes into the
// folder, and the link stays a link.
func TestSymlinkedOut(t *testing.T) {
	dir := t.TempDir()
	real := filepath.Join(dir, "real")
	if err := os.Mkdir(real, 0o755); err != nil {
		t.Fatal(err)
	}
	link := filepath.Join(dir, "link")
	if err := os.Symlink(real, link); err != nil {
		t.Fatal(err)
	}
	s, err := Open(link, nil, false)
	if err != nil {
		t.Fatal(err)
	}
	write(t, filepath.Join(s.Staging, "results.csv"), "r")
	if err := s.Commit(); err != nil {
		t.Fatal(err)
	}
	if got := read(t, filepath.Join(link, "results.csv")); got != "r" {
		t.Errorf("through the link: %q", got)
	}
	if st, err := os.Lstat(link); err != nil || st.Mode()&os.ModeSymlink == 0 {
		t.Error("the link was replaced")
	}
}

// TestStaleStagingRemoved: the staging folder of a killed run is removed
// by the next run.
func TestStaleStagingRemoved(t *testing.T) {
	dir := t.TempDir()
	stale := filepath.Join(dir, ".out.staging-99999999")
	write(t, filepath.Join(stale, "results.csv"), "half")
	s, err := Open(filepath.Join(dir, "out"), nil, false)
	if err != nil {
		t.Fatal(err)
	}
	defer s.Abort()
	if _, err := os.Stat(stale); !errors.Is(err, os.ErrNotExist) {
		t.Error("stale staging folder kept")
	}
}

// An output folder inside an input folder is refused, also when one of
// them is named through a link (Discover searches a linked folder, so its
// target is input too); a sibling folder whose name starts like the input's
// is not inside it.
func TestOutsideLinks(t *testing.T) {
	dir := t.TempDir()
	tree(t, dir, "real/a.csv", "elsewhere/")
	link(t, filepath.Join(dir, "real"), filepath.Join(dir, "night"))
	j := func(s string) string { return filepath.Join(dir, s) }
	cases := []struct {
		out, in string
		refused bool
	}{
		{j("real/o"), j("real"), true},
		{j("real/o"), j("night"), true},
		{j("night/o/deeper"), j("real"), true},
		{j("night"), j("real"), true},
		{j("elsewhere/o"), j("night"), false},
		{j("realm/o"), j("real"), false},
		{j("real/a.csv"), j("night/a.csv"), true},
	}
	for _, c := range cases {
		err := openAndAbort(c.out, []string{c.in})
		if (err != nil) != c.refused {
			t.Errorf("Open(%s, inputs %s) = %v, want refused %v", c.out, c.in, err, c.refused)
		}
	}
}

func openAndAbort(out string, inputs []string) error {
	s, err := Open(out, inputs, true)
	if err == nil {
		s.Abort()
	}
	return err
}

func tree(t *testing.T, dir string, names ...string) {
	t.Helper()
	for _, n := range names {
		p := filepath.Join(dir, n)
		if strings.HasSuffix(n, "/") {
			os.MkdirAll(p, 0o755)
			continue
		}
		write(t, p, "x")
	}
}

func link(t *testing.T, target, name string) {
	t.Helper()
	if err := os.Symlink(target, name); err != nil {
		t.Fatal(err)
	}
}
