package csvdata_test

import (
	"errors"
	"io/fs"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"syscall"
	"testing"

	"dlsbatch/dls"
	"dlsbatch/io/csvdata"
)

// tree creates files (with a header line each) and folders (names ending
// in "/") below dir.
func tree(t *testing.T, dir string, names ...string) {
	t.Helper()
	for _, n := range names {
		p := filepath.Join(dir, n)
		if strings.HasSuffix(n, "/") {
			if err := os.MkdirAll(p, 0o755); err != nil {
				t.Fatal(err)
			}
			continue
		}
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(p, []byte("tau_s,g2\n"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// link makes a symbolic link at dir/name pointing to target (as written),
// skipping the test where the system does not allow links.
func link(t *testing.T, target, name string) {
	t.Helper()
	if err := os.Symlink(target, name); err != nil {
		t.Skipf("cannot make symbolic links here: %v", err)
	}
}

func problemFiles(f *csvdata.Found) []string {
	var out []string
	for _, p := range f.Problems {
		out = append(out, p.File)
	}
	return out
}

func TestDiscover(t *testing.T) {
	dir := t.TempDir()
	tree(t, dir, "b.csv", "a.CSV", "notes.txt", "sub/c.csv", "sub/deeper/d.Csv", ".git/e.csv", "sub/.hidden/f.csv", ".g.csv", "named.dat")
	link(t, filepath.Join(dir, "b.csv"), filepath.Join(dir, "sub", "link.csv"))
	j := func(s string) string { return filepath.Join(dir, s) }

	got := csvdata.Discover([]string{j("sub"), dir, j("named.dat"), j("./b.csv")})
	want := []string{j("a.CSV"), j("b.csv"), j("named.dat"), j("sub/c.csv"), j("sub/deeper/d.Csv"), j("sub/link.csv")}
	if !reflect.DeepEqual(got.Files, want) || len(got.Problems) != 0 {
		t.Errorf("Discover =\n%q\nproblems %q\nwant\n%q", got.Files, problemFiles(got), want)
	}
	// The same set in another order gives the same list.
	again := csvdata.Discover([]string{j("named.dat"), dir, j("sub")})
	if !reflect.DeepEqual(again.Files, want) {
		t.Errorf("order-dependent result %q", again.Files)
	}
}

// TestDiscoverResultSets: a folder below the searched one that holds a
// dlsbatch result set (an earlier run's output moved beside the data) is
// left out, its results.csv and samples.csv with it, and listed; a folder
// with another program's manifest.json is searched; a result set named as
// the input folder is a problem wrapping ErrResultSet.
func TestDiscoverResultSets(t *testing.T) {
	dir := t.TempDir()
	tree(t, dir, "a.csv", "old-results/results.csv", "old-results/samples.csv", "other/manifest.csv", "other/b.csv")
	j := func(s string) string { return filepath.Join(dir, s) }
	for name, body := range map[string]string{
		"old-results/manifest.json": "{\n \"tool\": \"dlsbatch\",\n \"version\": \"x\"\n}\n",
		"other/manifest.json":       `{"tool": "something else"}`,
	} {
		if err := os.WriteFile(j(name), []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	got := csvdata.Discover([]string{dir})
	want := []string{j("a.csv"), j("other/b.csv"), j("other/manifest.csv")}
	if !reflect.DeepEqual(got.Files, want) || !reflect.DeepEqual(got.ResultSets, []string{j("old-results")}) || len(got.Problems) != 0 {
		t.Errorf("files %q, result sets %q, problems %q; want %q and the old results left out", got.Files, got.ResultSets, problemFiles(got), want)
	}
	named := csvdata.Discover([]string{j("old-results")})
	if len(named.Files) != 0 || len(named.Problems) != 1 || !errors.Is(named.Problems[0].Err, csvdata.ErrResultSet) {
		t.Errorf("a result set named as input: files %q, problems %v; want one problem wrapping ErrResultSet", named.Files, named.Problems)
	}
}

// Every input that cannot be read is a problem with the path and a reason;
// the other inputs are still found. The cases are built with real links in
// a temporary folder; the behaviour expected is that of POSIX path
// resolution (a link whose target is missing, links that form a loop:
// ENOENT, ELOOP).
func TestDiscoverProblems(t *testing.T) {
	cases := []struct {
		name string
		// setup builds the case in dir and returns the paths to discover.
		setup    func(t *testing.T, dir string) []string
		files    []string // relative to dir
		problems []string // relative to dir
		is       error    // what each problem's error wraps
		says     string   // what each problem's message says
	}{
		{"missing path", func(t *testing.T, dir string) []string {
			tree(t, dir, "ok.csv")
			return []string{filepath.Join(dir, "ok.csv"), filepath.Join(dir, "missing"), filepath.Join(dir, "missing")}
		}, []string{"ok.csv"}, []string{"missing"}, fs.ErrNotExist, "cannot stat"},
		{"dangling link named", func(t *testing.T, dir string) []string {
			link(t, filepath.Join(dir, "gone.csv"), filepath.Join(dir, "dangling.csv"))
			return []string{filepath.Join(dir, "dangling.csv")}
		}, nil, []string{"dangling.csv"}, fs.ErrNotExist, "symbolic link cannot be followed"},
		{"dangling link in a folder", func(t *testing.T, dir string) []string {
			tree(t, dir, "data/a.csv")
			link(t, filepath.Join(dir, "gone.csv"), filepath.Join(dir, "data", "dangling.csv"))
			link(t, filepath.Join(dir, "gone.txt"), filepath.Join(dir, "data", "dangling.txt")) // not a *.csv: not an input
			return []string{filepath.Join(dir, "data")}
		}, []string{"data/a.csv"}, []string{"data/dangling.csv"}, fs.ErrNotExist, "symbolic link cannot be followed"},
		{"link loop in a folder", func(t *testing.T, dir string) []string {
			tree(t, dir, "data/a.csv")
			link(t, "loop2.csv", filepath.Join(dir, "data", "loop1.csv"))
			link(t, "loop1.csv", filepath.Join(dir, "data", "loop2.csv"))
			return []string{filepath.Join(dir, "data")}
		}, []string{"data/a.csv"}, []string{"data/loop1.csv", "data/loop2.csv"}, syscall.ELOOP, "symbolic link cannot be followed"},
		{"link loop named", func(t *testing.T, dir string) []string {
			link(t, "self.csv", filepath.Join(dir, "self.csv"))
			return []string{filepath.Join(dir, "self.csv")}
		}, nil, []string{"self.csv"}, syscall.ELOOP, "symbolic link cannot be followed"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			got := csvdata.Discover(c.setup(t, dir))
			rel := func(list []string) []string {
				var out []string
				for _, p := range list {
					r, err := filepath.Rel(dir, p)
					if err != nil {
						t.Fatal(err)
					}
					out = append(out, filepath.ToSlash(r))
				}
				return out
			}
			if f := rel(got.Files); !reflect.DeepEqual(f, c.files) {
				t.Errorf("files %q, want %q", f, c.files)
			}
			if p := rel(problemFiles(got)); !reflect.DeepEqual(p, c.problems) {
				t.Errorf("problems %q, want %q", p, c.problems)
			}
			for _, p := range got.Problems {
				checkProblem(t, p, c.is, c.says)
			}
		})
	}
}

// checkProblem: a problem is a failed entry whose error is a *dls.PosError
// naming the path, wrapping the cause and saying the reason.
func checkProblem(t *testing.T, p csvdata.Entry, is error, says string) {
	t.Helper()
	var pe *dls.PosError
	if p.M != nil || !errors.As(p.Err, &pe) || pe.File != p.File {
		t.Fatalf("problem %+v: want a *dls.PosError naming %s", p, p.File)
	}
	if !errors.Is(p.Err, is) {
		t.Errorf("%v does not wrap %v", p.Err, is)
	}
	if msg := p.Err.Error(); !strings.HasPrefix(msg, p.File+": ") || !strings.Contains(msg, says) {
		t.Errorf("message %q: want %q, then %q", msg, p.File+": ", says)
	}
}

// A folder named through a link is searched, and what is found is recorded
// below the name given; links to folders inside a tree are not followed,
// links to files are.
func TestDiscoverLinks(t *testing.T) {
	dir := t.TempDir()
	tree(t, dir, "real/a.csv", "real/sub/b.csv", "other/c.csv", "other/d.csv")
	link(t, filepath.Join(dir, "real"), filepath.Join(dir, "data"))                       // root link
	link(t, filepath.Join(dir, "other"), filepath.Join(dir, "real", "linked"))            // folder link inside
	link(t, filepath.Join(dir, "other"), filepath.Join(dir, "real", "linked.csv"))        // folder link named *.csv
	link(t, filepath.Join(dir, "other", "c.csv"), filepath.Join(dir, "real", "file.csv")) // file link inside
	got := csvdata.Discover([]string{filepath.Join(dir, "data") + string(filepath.Separator)})
	j := func(s string) string { return filepath.Join(dir, s) }
	want := []string{j("data/a.csv"), j("data/file.csv"), j("data/sub/b.csv")}
	if !reflect.DeepEqual(got.Files, want) || len(got.Problems) != 0 {
		t.Errorf("files %q (problems %q), want %q", got.Files, problemFiles(got), want)
	}
	// Naming the linked folder itself searches it.
	got = csvdata.Discover([]string{j("real/linked")})
	if want := []string{j("real/linked/c.csv"), j("real/linked/d.csv")}; !reflect.DeepEqual(got.Files, want) {
		t.Errorf("files %q, want %q", got.Files, want)
	}
}

// A file or folder that cannot be opened is a problem. Permission bits do
// not bind root (CI runs the tests as root, where chmod 000 does not stop
// reading), so this case only runs for other users.
func TestDiscoverUnreadable(t *testing.T) {
	if os.Geteuid() == 0 {
		t.Skip("running as root: permission bits do not stop reading")
	}
	dir := t.TempDir()
	tree(t, dir, "ok.csv", "locked.csv", "closed/x.csv")
	for _, p := range []string{"locked.csv", "closed"} {
		if err := os.Chmod(filepath.Join(dir, p), 0); err != nil {
			t.Fatal(err)
		}
		defer os.Chmod(filepath.Join(dir, p), 0o755)
	}
	got := csvdata.Discover([]string{dir})
	if want := []string{filepath.Join(dir, "ok.csv")}; !reflect.DeepEqual(got.Files, want) {
		t.Errorf("files %q, want %q", got.Files, want)
	}
	if p, want := problemFiles(got), []string{filepath.Join(dir, "closed"), filepath.Join(dir, "locked.csv")}; !reflect.DeepEqual(p, want) {
		t.Fatalf("problems %q, want %q", p, want)
	}
	for _, p := range got.Problems {
		checkProblem(t, p, fs.ErrPermission, "cannot open")
	}
}

// Paths merges files and problems in sorted order; Failed gives a
// problem's failed entry and nothing for a file.
func TestFoundPathsAndFailed(t *testing.T) {
	dir := t.TempDir()
	tree(t, dir, "a.csv", "c.csv")
	j := func(s string) string { return filepath.Join(dir, s) }
	f := csvdata.Discover([]string{j("c.csv"), j("b.csv"), j("a.csv"), j("d.csv")})
	if got, want := f.Paths(), []string{j("a.csv"), j("b.csv"), j("c.csv"), j("d.csv")}; !reflect.DeepEqual(got, want) {
		t.Errorf("Paths %q, want %q", got, want)
	}
	if in, ok := f.Failed(j("b.csv")); !ok || len(in) != 1 || in[0].File != j("b.csv") || !errors.Is(in[0].Err, fs.ErrNotExist) {
		t.Errorf("Failed(b.csv) = %+v, %v", in, ok)
	}
	if _, ok := f.Failed(j("a.csv")); ok {
		t.Error("a readable file reported as failed")
	}
}
