package csvdata_test

import (
	"errors"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"

	"dlsbatch/dls"
	"dlsbatch/io/csvdata"
)

// nameParts are the characters fuzzed names are made of: letters, the
// characters with a meaning somewhere (a leading '.', '=', space, '-'),
// non-ASCII text and a control character.
var nameParts = []string{"a", "b", "C", ".", "-", " ", "é", "=", "\x1b", "0"}

var extensions = []string{".csv", ".CSV", ".Csv", ".txt", ""}

// FuzzDiscover builds a tree from the fuzz input in a temporary folder
// (files, folders, links to files and folders, dangling links, link loops)
// and checks Discover on it: no panic; files and problems sorted and
// unique, and disjoint; every file found is a regular file named *.csv
// (any case) below a root, on no hidden path; every regular *.csv file
// created on a visible path is found; every problem is a *dls.PosError
// naming its path. A folder named through a link gives the same files
// below the link's name.
//
// Each input touches the disk, so the target is slow: see DEVELOPERS.md for
// -fuzzminimizetime.
func FuzzDiscover(f *testing.F) {
	// Seeds written with the encoding the target reads (see treeOps).
	var a, b, c, dot, dash, space, e, eq, esc = byte(0), byte(1), byte(2), byte(3), byte(4), byte(5), byte(6), byte(7), byte(8)
	const csv, csvUpper, txt, none = 0, 1, 3, 4
	f.Add([]byte(treeOps{}.file([]byte{a}, csv).dir([]byte{b}).file([]byte{c}, csvUpper).dir([]byte{dot, a}).file([]byte{a}, csv).up().up().
		link([]byte{eq, a}, csv, 0).link([]byte{b, dash, a}, none, 1).link([]byte{a, b}, csv, 1).link([]byte{9}, csv, -1).loop([]byte{a, a})))
	f.Add([]byte(treeOps{}.dir([]byte{esc, b}).dir([]byte{e, space}).dir([]byte{dot, dot, a}).file([]byte{a}, csv).up().file([]byte{eq}, txt).
		file([]byte{space, a}, csv).up().hidden([]byte{a}).link([]byte{c}, csv, 4).loop([]byte{b})))
	f.Add([]byte{0, 3, 1, 2, 3, 0, 1, 4, 0, 2, 5, 3, 0, 4, 6, 5, 0, 2, 7, 3})
	f.Fuzz(func(t *testing.T, data []byte) {
		dir := t.TempDir()
		type level struct {
			path   string
			hidden bool
		}
		stack := []level{{dir, false}}
		var made []string    // every path made, for links to point at
		var subdirs []string // folders made, for the linked root
		want := map[string]bool{}
		next := func() byte {
			if len(data) == 0 {
				return 0
			}
			b := data[0]
			data = data[1:]
			return b
		}
		name := func() string {
			n := int(next()%8) + 1
			var b strings.Builder
			for i := 0; i < n; i++ {
				b.WriteString(nameParts[int(next())%len(nameParts)])
			}
			s := b.String()
			if strings.Trim(s, ".") == "" {
				s = "d" + s // never "." or ".."
			}
			return s
		}
		for ops := 0; len(data) > 0 && ops < 40; ops++ {
			cur := stack[len(stack)-1]
			switch next() % 7 {
			case 0: // a file
				n := name() + extensions[int(next())%len(extensions)]
				p := filepath.Join(cur.path, n)
				if err := os.WriteFile(p, []byte("tau_s,g2\n"), 0o644); err == nil {
					made = append(made, p)
					if !cur.hidden && !strings.HasPrefix(n, ".") && strings.EqualFold(filepath.Ext(n), ".csv") {
						want[p] = true
					}
				}
			case 1: // a folder, entered
				n := name()
				p := filepath.Join(cur.path, n)
				if err := os.Mkdir(p, 0o755); err == nil {
					made = append(made, p)
					subdirs = append(subdirs, p)
					stack = append(stack, level{p, cur.hidden || strings.HasPrefix(n, ".")})
				}
			case 2: // back up
				if len(stack) > 1 {
					stack = stack[:len(stack)-1]
				}
			case 3, 4: // a link to something made, or to nothing
				n := name() + extensions[int(next())%len(extensions)]
				target := filepath.Join(dir, "nothing-"+name())
				if len(made) > 0 && next()%4 != 0 {
					target = made[int(next())%len(made)]
				}
				p := filepath.Join(cur.path, n)
				if err := os.Symlink(target, p); err != nil {
					t.Skipf("cannot make symbolic links here: %v", err)
				}
				made = append(made, p)
			case 5: // a link loop
				n := name() + ".csv"
				p := filepath.Join(cur.path, n)
				if err := os.Symlink(n, p); err == nil {
					made = append(made, p)
				}
			case 6: // an empty file that is hidden or not a csv
				p := filepath.Join(cur.path, "."+name()+".csv")
				if err := os.WriteFile(p, nil, 0o644); err == nil {
					made = append(made, p)
				}
			}
		}

		roots := []string{dir}
		found := csvdata.Discover(roots)
		checkFound(t, found, roots)
		files := map[string]bool{}
		for _, p := range found.Files {
			files[p] = true
		}
		for p := range want {
			if !files[p] {
				t.Errorf("regular file %q on a visible path was not found (files %q)", p, found.Files)
			}
		}

		// The first folder made, named through a link from elsewhere.
		if len(subdirs) == 0 {
			return
		}
		linked := filepath.Join(t.TempDir(), "linked")
		if err := os.Symlink(subdirs[0], linked); err != nil {
			t.Fatal(err)
		}
		viaLink := csvdata.Discover([]string{linked})
		checkFound(t, viaLink, []string{linked})
		direct := csvdata.Discover([]string{subdirs[0]})
		if len(viaLink.Files) != len(direct.Files) || len(viaLink.Problems) != len(direct.Problems) {
			t.Fatalf("through the link %d files, %d problems; directly %d, %d",
				len(viaLink.Files), len(viaLink.Problems), len(direct.Files), len(direct.Problems))
		}
		for i, p := range direct.Files {
			rel, err := filepath.Rel(subdirs[0], p)
			if err != nil || viaLink.Files[i] != filepath.Join(linked, rel) {
				t.Errorf("through the link %q, directly %q", viaLink.Files[i], p)
			}
		}
	})
}

// treeOps writes seeds for FuzzDiscover in the encoding it reads: an
// operation byte, then a name (a length byte, n−1, and one byte per
// character, an index into nameParts), then what the operation needs.
type treeOps []byte

func (s treeOps) name(n []byte) treeOps { return append(append(s, byte(len(n)-1)), n...) }

// file makes a file named n plus extensions[ext].
func (s treeOps) file(n []byte, ext byte) treeOps { return append(append(s, 0).name(n), ext) }

// dir makes a folder and enters it; up leaves it.
func (s treeOps) dir(n []byte) treeOps { return append(s, 1).name(n) }
func (s treeOps) up() treeOps          { return append(s, 2) }

// link makes a link named n plus extensions[ext] to the target-th path
// made, or to a missing path when target < 0 (something must be made
// before).
func (s treeOps) link(n []byte, ext byte, target int) treeOps {
	s = append(append(s, 3).name(n), ext, 0, 0) // then the missing target's name, "a"
	if target < 0 {
		return append(s, 0)
	}
	return append(s, 1, byte(target))
}

// loop makes a link to itself named n plus ".csv"; hidden an empty hidden
// file.
func (s treeOps) loop(n []byte) treeOps   { return append(s, 5).name(n) }
func (s treeOps) hidden(n []byte) treeOps { return append(s, 6).name(n) }

// checkFound checks the invariants of Discover's result for folder roots.
func checkFound(t *testing.T, found *csvdata.Found, roots []string) {
	t.Helper()
	if !sort.StringsAreSorted(found.Files) {
		t.Errorf("files not sorted: %q", found.Files)
	}
	seen := map[string]bool{}
	for _, p := range found.Files {
		if seen[p] {
			t.Errorf("file %q listed twice", p)
		}
		seen[p] = true
		st, err := os.Stat(p)
		if err != nil || !st.Mode().IsRegular() {
			t.Errorf("%q is not a regular file (%v)", p, err)
		}
		if !strings.EqualFold(filepath.Ext(p), ".csv") {
			t.Errorf("%q is not named *.csv", p)
		}
		under := false
		for _, r := range roots {
			rel, err := filepath.Rel(r, p)
			if err != nil || rel == ".." || strings.HasPrefix(rel, ".."+string(filepath.Separator)) {
				continue
			}
			under = true
			for _, part := range strings.Split(rel, string(filepath.Separator)) {
				if strings.HasPrefix(part, ".") {
					t.Errorf("%q lies on a hidden path", p)
				}
			}
		}
		if !under {
			t.Errorf("%q lies below none of the roots %q", p, roots)
		}
	}
	for i, p := range found.Problems {
		if i > 0 && found.Problems[i-1].File >= p.File {
			t.Errorf("problems not sorted and unique at %q", p.File)
		}
		if seen[p.File] {
			t.Errorf("%q is both a file and a problem", p.File)
		}
		var pe *dls.PosError
		if p.M != nil || !errors.As(p.Err, &pe) || pe.File != p.File {
			t.Errorf("problem %+v is not a failed entry naming its path", p)
		}
	}
}
