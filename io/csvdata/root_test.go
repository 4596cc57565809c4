package csvdata

import (
	"os"
	"path/filepath"
	"testing"
)

// TestRoot: the root is the deepest common folder of the paths named, the
// same however a path is typed (relative, absolute, with ./ or a trailing
// slash), and Rel gives forward-slash paths below it (cases built in a
// temporary tree; expected values follow from the definition).
func TestRoot(t *testing.T) {
	dir := t.TempDir()
	for _, d := range []string{"night/a", "night/b"} {
		if err := os.MkdirAll(filepath.Join(dir, d), 0o755); err != nil {
			t.Fatal(err)
		}
	}
	f := filepath.Join(dir, "night", "a", "x.csv")
	if err := os.WriteFile(f, []byte("tau_s,g2\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	t.Chdir(dir)
	night := filepath.Join(dir, "night")
	for _, tc := range []struct {
		name  string
		paths []string
		want  string
	}{
		{"one folder, relative", []string{"night"}, night},
		{"one folder, absolute with slash", []string{night + "/"}, night},
		{"one folder, dotted", []string{"./night/../night"}, night},
		{"one file", []string{"night/a/x.csv"}, filepath.Join(night, "a")},
		{"two folders", []string{"night/b", "night/a"}, night},
		{"folder and file", []string{night + "/a/x.csv", "night/b"}, night},
	} {
		got, err := Root(tc.paths)
		if err != nil || got != tc.want {
			t.Errorf("%s: Root = %q, %v; want %q", tc.name, got, err, tc.want)
		}
	}
	if got := Rel(night, "night/a/x.csv"); got != "a/x.csv" {
		t.Errorf("Rel = %q, want a/x.csv", got)
	}
	if got := Rel(filepath.Join(night, "a"), "night/b"); got != "../b" {
		t.Errorf("Rel outside = %q, want ../b", got)
	}
	if _, err := Root(nil); err == nil {
		t.Error("Root of nothing succeeded")
	}
	// A Namer takes the working directory once and must name every path
	// as filepath.Abs followed by filepath.Rel would (the definition).
	nm := NewNamer(night)
	for _, p := range []string{"night/a/x.csv", "./night/../night/b", night + "/a/x.csv", "night/a/", dir, "/", "x.csv", "../outside"} {
		a, err := filepath.Abs(p)
		if err != nil {
			t.Fatal(err)
		}
		r, err := filepath.Rel(night, a)
		if err != nil {
			t.Fatal(err)
		}
		if got, want := nm.Rel(p), filepath.ToSlash(r); got != want {
			t.Errorf("Namer.Rel(%q) = %q, want %q", p, got, want)
		}
	}
}
