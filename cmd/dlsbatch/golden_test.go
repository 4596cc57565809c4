package main

import (
	"bytes"
	"crypto/sha256"
	"encoding/json"
	"flag"
	"fmt"
	"html"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

var update = flag.Bool("update", false, "rewrite the golden demo outputs in testdata/golden")

// TestDemoGolden runs both demo nights as README.md shows them and compares
// every output with the committed golden files byte for byte: results.csv,
// samples.csv, results.json, manifest.json (which holds the SHA-256 of
// every report page) and the printed summary. The golden files are the
// tool's own earlier output, so this test does not check correctness (the
// package tests do, against outside values); it proves that a change which
// claims to keep behaviour keeps it. Regenerate with
//
//	go test ./cmd/dlsbatch -run TestDemoGolden -update
//
// only for a change whose effect on the numbers is explained in its commit.
func TestDemoGolden(t *testing.T) {
	cases := []struct {
		name string
		args []string
		code int
	}{
		{"demo", []string{"run", "testdata/demo", "--sheet", "testdata/demo-sheet.csv", "--spec", "testdata/demo-spec.csv"}, exitSpecFailed},
		{"demo-invalid", []string{"run", "testdata/demo-invalid", "--sheet", "testdata/demo-invalid-sheet.csv", "--spec", "testdata/demo-spec.csv"}, exitInvalid},
	}
	root, err := filepath.Abs("../..")
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			// Run from the repository root with the README's relative paths,
			// into an output folder outside it.
			out := filepath.Join(t.TempDir(), "out")
			t.Chdir(root)
			code, stdout, stderr := runCmd(t, append(c.args, "--out", out, "--force")...)
			if code != c.code {
				t.Fatalf("exit %d, want %d\nstderr:\n%s", code, c.code, stderr)
			}
			// summary.txt is the morning summary as printed, less the line
			// that names the output folder.
			if sum, err := os.ReadFile(filepath.Join(out, "summary.txt")); err != nil {
				t.Error(err)
			} else if want := regexpResults.ReplaceAllString(stdout, ""); string(sum) != want {
				t.Errorf("summary.txt differs from the printed summary: %s", firstDiff([]byte(want), sum))
			}
			stdout = strings.ReplaceAll(stdout, out, "OUT")
			golden := filepath.Join(root, "testdata", "golden", c.name)
			files := []string{"results.csv", "samples.csv", "results.json", "manifest.json"}
			got := map[string][]byte{"stdout.txt": []byte(stdout)}
			for _, f := range files {
				b, err := os.ReadFile(filepath.Join(out, f))
				if err != nil {
					t.Fatal(err)
				}
				got[f] = b
			}
			// The one absolute path in the outputs is the input root, named in
			// the manifest and in the batch record of report/index.html:
			// where the checkout lies is not part of the result. The index is
			// compared with the root replaced, through its manifest entry.
			inputRoot := filepath.Join(root, "testdata", c.name)
			got["manifest.json"] = bytes.Replace(got["manifest.json"], []byte(`"root": `+quote(inputRoot)), []byte(`"root": "ROOT"`), 1)
			got["manifest.json"] = normaliseIndex(t, got["manifest.json"], filepath.Join(out, "report", "index.html"), inputRoot)
			if *update {
				if err := os.MkdirAll(golden, 0o755); err != nil {
					t.Fatal(err)
				}
				for f, b := range got {
					if err := os.WriteFile(filepath.Join(golden, f), b, 0o644); err != nil {
						t.Fatal(err)
					}
				}
				return
			}
			for f, b := range got {
				want, err := os.ReadFile(filepath.Join(golden, f))
				if err != nil {
					t.Fatalf("%v (run with -update to create the golden files)", err)
				}
				if !bytes.Equal(b, want) {
					t.Errorf("%s differs from testdata/golden/%s/%s: %s", f, c.name, f, firstDiff(want, b))
				}
			}
		})
	}
}

// normaliseIndex checks that the manifest lists report/index.html with the
// page's true size and SHA-256, then replaces that entry with the size and
// SHA-256 of the page with the input root written as ROOT.
func normaliseIndex(t *testing.T, manifest []byte, indexPath, inputRoot string) []byte {
	t.Helper()
	page, err := os.ReadFile(indexPath)
	if err != nil {
		t.Fatal(err)
	}
	entry := func(b []byte) []byte {
		sum := sha256.Sum256(b)
		return fmt.Appendf(nil, "\"bytes\": %d,\n   \"sha256\": \"%x\"", len(b), sum)
	}
	real := entry(page)
	if !bytes.Contains(manifest, real) {
		t.Fatalf("manifest.json does not list report/index.html with its size and SHA-256 (%s)", real)
	}
	if !bytes.Contains(page, []byte(html.EscapeString(inputRoot))) {
		t.Fatalf("report/index.html does not name the input root %s", inputRoot)
	}
	norm := bytes.ReplaceAll(page, []byte(html.EscapeString(inputRoot)), []byte("ROOT"))
	return bytes.Replace(manifest, real, entry(norm), 1)
}

var regexpResults = regexp.MustCompile(`(?m)^results: .*\n`)

func quote(s string) string {
	b, _ := json.Marshal(s)
	return string(b)
}

// firstDiff describes the first line at which got differs from want.
func firstDiff(want, got []byte) string {
	wl := strings.Split(string(want), "\n")
	gl := strings.Split(string(got), "\n")
	for i := 0; i < len(wl) || i < len(gl); i++ {
		var w, g string
		if i < len(wl) {
			w = wl[i]
		}
		if i < len(gl) {
			g = gl[i]
		}
		if w != g {
			return fmt.Sprintf("line %d:", i+1) + "\n  want " + clip(w) + "\n  got  " + clip(g)
		}
	}
	return "same lines, different bytes"
}

func clip(s string) string {
	if len(s) > 200 {
		return s[:200] + "…"
	}
	return s
}
