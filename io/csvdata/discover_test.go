package csvdata_test

import (
	"errors"
	"io/fs"
	"os"
	"path/filepath"
	"reflect"
	"testing"

	"dlsbatch/io/csvdata"
)

func TestDiscover(t *testing.T) {
	dir := t.TempDir()
	files := []string{
		"b.csv", "a.CSV", "notes.txt", "sub/c.csv", "sub/deeper/d.Csv", ".git/e.csv", "sub/.hidden/f.csv", ".g.csv", "named.dat",
	}
	for _, f := range files {
		p := filepath.Join(dir, f)
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(p, []byte("tau_s,g2\n"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	if err := os.Symlink(filepath.Join(dir, "b.csv"), filepath.Join(dir, "sub", "link.csv")); err != nil {
		t.Fatal(err)
	}
	j := func(s string) string { return filepath.Join(dir, s) }

	got, errs := csvdata.Discover([]string{
		j("sub"), dir, j("named.dat"), j("./b.csv"), j("missing"),
	})
	want := []string{j("a.CSV"), j("b.csv"), j("named.dat"), j("sub/c.csv"), j("sub/deeper/d.Csv"), j("sub/link.csv")}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("Discover =\n%q\nwant\n%q", got, want)
	}
	if len(errs) != 1 || !errors.Is(errs[0], fs.ErrNotExist) {
		t.Errorf("errors %v, want one for the missing path", errs)
	}

	// The same set in another order gives the same list.
	again, _ := csvdata.Discover([]string{j("named.dat"), dir, j("sub")})
	if !reflect.DeepEqual(again, want) {
		t.Errorf("order-dependent result %q", again)
	}
}

func TestDiscoverUnreadable(t *testing.T) {
	if os.Geteuid() == 0 {
		t.Skip("permissions do not bind root")
	}
	dir := t.TempDir()
	locked := filepath.Join(dir, "locked")
	if err := os.Mkdir(locked, 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "ok.csv"), nil, 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.Chmod(locked, 0); err != nil {
		t.Fatal(err)
	}
	defer os.Chmod(locked, 0o755)
	got, errs := csvdata.Discover([]string{dir})
	if len(got) != 1 || len(errs) != 1 || !errors.Is(errs[0], fs.ErrPermission) {
		t.Errorf("got %q errors %v, want ok.csv and one permission error", got, errs)
	}
}
