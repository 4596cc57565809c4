//go:build unix

package csvdata_test

import (
	"path/filepath"
	"reflect"
	"syscall"
	"testing"

	"dlsbatch/io/csvdata"
)

// A named pipe named as an input is a problem (reading it would wait for a
// writer); one named *.csv inside a folder is skipped like any entry that
// is not a regular file.
func TestDiscoverNotRegular(t *testing.T) {
	dir := t.TempDir()
	tree(t, dir, "data/a.csv")
	for _, p := range []string{"pipe.csv", "data/pipe.csv"} {
		if err := syscall.Mkfifo(filepath.Join(dir, p), 0o644); err != nil {
			t.Skipf("cannot make a named pipe here: %v", err)
		}
	}
	got := csvdata.Discover([]string{filepath.Join(dir, "pipe.csv"), filepath.Join(dir, "data")})
	if want := []string{filepath.Join(dir, "data", "a.csv")}; !reflect.DeepEqual(got.Files, want) {
		t.Errorf("files %q, want %q", got.Files, want)
	}
	if p, want := problemFiles(got), []string{filepath.Join(dir, "pipe.csv")}; !reflect.DeepEqual(p, want) {
		t.Fatalf("problems %q, want %q", p, want)
	}
	checkProblem(t, got.Problems[0], csvdata.ErrNotRegular, "not a regular file or a folder")
}
