package plainfile

import (
	"errors"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"testing"

	"golang.org/x/sys/unix"
)

// The reference is os.Open of the Go standard library: Open must read the
// same bytes and fail with the same kind of error, and leave the file
// close-on-exec and blocking (what os.Open leaves a regular file).
func TestOpenReadsAsOsOpen(t *testing.T) {
	path := filepath.Join(t.TempDir(), "run.csv")
	want := []byte("lag_s,g2\n1e-6,1.8\n")
	if err := os.WriteFile(path, want, 0o644); err != nil {
		t.Fatal(err)
	}
	f, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	got, err := io.ReadAll(f)
	if err != nil || string(got) != string(want) {
		t.Fatalf("read %q, %v; want %q", got, err, want)
	}
	if st, err := f.Stat(); err != nil || st.Size() != int64(len(want)) || f.Name() != path {
		t.Fatalf("stat %v, %v; name %q", st, err, f.Name())
	}
	fd := int(f.Fd())
	fl, err := unix.FcntlInt(uintptr(fd), unix.F_GETFL, 0)
	if err != nil || fl&unix.O_NONBLOCK != 0 {
		t.Errorf("file status flags %#x, %v: want blocking", fl, err)
	}
	fdfl, err := unix.FcntlInt(uintptr(fd), unix.F_GETFD, 0)
	if err != nil || fdfl&unix.FD_CLOEXEC == 0 {
		t.Errorf("descriptor flags %#x, %v: want close-on-exec", fdfl, err)
	}
}

func TestErrorsAsOsOpen(t *testing.T) {
	dir := t.TempDir()
	missing := filepath.Join(dir, "missing.csv")
	_, want := os.Open(missing)
	for name, err := range map[string]error{"Open": func() error { _, err := Open(missing); return err }(), "CanOpen": CanOpen(missing)} {
		var pe *fs.PathError
		if !errors.As(err, &pe) || pe.Op != "open" || pe.Path != missing || !errors.Is(err, fs.ErrNotExist) || err.Error() != want.Error() {
			t.Errorf("%s: %v; want %v", name, err, want)
		}
	}
	if err := CanOpen(dir); err != nil { // os.Open opens a folder for reading too
		t.Errorf("CanOpen(folder) = %v", err)
	}
	if os.Geteuid() != 0 { // root reads anything
		locked := filepath.Join(dir, "locked.csv")
		if err := os.WriteFile(locked, nil, 0o000); err != nil {
			t.Fatal(err)
		}
		if err := CanOpen(locked); !errors.Is(err, fs.ErrPermission) {
			t.Errorf("CanOpen(unreadable) = %v, want permission denied", err)
		}
	}
}

func TestCreateAsOsCreate(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "page.html")
	if err := os.WriteFile(path, []byte("an older and longer page"), 0o600); err != nil {
		t.Fatal(err)
	}
	f, err := Create(path, 0o644)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := f.WriteString("new"); err != nil {
		t.Fatal(err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	if got, err := os.ReadFile(path); err != nil || string(got) != "new" {
		t.Fatalf("after Create and write: %q, %v; want the file truncated", got, err)
	}
	fresh := filepath.Join(dir, "fresh.html")
	old := unix.Umask(0o022)
	defer unix.Umask(old)
	f, err = Create(fresh, 0o666)
	if err != nil {
		t.Fatal(err)
	}
	f.Close()
	if st, err := os.Stat(fresh); err != nil || st.Mode().Perm() != 0o644 {
		t.Errorf("mode %v, %v; want 0644 (0666 less the umask 022)", st.Mode(), err)
	}
	if _, err := Create(filepath.Join(dir, "no", "such", "folder"), 0o644); !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("Create in a missing folder: %v", err)
	}
}
