package csvdata

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"

	"dlsbatch/dls"
	"dlsbatch/io/plainfile"
)

// Found is what Discover found under the paths it was given.
type Found struct {
	// Files are the files to read, sorted and without duplicates.
	Files []string
	// Problems are the input paths that cannot be read, sorted and without
	// duplicates: a named path that does not exist, a link that cannot be
	// followed (its target is missing, or the links form a loop), a file
	// or folder that cannot be opened, a named path that is neither a
	// regular file nor a folder. Each is a failed Entry: File is the path
	// (as named, see Discover) and Err a *dls.PosError with the reason, so
	// that the run reports it as a result with status error.
	Problems []Entry
	// ResultSets are the folders below a searched folder that were left
	// out because they hold a dlsbatch result set (results.csv and its
	// siblings are not correlograms), as named, sorted.
	ResultSets []string
}

// Paths returns the Files and the paths of the Problems merged in sorted
// order: the list to hand the batch runner, so that every problem takes its
// place among the results.
func (f *Found) Paths() []string {
	out := make([]string, 0, len(f.Files)+len(f.Problems))
	out = append(out, f.Files...)
	for _, p := range f.Problems {
		out = append(out, p.File)
	}
	sort.Strings(out)
	return out
}

// Failed returns the failed Entry of path when it is one of the Problems,
// for a read function to return in place of reading the path.
func (f *Found) Failed(path string) ([]Entry, bool) {
	i := sort.Search(len(f.Problems), func(i int) bool { return f.Problems[i].File >= path })
	if i < len(f.Problems) && f.Problems[i].File == path {
		return []Entry{f.Problems[i]}, true
	}
	return nil, false
}

// Discover expands paths into the files to read and the input problems.
//
// A path naming a regular file (directly or through links) is taken as
// given, whatever its extension. A folder, or a link to a folder, is
// searched recursively for files whose name ends in ".csv" in any letter
// case; hidden folders and files (name starting with '.', such as .git)
// inside it are skipped. Inside a folder, links to files are followed (a
// link named *.csv whose target is missing or loops is a problem) but
// links to folders are not: a tree is searched as it lies, so that a link
// cannot pull a second copy of the data or a loop into the batch; name the
// linked folder as a path of its own to search it. Entries named *.csv
// that are neither regular files nor links to one (a link to a folder, a
// pipe, a device) are skipped. A folder below a searched folder that holds
// a dlsbatch result set (manifest.json says so: an earlier run's output
// moved beside the data) is left out and listed in ResultSets; a named
// folder that is one is a problem (ErrResultSet). Every file found is
// opened once to check that it can be read.
//
// Paths are recorded as the user named them: cleaned (filepath.Clean), and
// a file found below a folder named through a link lies below the name
// given, not below the link's target. Duplicates are removed and both
// lists sorted, so that the outcome does not depend on the order of paths
// or of the file system.
func Discover(paths []string) *Found {
	f := &Found{}
	problem := func(path string, err error) {
		f.Problems = append(f.Problems, Entry{File: path, Err: &dls.PosError{File: path, Err: err}})
	}
	for _, p := range paths {
		root := filepath.Clean(p)
		info, err := os.Stat(root)
		if err != nil {
			problem(root, statReason(root, err))
			continue
		}
		if info.Mode().IsRegular() {
			if err := canRead(root); err != nil {
				problem(root, err)
			} else {
				f.Files = append(f.Files, root)
			}
			continue
		}
		if !info.IsDir() {
			problem(root, fmt.Errorf("not a regular file or a folder (%s): %w", info.Mode().Type(), ErrNotRegular))
			continue
		}
		if isResultSet(root) {
			problem(root, fmt.Errorf("%s is %w", root, ErrResultSet))
			continue
		}
		f.walk(root, problem)
	}
	f.Files = sortUnique(f.Files, func(s string) string { return s })
	f.ResultSets = sortUnique(f.ResultSets, func(s string) string { return s })
	f.Problems = sortUnique(f.Problems, func(e Entry) string { return e.File })
	return f
}

// ErrNotRegular marks an input path that is neither a regular file nor a
// folder (a pipe, a socket, a device).
var ErrNotRegular = errors.New("not a regular file")

// ErrResultSet marks an input folder that is a dlsbatch result set.
var ErrResultSet = errors.New("a dlsbatch result set (its manifest.json says so), not a folder of correlograms: name the folder of the measurements")

// isResultSet reports whether the folder dir holds a dlsbatch result set:
// a manifest.json whose first member is "tool": "dlsbatch".
func isResultSet(dir string) bool {
	f, err := plainfile.Open(filepath.Join(dir, "manifest.json"))
	if err != nil {
		return false
	}
	defer f.Close()
	head := make([]byte, 512)
	n, _ := io.ReadFull(f, head)
	d := json.NewDecoder(bytes.NewReader(head[:n]))
	var tok [3]json.Token
	for i := range tok {
		if tok[i], err = d.Token(); err != nil {
			return false
		}
	}
	return tok[0] == json.Delim('{') && tok[1] == "tool" && tok[2] == "dlsbatch"
}

// walk searches the folder root (which exists). A root that is a link is
// resolved once and its target walked; paths are recorded below root.
func (f *Found) walk(root string, problem func(string, error)) {
	real := root
	if li, err := os.Lstat(root); err == nil && li.Mode()&fs.ModeSymlink != 0 {
		r, err := filepath.EvalSymlinks(root)
		if err != nil {
			problem(root, statReason(root, err))
			return
		}
		real = r
	}
	named := func(path string) string {
		if real == root {
			return path
		}
		rel, err := filepath.Rel(real, path)
		if err != nil {
			return path
		}
		return filepath.Join(root, rel)
	}
	werr := filepath.WalkDir(real, func(path string, d fs.DirEntry, err error) error {
		if err != nil {
			problem(named(path), unwrapPath(err))
			if d != nil && d.IsDir() && path != real {
				return fs.SkipDir
			}
			return nil
		}
		hidden := path != real && strings.HasPrefix(d.Name(), ".")
		if d.IsDir() {
			switch {
			case hidden:
				return fs.SkipDir
			case path != real && isResultSet(path):
				f.ResultSets = append(f.ResultSets, named(path))
				return fs.SkipDir
			}
			return nil
		}
		if hidden || !strings.EqualFold(filepath.Ext(d.Name()), ".csv") {
			return nil
		}
		if d.Type()&fs.ModeSymlink != 0 {
			fi, err := os.Stat(path)
			if err != nil {
				problem(named(path), statReason(path, err))
				return nil
			}
			if !fi.Mode().IsRegular() {
				return nil
			}
		} else if !d.Type().IsRegular() {
			return nil
		}
		if err := canRead(path); err != nil {
			problem(named(path), err)
			return nil
		}
		f.Files = append(f.Files, named(path))
		return nil
	})
	if werr != nil {
		problem(root, unwrapPath(werr))
	}
}

// statReason words why os.Stat failed on path: a link that cannot be
// followed is named as such.
func statReason(path string, err error) error {
	if li, lerr := os.Lstat(path); lerr == nil && li.Mode()&fs.ModeSymlink != 0 {
		var pe *fs.PathError
		if errors.As(err, &pe) {
			err = pe.Err
		}
		return fmt.Errorf("symbolic link cannot be followed: %w", err)
	}
	return unwrapPath(err)
}

// canRead opens a regular file for reading and closes it again.
func canRead(path string) error {
	if err := plainfile.CanOpen(path); err != nil {
		return unwrapPath(err)
	}
	return nil
}

// sortUnique sorts s by key and drops later items with the key of an
// earlier one.
func sortUnique[T any](s []T, key func(T) string) []T {
	sort.SliceStable(s, func(i, j int) bool { return key(s[i]) < key(s[j]) })
	out := s[:0]
	for i, x := range s {
		if i == 0 || key(x) != key(s[i-1]) {
			out = append(out, x)
		}
	}
	return out
}

// unwrapPath drops the path of an *fs.PathError, which the caller names.
func unwrapPath(err error) error {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return fmt.Errorf("cannot %s: %w", pe.Op, pe.Err)
	}
	return err
}

// RelativePaths maps each discovered file to its path relative to the
// input argument it was found under (its base name for a file named
// directly), for matching sample-sheet patterns.
func RelativePaths(files, inputs []string) map[string]string {
	out := make(map[string]string, len(files))
	var dirs []string // the inputs that are folders, each looked up once
	for _, in := range inputs {
		if st, err := os.Stat(in); err == nil && st.IsDir() {
			dirs = append(dirs, in)
		}
	}
	for _, f := range files {
		rel := filepath.Base(f)
		for _, in := range dirs {
			if r, err := filepath.Rel(in, f); err == nil && !strings.HasPrefix(r, "..") {
				rel = r
				break
			}
		}
		out[f] = filepath.ToSlash(rel)
	}
	return out
}
