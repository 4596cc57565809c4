package csvdata

import (
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"
)

// Discover expands paths into the list of files to read. A path naming a
// file is taken as given, whatever its extension. A folder is searched
// recursively for files whose name ends in ".csv" in any letter case;
// hidden folders and files (name starting with '.', such as .git) inside it
// are skipped, and symbolic links to files are followed but links to folders
// are not. Paths are cleaned (filepath.Clean), duplicates removed and the
// result sorted, so the order does not depend on the order of paths or of
// the file system. Each path that cannot be read gives an error naming it;
// the others are still listed.
func Discover(paths []string) ([]string, []error) {
	var files []string
	var errs []error
	for _, p := range paths {
		root := filepath.Clean(p)
		info, err := os.Stat(root)
		if err != nil {
			errs = append(errs, fmt.Errorf("%s: %w", p, unwrapPath(err)))
			continue
		}
		if !info.IsDir() {
			files = append(files, root)
			continue
		}
		werr := filepath.WalkDir(root, func(path string, d fs.DirEntry, err error) error {
			if err != nil {
				errs = append(errs, fmt.Errorf("%s: %w", path, unwrapPath(err)))
				if d != nil && d.IsDir() && path != root {
					return fs.SkipDir
				}
				return nil
			}
			hidden := path != root && strings.HasPrefix(d.Name(), ".")
			if d.IsDir() {
				if hidden {
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
					errs = append(errs, fmt.Errorf("%s: %w", path, unwrapPath(err)))
					return nil
				}
				if !fi.Mode().IsRegular() {
					return nil
				}
			} else if !d.Type().IsRegular() {
				return nil
			}
			files = append(files, path)
			return nil
		})
		if werr != nil {
			errs = append(errs, fmt.Errorf("%s: %w", p, werr))
		}
	}
	sort.Strings(files)
	out := files[:0]
	for i, f := range files {
		if i == 0 || f != files[i-1] {
			out = append(out, f)
		}
	}
	return out, errs
}

// unwrapPath drops the path of an *fs.PathError, which the caller names.
func unwrapPath(err error) error {
	if pe, ok := err.(*fs.PathError); ok {
		return fmt.Errorf("cannot %s: %w", pe.Op, pe.Err)
	}
	return err
}

// RelativePaths maps each discovered file to its path relative to the
// input argument it was found under (its base name for a file named
// directly), for matching sample-sheet patterns.
func RelativePaths(files, inputs []string) map[string]string {
	out := make(map[string]string, len(files))
	for _, f := range files {
		rel := filepath.Base(f)
		for _, in := range inputs {
			if st, err := os.Stat(in); err != nil || !st.IsDir() {
				continue
			}
			if r, err := filepath.Rel(in, f); err == nil && !strings.HasPrefix(r, "..") {
				rel = r
				break
			}
		}
		out[f] = filepath.ToSlash(rel)
	}
	return out
}
