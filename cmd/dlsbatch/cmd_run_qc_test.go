package main

import (
	"crypto/sha256"
	"dlsbatch/io/csvdata"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"dlsbatch/dls/qc"
	"dlsbatch/io/qcfile"
)

// TestRunQCThresholdsFile: a thresholds file changes the flags raised,
// its values are recorded under qc_thresholds, and its path and SHA-256
// (checked against crypto/sha256 of the file) go into the manifest.
// Three runs of one sample: FEW-RUNS fires when fewer than min_runs runs
// are used (the rule of dls/qc), so it is silent at the default 3 and
// fires at 5.
func TestRunQCThresholdsFile(t *testing.T) {
	in := t.TempDir()
	writeMono(t, filepath.Join(in, "a.csv"), "a", 3)
	th := filepath.Join(t.TempDir(), "site.csv")
	content := "# site values\nkey,value,note\nmin_runs,5,five repeats\nmax_pdi,0.2,\n"
	if err := os.WriteFile(th, []byte(content), 0o644); err != nil {
		t.Fatal(err)
	}
	type doc struct {
		Settings map[string]any `json:"settings"`
		Samples  []struct {
			Flags []struct {
				Code string `json:"code"`
			} `json:"flags"`
		} `json:"samples"`
	}
	read := func(out string) doc {
		t.Helper()
		b, err := os.ReadFile(filepath.Join(out, "results.json"))
		if err != nil {
			t.Fatal(err)
		}
		var d doc
		if err := json.Unmarshal(b, &d); err != nil {
			t.Fatal(err)
		}
		return d
	}
	fewRuns := func(d doc) bool {
		for _, f := range d.Samples[0].Flags {
			if f.Code == string(qc.FewRuns) {
				return true
			}
		}
		return false
	}

	plain := filepath.Join(t.TempDir(), "plain")
	if code, _, stderr := runCmd(t, "run", in, "--out", plain, "-q", "--no-report"); code != exitOK {
		t.Fatalf("without thresholds: exit %d: %s", code, stderr)
	}
	if d := read(plain); fewRuns(d) || d.Settings["qc_thresholds_file"] != nil {
		t.Errorf("default thresholds: FEW-RUNS %v, file %v", fewRuns(d), d.Settings["qc_thresholds_file"])
	}

	out := filepath.Join(t.TempDir(), "site")
	if code, _, stderr := runCmd(t, "run", in, "--qc-thresholds", th, "--out", out, "-q", "--no-report"); code != exitOK {
		t.Fatalf("with thresholds: exit %d: %s", code, stderr)
	}
	d := read(out)
	if !fewRuns(d) {
		t.Error("min_runs 5 from the file did not raise FEW-RUNS on 3 runs")
	}
	q, _ := d.Settings["qc_thresholds"].(map[string]any)
	if q["min_runs"] != 5.0 || q["max_pdi"] != 0.2 || q["max_rsd_pct"] != 5.0 || d.Settings["qc_thresholds_file"] != csvdata.Rel(in, th) {
		t.Errorf("recorded %v, file %v", q, d.Settings["qc_thresholds_file"])
	}

	b, err := os.ReadFile(filepath.Join(out, "manifest.json"))
	if err != nil {
		t.Fatal(err)
	}
	var m struct {
		Tables []struct {
			Path   string `json:"path"`
			SHA256 string `json:"sha256"`
		} `json:"tables"`
	}
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	sum := sha256.Sum256([]byte(content))
	if len(m.Tables) != 1 || m.Tables[0].Path != csvdata.Rel(in, th) || m.Tables[0].SHA256 != fmt.Sprintf("%x", sum[:]) {
		t.Errorf("manifest tables %+v", m.Tables)
	}
}

// TestBadQCThresholdsStopBeforeAnalysis: a bad thresholds file is a usage
// error naming file, line and column, and nothing is written.
func TestBadQCThresholdsStopBeforeAnalysis(t *testing.T) {
	in := t.TempDir()
	writeMono(t, filepath.Join(in, "a.csv"), "a", 1)
	dir := t.TempDir()
	for _, c := range []struct {
		name, content, where string
	}{
		{"unknown.csv", "key,value\nmax_pd,0.3\n", "unknown.csv:2:1"},
		{"range.csv", "key,value\nmax_pdi,30\n", "range.csv:2:9"},
		{"twice.csv", "key,value\nmin_runs,4\nmin_runs,5\n", "twice.csv:3:1"},
		{"missing.csv", "", "missing.csv"},
	} {
		p := filepath.Join(dir, c.name)
		if c.content != "" {
			if err := os.WriteFile(p, []byte(c.content), 0o644); err != nil {
				t.Fatal(err)
			}
		}
		out := filepath.Join(t.TempDir(), "o")
		code, _, stderr := runCmd(t, "run", in, "--qc-thresholds", p, "--out", out)
		if code != exitUsage || !strings.Contains(stderr, c.where) || !strings.Contains(stderr, "QC thresholds") {
			t.Errorf("%s: exit %d, stderr %q; want %d naming %s", c.name, code, stderr, exitUsage, c.where)
		}
		if _, err := os.Stat(out); err == nil {
			t.Errorf("%s: the output folder was created despite the bad file", c.name)
		}
	}
}

// TestFlagsHelpDocumentsThresholdsFile: the example in `dlsbatch flags
// --help` parses, and every key is listed, so the help cannot drift from
// the reader.
func TestFlagsHelpDocumentsThresholdsFile(t *testing.T) {
	code, stdout, _ := runCmd(t, "flags", "--help")
	if code != exitOK {
		t.Fatalf("exit %d", code)
	}
	// The example is the indented block from its header row on.
	lines := strings.Split(stdout, "\n")
	var ex []string
	for i, l := range lines {
		if l == "  key,value,note" {
			for j := i; j < len(lines) && strings.HasPrefix(lines[j], "  "); j++ {
				ex = append(ex, strings.TrimSpace(lines[j]))
			}
			break
		}
	}
	th, err := qcfile.Parse(strings.NewReader(strings.Join(ex, "\n")), "help", qc.DefaultThresholds())
	if err != nil {
		t.Fatalf("the help's example %q does not parse: %v", ex, err)
	}
	if th == qc.DefaultThresholds() {
		t.Error("the help's example changes nothing")
	}
	for _, k := range qc.ThresholdKeys() {
		if !strings.Contains(stdout, "\n"+k.Key+" ") {
			t.Errorf("help does not list %s", k.Key)
		}
	}
}
