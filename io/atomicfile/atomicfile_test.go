package atomicfile

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"testing"
)

// TestWrite: the data arrive whole, an existing file is replaced, the mode
// is 0644 less the umask (0022 under go test's usual environment gives
// 0644; the test only asserts that no bit beyond 0644 is set), and no
// temporary file is left behind.
func TestWrite(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "a.txt")
	for _, data := range []string{"first\n", "second, longer\n"} {
		if err := Write(p, []byte(data)); err != nil {
			t.Fatal(err)
		}
		got, err := os.ReadFile(p)
		if err != nil || string(got) != data {
			t.Fatalf("read back %q, %v; want %q", got, err, data)
		}
	}
	st, err := os.Stat(p)
	if err != nil {
		t.Fatal(err)
	}
	if st.Mode().Perm()&^0o644 != 0 || st.Mode().Perm()&0o600 != 0o600 {
		t.Errorf("mode %v, want 0644 less the umask", st.Mode().Perm())
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 1 {
		t.Errorf("%d entries in the folder, want only the file", len(entries))
	}
}

// TestWriteFromError: a failing writer leaves the old file and no
// temporary file.
func TestWriteFromError(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "a.txt")
	if err := Write(p, []byte("old")); err != nil {
		t.Fatal(err)
	}
	boom := errors.New("boom")
	err := WriteFrom(p, func(w io.Writer) error {
		w.Write([]byte("partial"))
		return boom
	})
	if !errors.Is(err, boom) {
		t.Fatalf("error %v, want boom", err)
	}
	if got, _ := os.ReadFile(p); string(got) != "old" {
		t.Errorf("file now %q, want the old content", got)
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 1 {
		t.Errorf("%d entries in the folder, want only the old file", len(entries))
	}
	if err := Write(filepath.Join(dir, "missing", "b.txt"), nil); err == nil {
		t.Error("write into a missing folder succeeded")
	}
}
