package batchrun

import (
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"

	"dlsbatch/dls/batch"
	"dlsbatch/io/report"
	"dlsbatch/io/sheet"
)

// demoCopies copies the demo files 02–04 (gold runs) into a
// folder of their own and returns it with the files copied.
func demoCopies(t *testing.T) (string, []string) {
	t.Helper()
	in := t.TempDir()
	demo, _ := filepath.Glob(filepath.Join("..", "..", "testdata", "demo", "0[2-4]_*.csv"))
	if len(demo) == 0 {
		t.Fatal("no demo files")
	}
	for _, f := range demo {
		b, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(in, filepath.Base(f)), b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return in, demo
}

// TestTableEditedDuringRun: a sample sheet edited while the run goes on
// (here as the first file is analysed) does not change what the run
// used: the manifest attests the sheet as the run read it, and the run
// warns that the file changed.
func TestTableEditedDuringRun(t *testing.T) {
	in, _ := demoCopies(t)
	sheetFile := filepath.Join(t.TempDir(), "sheet.csv")
	if err := os.WriteFile(sheetFile, []byte("file,lot\n*.csv,L1\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	read, err := report.HashFile(sheetFile)
	if err != nil {
		t.Fatal(err)
	}
	sh, err := sheet.ReadFile(sheetFile)
	if err != nil {
		t.Fatal(err)
	}
	var once sync.Once
	var warnings []string
	out := filepath.Join(t.TempDir(), "out")
	cfg := &Config{Paths: []string{in}, Out: out, Settings: batch.DefaultSettings(), Workers: 1, SheetFile: sheetFile, Sheet: sh,
		Progress: func(phase string, done, total int) {
			once.Do(func() { os.WriteFile(sheetFile, []byte("file,lot\n*.csv,L2\n"), 0o644) })
		},
		Warn: func(msg string) { warnings = append(warnings, msg) }}
	if _, err := Run(context.Background(), cfg); err != nil {
		t.Fatal(err)
	}
	var m report.Manifest
	if b, err := os.ReadFile(filepath.Join(out, report.ManifestJSON)); err != nil || json.Unmarshal(b, &m) != nil {
		t.Fatalf("manifest: %v", err)
	}
	if len(m.Tables) != 1 || m.Tables[0].SHA256 != read.SHA256 {
		t.Errorf("manifest tables %+v, want the sheet as read (sha256 %s)", m.Tables, read.SHA256)
	}
	if res, _ := os.ReadFile(filepath.Join(out, report.ResultsJSON)); !strings.Contains(string(res), `"lot":"L1"`) || strings.Contains(string(res), `"lot":"L2"`) {
		t.Error("the results do not rest on the sheet as read")
	}
	if !strings.Contains(strings.Join(warnings, "\n"), "sheet.csv changed while the run went on") {
		t.Errorf("warnings %q: want one naming the edited sheet", warnings)
	}
}

// TestTablesBesideTheData: a sample sheet and a specification kept in the
// input folder, beside the night's files (a common layout), are the run's
// tables and not correlograms: no result rows, no warnings of the sheet
// about them, and the manifest lists them as tables, not as inputs.
func TestTablesBesideTheData(t *testing.T) {
	in, demo := demoCopies(t)
	sheetFile, specFile := filepath.Join(in, "sheet.csv"), filepath.Join(in, "spec.csv")
	if err := os.WriteFile(sheetFile, []byte("file,product\n*.csv,gold\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(specFile, []byte("product,quantity,min,max\ngold,pdi,,0.2\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	sh, err := sheet.ReadFile(sheetFile)
	if err != nil {
		t.Fatal(err)
	}
	var warnings []string
	out := filepath.Join(t.TempDir(), "out")
	// Named through a path of its own (./), as a user may type it.
	cfg := &Config{Paths: []string{in}, Out: out, Settings: batch.DefaultSettings(), Workers: 1,
		SheetFile: filepath.Join(in, ".", "sheet.csv"), Sheet: sh, SpecFile: specFile,
		Warn: func(msg string) { warnings = append(warnings, msg) }}
	o, err := Run(context.Background(), cfg)
	if err != nil {
		t.Fatal(err)
	}
	if len(o.Results) != len(demo) {
		t.Errorf("%d results, want the %d correlograms alone", len(o.Results), len(demo))
	}
	for _, w := range warnings {
		if strings.Contains(w, "sheet.csv") || strings.Contains(w, "spec.csv") {
			t.Errorf("warning about a table: %s", w)
		}
	}
	var m report.Manifest
	if b, err := os.ReadFile(filepath.Join(out, report.ManifestJSON)); err != nil || json.Unmarshal(b, &m) != nil {
		t.Fatalf("manifest: %v", err)
	}
	if len(m.Inputs) != len(demo) || len(m.Tables) != 2 {
		t.Errorf("manifest: %d inputs and %d tables, want %d and 2", len(m.Inputs), len(m.Tables), len(demo))
	}
}
