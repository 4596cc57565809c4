package atomicfile

import (
	"bytes"
	"os"
	"path/filepath"
	"testing"
)

// TestWriteStaged: the data arrive whole and replace a longer file's
// content (truncated, not overwritten in part), the mode is 0644 less the
// umask, and a missing folder is an error naming the path (once). The writeback
// it starts is a hint whose effect a test cannot see; starting it on a
// pipe, where sync_file_range fails, must be harmless.
func TestWriteStaged(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "page.html")
	long := bytes.Repeat([]byte("x"), 1<<20)
	for _, data := range [][]byte{long, []byte("short\n")} {
		if err := WriteStaged(p, data); err != nil {
			t.Fatal(err)
		}
		got, err := os.ReadFile(p)
		if err != nil || !bytes.Equal(got, data) {
			t.Fatalf("read back %d bytes, %v; want %d", len(got), err, len(data))
		}
	}
	st, err := os.Stat(p)
	if err != nil {
		t.Fatal(err)
	}
	if st.Mode().Perm()&^0o644 != 0 || st.Mode().Perm()&0o600 != 0o600 {
		t.Errorf("mode %v, want 0644 less the umask", st.Mode().Perm())
	}
	missing := filepath.Join(dir, "no", "such.html")
	if err := WriteStaged(missing, nil); err == nil || bytes.Count([]byte(err.Error()), []byte(missing)) != 1 {
		t.Errorf("missing folder: %v, want an error naming %s once", err, missing)
	}
	r, w, err := os.Pipe()
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	defer w.Close()
	StartWriteback(w, 0, 0)
}
