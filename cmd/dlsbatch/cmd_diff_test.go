package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestDiff: a set compared with a rerun of the same inputs is within
// tolerance (exit 0); a z-average edited by 0.2 % is drift under the
// default 0.1 % and within a --tol of 0.5 %; a changed status is drift
// whatever the numeric tolerances; a folder that is no result set is
// trouble (exit 2).
func TestDiff(t *testing.T) {
	in := batchDir(t)
	tmp := t.TempDir()
	a, b := filepath.Join(tmp, "a"), filepath.Join(tmp, "b")
	runCmd(t, "run", in, "--out", a, "-q")
	runCmd(t, "run", in, "--out", b, "-q", "-j", "1")
	if code, out, _ := runCmd(t, "diff", a, b); code != exitOK || !strings.Contains(out, "within tolerance") {
		t.Fatalf("same inputs: exit %d\n%s", code, out)
	}
	p := filepath.Join(b, "results.csv")
	orig, _ := os.ReadFile(p)
	edited := strings.Replace(string(orig), ",100.000,", ",100.200,", 1)
	if edited == string(orig) {
		t.Fatal("fixture: no z-average 100.000 to edit")
	}
	os.WriteFile(p, []byte(edited), 0o644)
	if code, out, _ := runCmd(t, "diff", a, b); code != 1 || !strings.Contains(out, "z_avg_nm") {
		t.Errorf("0.2 %% edit: exit %d\n%s", code, out)
	}
	if code, out, _ := runCmd(t, "diff", "--tol", "z_avg_nm=0.5%", a, b); code != exitOK {
		t.Errorf("0.2 %% edit under 0.5 %%: exit %d\n%s", code, out)
	}
	os.WriteFile(p, []byte(strings.Replace(string(orig), ",ok,", ",warn,", 1)), 0o644)
	if code, out, _ := runCmd(t, "diff", "--format", "md", a, b); code != 1 || !strings.Contains(out, "| results.csv |") {
		t.Errorf("status change: exit %d\n%s", code, out)
	}
	if code, _, _ := runCmd(t, "diff", a, t.TempDir()); code != exitUsage {
		t.Errorf("not a result set: exit %d, want 2", code)
	}
}
