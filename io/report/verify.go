package report

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
)

// Difference is one finding of Verify: a file whose content or presence
// is not what the manifest says.
type Difference struct {
	File     string // path as the manifest names it (inputs and tables relative to the root)
	Kind     string // "input", "table", "output" or "set"
	Expected string // sha256:… (bytes), or what the manifest says
	Found    string // sha256:… (bytes), "missing", "unreadable: …", or what was found
}

// Verification is the outcome of Verify.
type Verification struct {
	Manifest    *Manifest
	Complete    bool // the manifest says the set is complete
	Differences []Difference
	Checked     int // files re-hashed
}

// OK reports an intact, complete result set.
func (v *Verification) OK() bool { return v.Complete && len(v.Differences) == 0 }

// Write prints each difference (kind, file, expected, found) and a closing
// line on the folder dir: how many differences, or intact and complete.
func (v *Verification) Write(w io.Writer, dir string) error {
	for _, d := range v.Differences {
		fmt.Fprintf(w, "%s %s\n  expected %s\n  found    %s\n", d.Kind, d.File, d.Expected, d.Found)
	}
	if !v.OK() {
		_, err := fmt.Fprintf(w, "%s: %d difference(s) in %d files checked\n", dir, len(v.Differences), v.Checked)
		return err
	}
	_, err := fmt.Fprintf(w, "%s: intact and complete (%d files checked)\n", dir, v.Checked)
	return err
}

// ErrNoManifest reports a folder without a readable manifest.
var ErrNoManifest = errors.New("no readable manifest.json")

// Verify re-hashes every input, table and output listed in dir's
// manifest.json and reports each difference, every file of the set that
// the manifest does not list, and whether the set is complete. Inputs and
// tables are found under the manifest's root, outputs under dir, so it
// works from any working directory. An error means the folder could not be
// checked at all (no manifest, or one that is not valid JSON).
func Verify(dir string) (*Verification, error) {
	b, err := os.ReadFile(filepath.Join(dir, ManifestJSON))
	if err != nil {
		return nil, fmt.Errorf("%s: %w: %v", dir, ErrNoManifest, err)
	}
	var m Manifest
	if err := json.Unmarshal(b, &m); err != nil {
		return nil, fmt.Errorf("%s: %w: %v", filepath.Join(dir, ManifestJSON), ErrNoManifest, err)
	}
	v := &Verification{Manifest: &m, Complete: m.Complete}
	check := func(kind, path, name string, want FileHash) {
		v.Checked++
		exp := fmt.Sprintf("sha256:%s (%d bytes)", want.SHA256, want.Bytes)
		got, err := HashFile(path)
		switch {
		case errors.Is(err, fs.ErrNotExist):
			v.Differences = append(v.Differences, Difference{name, kind, exp, "missing"})
		case err != nil:
			v.Differences = append(v.Differences, Difference{name, kind, exp, "unreadable: " + err.Error()})
		case got.SHA256 != want.SHA256 || got.Bytes != want.Bytes:
			v.Differences = append(v.Differences, Difference{name, kind, exp, fmt.Sprintf("sha256:%s (%d bytes)", got.SHA256, got.Bytes)})
		}
	}
	for _, h := range m.Inputs {
		check("input", filepath.Join(m.Root, filepath.FromSlash(h.Path)), h.Path, h)
	}
	for _, h := range m.Tables {
		check("table", filepath.Join(m.Root, filepath.FromSlash(h.Path)), h.Path, h)
	}
	listed := map[string]bool{ManifestJSON: true}
	for _, h := range m.Outputs {
		listed[h.Path] = true
		check("output", filepath.Join(dir, filepath.FromSlash(h.Path)), h.Path, h)
	}
	var extra []string
	filepath.WalkDir(dir, func(p string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return nil
		}
		rel, _ := filepath.Rel(dir, p)
		if rel = filepath.ToSlash(rel); !listed[rel] {
			extra = append(extra, rel)
		}
		return nil
	})
	sort.Strings(extra)
	for _, x := range extra {
		v.Differences = append(v.Differences, Difference{x, "output", "not in the manifest", "present"})
	}
	if !m.Complete {
		v.Differences = append(v.Differences, Difference{ManifestJSON, "set", "a complete run",
			fmt.Sprintf("incomplete: %d of %d input files analysed", m.Files.Analysed, m.Files.Found)})
	}
	if c, ok := topLevelComplete(filepath.Join(dir, ResultsJSON)); ok && c != m.Complete {
		v.Differences = append(v.Differences, Difference{ResultsJSON, "set", fmt.Sprintf("complete: %v (manifest)", m.Complete),
			fmt.Sprintf("complete: %v", c)})
	}
	return v, nil
}

// topLevelComplete reads the "complete" key of results.json, decoding
// only the top-level keys before it (not every result).
func topLevelComplete(path string) (complete, ok bool) {
	f, err := os.Open(path)
	if err != nil {
		return false, false
	}
	defer f.Close()
	dec := json.NewDecoder(f)
	if t, err := dec.Token(); err != nil || t != json.Delim('{') {
		return false, false
	}
	for dec.More() {
		key, err := dec.Token()
		if err != nil {
			return false, false
		}
		if key == "complete" {
			err := dec.Decode(&complete)
			return complete, err == nil
		}
		var skip json.RawMessage
		if err := dec.Decode(&skip); err != nil {
			return false, false
		}
	}
	return false, false
}
