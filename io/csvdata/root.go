package csvdata

import (
	"bytes"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strings"

	"dlsbatch/dls"
)

// Root returns the input root of a run: the deepest folder that holds
// every path named (a folder named is its own root; a file named, its
// folder), absolute and cleaned. Outputs record input paths relative to
// it (Rel), so the bytes written do not depend on how a path was typed or
// on the working directory.
func Root(paths []string) (string, error) {
	if len(paths) == 0 {
		return "", errors.New("no input paths")
	}
	var root []string
	for i, p := range paths {
		a, err := filepath.Abs(p)
		if err != nil {
			return "", fmt.Errorf("%s: %w", p, err)
		}
		if st, err := os.Stat(a); err != nil || !st.IsDir() {
			a = filepath.Dir(a)
		}
		parts := strings.Split(a, string(filepath.Separator))
		if i == 0 {
			root = parts
			continue
		}
		n := 0
		for n < len(root) && n < len(parts) && root[n] == parts[n] {
			n++
		}
		root = root[:n]
	}
	r := strings.Join(root, string(filepath.Separator))
	if r == "" {
		r = string(filepath.Separator)
	}
	return r, nil
}

// Rel returns path relative to root with forward slashes (".." steps
// where path lies outside root), or path itself when no relative form
// exists. It takes the working directory on every call; a run that names
// many paths uses a Namer.
func Rel(root, path string) string { return NewNamer(root).Rel(path) }

// Namer names paths relative to an input root as Rel does, with the
// working directory taken once (filepath.Abs asks the system for it, two
// stat calls, every time: a run names each input a few dozen times). The
// process must not change its working directory while a Namer is in use.
type Namer struct {
	root, wd string // wd "": unknown, filepath.Abs on every call
}

// NewNamer returns the Namer of root.
func NewNamer(root string) Namer {
	wd, err := os.Getwd()
	if err != nil {
		wd = ""
	}
	return Namer{root: root, wd: wd}
}

// Rel returns path relative to the Namer's root, as Rel.
func (n Namer) Rel(path string) string {
	var a string
	switch {
	case filepath.IsAbs(path):
		a = filepath.Clean(path)
	case n.wd != "":
		a = filepath.Join(n.wd, path)
	default:
		var err error
		if a, err = filepath.Abs(path); err != nil {
			return filepath.ToSlash(path)
		}
	}
	r, err := filepath.Rel(n.root, a)
	if err != nil {
		return filepath.ToSlash(path)
	}
	return filepath.ToSlash(r)
}

// ReadBytesAs reads a correlogram export already read into memory (its
// content b), naming it name, as ReadFileAs reads a file.
func ReadBytesAs(b []byte, name string, o *Options) []Entry {
	return Read(bytes.NewReader(b), name, o)
}

// ReadFileAs reads the correlogram export at path like ReadFile, naming it
// name in measurements and messages (e.g. its path relative to the input
// root).
func ReadFileAs(path, name string, o *Options) []Entry {
	f, err := os.Open(path)
	if err != nil {
		var pe *fs.PathError
		if errors.As(err, &pe) {
			err = fmt.Errorf("cannot %s: %w", pe.Op, pe.Err)
		}
		return []Entry{{File: name, Err: &dls.PosError{File: name, Err: err}}}
	}
	defer f.Close()
	return Read(f, name, o)
}
