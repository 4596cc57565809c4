// Package resultset publishes a run's output folder whole or not at all.
//
// A run opens the folder named by --out: Open resolves it (a symbolic link
// is followed once), refuses a folder that lies inside an input folder or
// that holds anything but an earlier result set, takes an exclusive lock
// (flock(2) on a lock file beside the folder, released by the kernel when
// the process dies, whatever the way), and creates a fresh staging folder
// beside it. Everything is written into the staging folder; Commit flushes
// the file system and swaps the staging folder into place in one step
// (renameat2(2) with RENAME_EXCHANGE, or two renames where the file system
// cannot exchange), then removes the previous set. A run killed at any
// point therefore leaves the previous set whole (or no folder at all), and
// no file of an earlier run can survive beside the new ones.
//
// While a run writes, the package keeps beside DIR .DIR.lock (holding the
// PID of the run that holds it; removed as the lock is released) and
// .DIR.staging-PID; a killed run's lock file and staging folder are taken
// over or removed by the next run.
package resultset

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"golang.org/x/sys/unix"
)

// ErrBusy reports an output folder locked by another running process.
var ErrBusy = errors.New("output folder in use")

// ErrExists reports an output folder that holds a result set already and
// may not be replaced (no force).
var ErrExists = errors.New("output folder holds results")

// Members are the names a result set may hold at its top level: anything
// else in an existing folder makes Open refuse it, so a mistyped --out can
// never replace a folder of other files.
func Members() []string {
	return []string{"results.csv", "samples.csv", "results.json", "manifest.json", "summary.txt", "report", "journal"}
}

// Set is an output folder opened for writing.
type Set struct {
	// Dir is the output folder (absolute, symbolic links resolved).
	Dir string
	// Staging is the folder to write into; Commit swaps it into Dir.
	Staging string
	lock    *os.File // nil under a held Lock
	done    bool
}

// Open prepares the output folder dir for a run. inputs are the input
// paths of the run (files or folders): dir may neither be one nor lie
// inside one. force allows replacing an existing result set. Errors name
// the folder and say what to do.
func Open(dir string, inputs []string, force bool) (*Set, error) {
	return open(dir, inputs, force, nil)
}

// Open is Open for the folder of l, whose lock it uses and leaves held.
func (l *Lock) Open(inputs []string, force bool) (*Set, error) {
	return open(l.typed, inputs, force, l)
}

func open(dir string, inputs []string, force bool, held *Lock) (*Set, error) {
	abs, exists, err := resolve(dir)
	if err != nil {
		return nil, err
	}
	if err := checkOutside(abs, dir, inputs); err != nil {
		return nil, err
	}
	parent := filepath.Dir(abs)
	if err := os.MkdirAll(parent, 0o755); err != nil {
		return nil, fmt.Errorf("--out %s: %w", dir, err)
	}
	s := &Set{Dir: abs}
	switch {
	case held == nil:
		if s.lock, err = takeLock(abs, dir); err != nil {
			return nil, err
		}
	case held.dir != abs:
		return nil, fmt.Errorf("--out %s: the lock held is of %s", dir, held.dir)
	}
	if exists {
		if err := checkReplaceable(abs, dir, force); err != nil {
			s.release()
			return nil, err
		}
	}
	base := filepath.Base(abs)
	stale, _ := filepath.Glob(filepath.Join(parent, "."+base+".staging-*"))
	for _, p := range stale { // the lock is ours: nobody else is writing them
		os.RemoveAll(p)
	}
	s.Staging = filepath.Join(parent, "."+base+".staging-"+strconv.Itoa(os.Getpid()))
	if err := os.Mkdir(s.Staging, 0o755); err != nil {
		s.release()
		return nil, fmt.Errorf("--out %s: cannot write beside it: %w", dir, err)
	}
	return s, nil
}

// resolve names the output folder dir absolutely, a symbolic link followed
// once and links in the longest existing part of the path resolved, and
// says whether it exists (as a folder: anything else is an error).
func resolve(dir string) (abs string, exists bool, err error) {
	if abs, err = filepath.Abs(dir); err != nil {
		return "", false, fmt.Errorf("--out %s: %w", dir, err)
	}
	if st, err := os.Lstat(abs); err == nil {
		if st.Mode()&os.ModeSymlink != 0 {
			if abs, err = filepath.EvalSymlinks(abs); err != nil {
				return "", false, fmt.Errorf("--out %s: %w", dir, err)
			}
			if st, err = os.Stat(abs); err != nil {
				return "", false, fmt.Errorf("--out %s: %w", dir, err)
			}
		}
		if !st.IsDir() {
			return "", false, fmt.Errorf("--out %s exists and is not a folder", dir)
		}
		exists = true
	} else if !errors.Is(err, os.ErrNotExist) {
		return "", false, fmt.Errorf("--out %s: %w", dir, err)
	}
	return resolveExisting(abs), exists, nil
}

// Lock is the lock of an output folder held across several runs into it:
// a watch holds it between its publications, so that no other run writes
// the folder meanwhile. Lock.Open opens the folder under it.
type Lock struct {
	dir, typed string // the folder (as Open resolves it) and as named
	f          *os.File
}

// TakeLock takes the lock of the output folder dir (ErrBusy when another
// process holds it), refusing it as Open does when it is or lies inside
// one of inputs.
func TakeLock(dir string, inputs []string) (*Lock, error) {
	abs, _, err := resolve(dir)
	if err != nil {
		return nil, err
	}
	if err := checkOutside(abs, dir, inputs); err != nil {
		return nil, err
	}
	if err := os.MkdirAll(filepath.Dir(abs), 0o755); err != nil {
		return nil, fmt.Errorf("--out %s: %w", dir, err)
	}
	f, err := takeLock(abs, dir)
	if err != nil {
		return nil, err
	}
	return &Lock{dir: abs, typed: dir, f: f}, nil
}

// Release removes the lock file and releases the lock.
func (l *Lock) Release() {
	if l.f != nil {
		unlock(l.f)
		l.f = nil
	}
}

// LockPath is the lock file of the output folder dir (absolute).
func LockPath(dir string) string {
	return filepath.Join(filepath.Dir(dir), "."+filepath.Base(dir)+".lock")
}

// takeLock takes the lock file of the output folder. The holder removes
// the file as it releases the lock (release), so a finished run leaves
// nothing beside the folder; a run that dies leaves it, with its PID, for
// the next to take. Since the file can be removed between our open and
// our flock, the lock is ours only when the path still names the file we
// locked; otherwise the lock is taken again on the new file.
func takeLock(dir, typed string) (*os.File, error) {
	p := LockPath(dir)
	for range 100 {
		f, err := os.OpenFile(p, os.O_RDWR|os.O_CREATE, 0o644)
		if err != nil {
			return nil, fmt.Errorf("--out %s: cannot create the lock file %s: %w", typed, p, err)
		}
		if err := unix.Flock(int(f.Fd()), unix.LOCK_EX|unix.LOCK_NB); err != nil {
			holder := "another process"
			if b, rerr := io.ReadAll(io.LimitReader(f, 32)); rerr == nil {
				if pid, perr := strconv.Atoi(strings.TrimSpace(string(b))); perr == nil && pid > 0 {
					holder = "process " + strconv.Itoa(pid)
				}
			}
			f.Close()
			if errors.Is(err, unix.EWOULDBLOCK) {
				return nil, fmt.Errorf("--out %s is being written by %s (lock %s): %w", typed, holder, p, ErrBusy)
			}
			return nil, fmt.Errorf("--out %s: lock %s: %w", typed, p, err)
		}
		if !sameFile(f, p) {
			f.Close() // locked a file its holder removed as it finished
			continue
		}
		if err := f.Truncate(0); err == nil {
			f.WriteAt([]byte(strconv.Itoa(os.Getpid())+"\n"), 0)
		}
		return f, nil
	}
	return nil, fmt.Errorf("--out %s: lock %s keeps being replaced: %w", typed, p, ErrBusy)
}

// sameFile reports whether path names the open file f.
func sameFile(f *os.File, path string) bool {
	a, err := f.Stat()
	if err != nil {
		return false
	}
	b, err := os.Stat(path)
	return err == nil && os.SameFile(a, b)
}

// release releases the set's own lock (not a held Lock).
func (s *Set) release() {
	if s.lock != nil {
		unlock(s.lock)
		s.lock = nil
	}
}

// unlock removes the lock file and releases the lock: removed while held,
// so that no other process can take a lock on it that a third, creating
// the file anew, would not see.
func unlock(f *os.File) {
	os.Remove(f.Name())
	f.Close() // closing the descriptor releases the flock
}

// checkReplaceable refuses a folder with foreign content, and one holding
// a result set unless force.
func checkReplaceable(abs, typed string, force bool) error {
	entries, err := os.ReadDir(abs)
	if err != nil {
		return fmt.Errorf("--out %s: %w", typed, err)
	}
	known := map[string]bool{}
	for _, m := range Members() {
		known[m] = true
	}
	for _, e := range entries {
		if !known[e.Name()] {
			return fmt.Errorf("--out %s holds %s, which no result set holds; name a new or empty folder (a run replaces the whole folder)", typed, e.Name())
		}
	}
	if len(entries) > 0 && !force {
		return fmt.Errorf("--out %s holds results already; use --force to replace them: %w", typed, ErrExists)
	}
	return nil
}

// checkOutside refuses an output folder that is an input, lies inside an
// input folder, or holds an input (the next run would read its own
// outputs, or replacing it would remove inputs). Paths are compared with
// symbolic links resolved.
func checkOutside(out, typed string, inputs []string) error {
	for _, in := range inputs {
		ai, err := filepath.Abs(in)
		if err != nil {
			continue
		}
		if r, err := filepath.EvalSymlinks(ai); err == nil {
			ai = r
		}
		if ai == out {
			return fmt.Errorf("--out %s is the input %s; choose a folder outside the inputs", typed, in)
		}
		if within(out, ai) {
			return fmt.Errorf("--out %s lies inside the input folder %s; choose a folder outside the inputs", typed, in)
		}
		if within(ai, out) {
			return fmt.Errorf("--out %s holds the input %s; choose a folder outside the inputs", typed, in)
		}
	}
	return nil
}

// resolveExisting resolves the links of the longest leading part of the
// absolute path p that exists and appends the rest (an output folder need
// not exist yet).
func resolveExisting(p string) string {
	rest := ""
	for {
		if r, err := filepath.EvalSymlinks(p); err == nil {
			return filepath.Join(r, rest)
		}
		parent := filepath.Dir(p)
		if parent == p {
			return filepath.Join(p, rest)
		}
		rest = filepath.Join(filepath.Base(p), rest)
		p = parent
	}
}

// within reports whether p lies strictly inside dir.
func within(p, dir string) bool {
	r, err := filepath.Rel(dir, p)
	return err == nil && r != "." && r != ".." && !strings.HasPrefix(r, ".."+string(filepath.Separator))
}

// Commit flushes what was written into the staging folder to disk and
// swaps it into place; the previous set, if any, is removed. The lock is
// released.
func (s *Set) Commit() error {
	if s.done {
		return errors.New("resultset: committed or aborted already")
	}
	s.done = true
	defer s.release()
	if err := syncTree(s.Staging); err != nil {
		return fmt.Errorf("output folder: %w", err)
	}
	if _, err := os.Stat(s.Dir); errors.Is(err, os.ErrNotExist) {
		if err := os.Rename(s.Staging, s.Dir); err != nil {
			return fmt.Errorf("output folder: %w", err)
		}
		return syncDir(filepath.Dir(s.Dir))
	}
	err := unix.Renameat2(unix.AT_FDCWD, s.Staging, unix.AT_FDCWD, s.Dir, unix.RENAME_EXCHANGE)
	if errors.Is(err, unix.EINVAL) || errors.Is(err, unix.ENOSYS) || errors.Is(err, unix.EOPNOTSUPP) {
		// No atomic exchange here: move the old set aside, then the new in.
		old := s.Staging + ".old"
		if err := os.Rename(s.Dir, old); err != nil {
			return fmt.Errorf("output folder: %w", err)
		}
		if err := os.Rename(s.Staging, s.Dir); err != nil {
			os.Rename(old, s.Dir)
			return fmt.Errorf("output folder: %w", err)
		}
		syncDir(filepath.Dir(s.Dir))
		return os.RemoveAll(old)
	}
	if err != nil {
		return fmt.Errorf("output folder: %w", err)
	}
	if err := syncDir(filepath.Dir(s.Dir)); err != nil {
		return err
	}
	return os.RemoveAll(s.Staging) // now the previous set
}

// Abort removes the staging folder and releases the lock; the output
// folder stays as it was. It may be called after Commit (it then does
// nothing), so callers can defer it.
func (s *Set) Abort() {
	if s.done {
		return
	}
	s.done = true
	os.RemoveAll(s.Staging)
	s.release()
}

// syncTree flushes the file system that holds dir (one syncfs(2) call for
// all files written), and dir itself.
func syncTree(dir string) error {
	f, err := os.Open(dir)
	if err != nil {
		return err
	}
	defer f.Close()
	if err := unix.Syncfs(int(f.Fd())); err != nil {
		return err
	}
	return nil
}

func syncDir(dir string) error {
	f, err := os.Open(dir)
	if err != nil {
		return err
	}
	defer f.Close()
	if err := f.Sync(); err != nil && !errors.Is(err, unix.EINVAL) {
		return err
	}
	return nil
}
