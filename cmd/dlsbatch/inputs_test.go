package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// Every input problem counts: a missing path, a dangling link and a link
// loop each become an error row of results.csv and results.json (the path
// as file, the reason as message), the good file is analysed, the exit code
// is 3 (some measurements could not be analysed, the rest are written), and
// the manifest hashes only the files that were read.
func TestRunInputProblemsAreErrorRows(t *testing.T) {
	in := t.TempDir()
	writeMono(t, filepath.Join(in, "a.csv"), "a", 1)
	if err := os.Symlink(filepath.Join(in, "gone.csv"), filepath.Join(in, "b_dangling.csv")); err != nil {
		t.Skipf("cannot make symbolic links here: %v", err)
	}
	if err := os.Symlink("c_loop.csv", filepath.Join(in, "c_loop.csv")); err != nil {
		t.Fatal(err)
	}
	missing := filepath.Join(in, "missing.csv")
	out := filepath.Join(t.TempDir(), "o")
	code, _, stderr := runCmd(t, "run", in, missing, "--out", out, "-q")
	if code != exitSomeFailed {
		t.Fatalf("exit %d, want %d; stderr: %s", code, exitSomeFailed, stderr)
	}
	rows := readResultsCSV(t, filepath.Join(out, "results.csv"))
	want := []struct{ file, status, says string }{
		// Named relative to the input root, the folder named.
		{"a.csv", "ok", ""},
		{"b_dangling.csv", "error", "symbolic link cannot be followed"},
		{"c_loop.csv", "error", "symbolic link cannot be followed"},
		{"missing.csv", "error", "cannot stat"},
	}
	if len(rows) != len(want) {
		t.Fatalf("%d rows, want %d: %v", len(rows), len(want), rows)
	}
	for i, w := range want {
		r := rows[i]
		if r["file"] != w.file || r["status"] != w.status || !strings.Contains(r["message"], w.says) {
			t.Errorf("row %d: file %q status %q message %q; want %q %q with %q", i, r["file"], r["status"], r["message"], w.file, w.status, w.says)
		}
		if w.status == "error" {
			if !strings.HasPrefix(r["message"], w.file+": ") {
				t.Errorf("message %q does not name the path first", r["message"])
			}
			if !strings.Contains(stderr, r["message"]) {
				t.Errorf("stderr lacks %q:\n%s", r["message"], stderr)
			}
		}
	}
	var doc struct {
		Results []struct{ File, Status, Message string }
	}
	b, err := os.ReadFile(filepath.Join(out, "results.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Results) != len(want) || doc.Results[3].File != "missing.csv" || doc.Results[3].Status != "error" {
		t.Errorf("results.json results %+v", doc.Results)
	}
	var man struct {
		Inputs []struct{ Path string }
	}
	b, err = os.ReadFile(filepath.Join(out, "manifest.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, &man); err != nil {
		t.Fatal(err)
	}
	if len(man.Inputs) != 1 || !strings.HasSuffix(man.Inputs[0].Path, "a.csv") {
		t.Errorf("manifest inputs %+v, want a.csv only", man.Inputs)
	}
}

// A folder named through a link is searched; its files are recorded
// relative to it (the input root, as named).
func TestRunSearchesLinkedFolder(t *testing.T) {
	real := t.TempDir()
	writeMono(t, filepath.Join(real, "a.csv"), "a", 1)
	in := filepath.Join(t.TempDir(), "night")
	if err := os.Symlink(real, in); err != nil {
		t.Skipf("cannot make symbolic links here: %v", err)
	}
	out := filepath.Join(t.TempDir(), "o")
	if code, _, stderr := runCmd(t, "run", in, "--out", out, "-q"); code != exitOK {
		t.Fatalf("exit %d; stderr: %s", code, stderr)
	}
	rows := readResultsCSV(t, filepath.Join(out, "results.csv"))
	if len(rows) != 1 || rows[0]["file"] != "a.csv" {
		t.Errorf("rows %v, want one for a.csv", rows)
	}
}

// Hostile file names: results.csv neutralises formula-like cells (OWASP
// "CSV Injection", common practice), results.json keeps the names as they
// are, messages quote a bad cell escaped, and neither the summary nor
// stderr passes a control character to the terminal. The run is made from
// inside the input folder so that the file cells start with the names.
func TestRunHostileFileNames(t *testing.T) {
	in := t.TempDir()
	formula := "=HYPERLINK(1).csv"
	escape := "x\x1b]0;owned\x07\x1b[2J.csv"
	missing := "\x1b[1Amissing.csv"
	writeMono(t, filepath.Join(in, formula), "a", 1)
	if err := os.WriteFile(filepath.Join(in, escape), []byte("tau_s,g2\n1e-6,\x1b[31m\n"), 0o644); err != nil {
		t.Skipf("cannot make such a file name here: %v", err)
	}
	out := filepath.Join(t.TempDir(), "o")
	t.Chdir(in)
	code, stdout, stderr := runCmd(t, "run", ".", missing, "--out", out)
	if code != exitSomeFailed {
		t.Fatalf("exit %d, want %d; stderr: %s", code, exitSomeFailed, stderr)
	}
	for what, s := range map[string]string{"stdout": stdout, "stderr": stderr} {
		for _, r := range s {
			if r != '\n' && (r < 0x20 || r == 0x7f || r >= 0x80 && r <= 0x9f) {
				t.Errorf("%s holds %U:\n%q", what, r, s)
				break
			}
		}
	}
	if !strings.Contains(stderr, "missing.csv: cannot stat") {
		t.Errorf("stderr does not report the missing path:\n%s", stderr)
	}
	// Rows in path order: ESC (0x1b) < '=' (0x3d) < 'x'.
	rows := readResultsCSV(t, filepath.Join(out, "results.csv"))
	want := []struct{ file, status string }{{missing, "error"}, {"'" + formula, "ok"}, {escape, "error"}}
	if len(rows) != len(want) {
		t.Fatalf("%d rows, want %d", len(rows), len(want))
	}
	for i, w := range want {
		if rows[i]["file"] != w.file || rows[i]["status"] != w.status {
			t.Errorf("row %d: file %q status %q, want %q %q", i, rows[i]["file"], rows[i]["status"], w.file, w.status)
		}
	}
	if msg := rows[2]["message"]; !strings.HasSuffix(msg, `.csv:2:2: column "g2": "\x1b[31m": not a number`) {
		t.Errorf("message %q does not quote the cell escaped at its position", msg)
	}
	var doc struct {
		Results []struct{ File string }
	}
	b, err := os.ReadFile(filepath.Join(out, "results.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Results) != 3 || doc.Results[1].File != formula || doc.Results[2].File != escape {
		t.Errorf("results.json files %+v, want the names unchanged", doc.Results)
	}
}
