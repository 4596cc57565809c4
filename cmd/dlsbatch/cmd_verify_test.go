package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestVerify: a fresh set verifies (exit 0) from another working
// directory; each kind of tampering is found and named (exit 1); a folder
// without a manifest is a usage error (exit 2).
func TestVerify(t *testing.T) {
	tamper := []struct {
		name string
		do   func(t *testing.T, in, out string)
		want string
	}{
		{"output changed", func(t *testing.T, in, out string) { appendTo(t, filepath.Join(out, "results.csv"), "x") }, "output results.csv"},
		{"report page removed", func(t *testing.T, in, out string) { os.Remove(filepath.Join(out, "report", "index.html")) }, "missing"},
		{"file added", func(t *testing.T, in, out string) { appendTo(t, filepath.Join(out, "report", "extra.html"), "x") }, "not in the manifest"},
		{"input changed", func(t *testing.T, in, out string) { appendTo(t, filepath.Join(in, "a_latex.csv"), "\n") }, "input a_latex.csv"},
		{"manifest says incomplete", func(t *testing.T, in, out string) {
			p := filepath.Join(out, "manifest.json")
			b, _ := os.ReadFile(p)
			os.WriteFile(p, []byte(strings.Replace(string(b), `"complete": true`, `"complete": false`, 1)), 0o644)
		}, "incomplete"},
	}
	for _, tc := range tamper {
		t.Run(tc.name, func(t *testing.T) {
			in := batchDir(t)
			out := filepath.Join(t.TempDir(), "o")
			runCmd(t, "run", in, "--out", out, "-q")
			t.Chdir(t.TempDir()) // verify needs no particular working directory
			if code, stdout, stderr := runCmd(t, "verify", out); code != exitOK {
				t.Fatalf("fresh set: exit %d\n%s%s", code, stdout, stderr)
			}
			tc.do(t, in, out)
			code, stdout, _ := runCmd(t, "verify", out)
			if code != 1 || !strings.Contains(stdout, tc.want) {
				t.Errorf("exit %d, output %q; want 1 and %q", code, stdout, tc.want)
			}
		})
	}
	if code, _, _ := runCmd(t, "verify", t.TempDir()); code != exitUsage {
		t.Errorf("no manifest: exit %d, want %d", code, exitUsage)
	}
	if code, _, _ := runCmd(t, "verify"); code != exitUsage {
		t.Errorf("no folder: exit %d, want %d", code, exitUsage)
	}
}

func appendTo(t *testing.T, p, s string) {
	t.Helper()
	f, err := os.OpenFile(p, os.O_APPEND|os.O_CREATE|os.O_WRONLY, 0o644)
	if err != nil {
		t.Fatal(err)
	}
	f.WriteString(s)
	f.Close()
}

// TestPathIndependentBytes: the same inputs named as a relative path, an
// absolute one and a dotted one with a trailing slash, from different
// working directories, give byte-identical outputs (inputs are recorded
// relative to the input root, stored once in the manifest).
func TestPathIndependentBytes(t *testing.T) {
	in := batchDir(t)
	parent, name := filepath.Dir(in), filepath.Base(in)
	tmp := t.TempDir()
	outs := []string{filepath.Join(tmp, "rel"), filepath.Join(tmp, "abs"), filepath.Join(tmp, "dotted")}
	t.Chdir(parent)
	runCmd(t, "run", name, "--out", outs[0], "-q")
	t.Chdir(tmp)
	runCmd(t, "run", in, "--out", outs[1], "-q")
	t.Chdir(in)
	runCmd(t, "run", "./", "--out", outs[2], "-q")
	for _, f := range []string{"results.csv", "samples.csv", "results.json", "manifest.json", "summary.txt", "report/index.html"} {
		want, err := os.ReadFile(filepath.Join(outs[0], f))
		if err != nil {
			t.Fatal(err)
		}
		for _, o := range outs[1:] {
			if got, _ := os.ReadFile(filepath.Join(o, f)); string(got) != string(want) {
				t.Errorf("%s differs between %s and %s: %s", f, filepath.Base(outs[0]), filepath.Base(o), firstDiff(want, got))
			}
		}
	}
}
