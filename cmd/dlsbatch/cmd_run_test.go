package main

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"dlsbatch/dls"
	"dlsbatch/io/csvdata"
	"dlsbatch/io/report"
)

// runCmd runs the command line with buffers and returns exit code, stdout
// and stderr.
func runCmd(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(context.Background(), args, env{stdin: strings.NewReader(""), stdout: &out, stderr: &errb})
	return code, out.String(), errb.String()
}

// lagGrid is a multi-tau grid: 16 channels at 1 µs, then 8 per doubling.
func lagGrid() []float64 {
	var tau []float64
	for k := 1; k <= 16; k++ {
		tau = append(tau, float64(k)*1e-6)
	}
	for s := 1; len(tau) < 180; s++ {
		for j := 1; j <= 8; j++ {
			tau = append(tau, float64(8+j)*math.Ldexp(1e-6, s))
		}
	}
	return tau
}

// writeMono writes a noise-free single-exponential g2 file for a sphere of
// the worked example: 100 nm in water at 25 °C, η = 0.890022 mPa·s,
// n = 1.33162, 632.8 nm, 173°, for which Γ = 3418.78 1/s (computed check
// values of Stokes–Einstein and q to 6 digits).
func writeMono(t *testing.T, path, sample string, runs int) {
	t.Helper()
	tau := lagGrid()
	var cols []csvdata.Column
	for r := 0; r < runs; r++ {
		// Each run its own coherence factor (0.9, 0.8999, …): the same
		// decay, so the same size, but not a copy of another run's data
		// (which the sample's statistics would leave out).
		beta := 0.9 - 1e-4*float64(r)
		v := make([]float64, len(tau))
		for i, x := range tau {
			v[i] = 1 + beta*math.Exp(-2*3418.78*x)
		}
		label := ""
		if runs > 1 {
			label = "r" + strconv.Itoa(r+1)
		}
		cols = append(cols, csvdata.Column{Label: label, Values: v})
	}
	meta := []dls.Param{
		{Key: "sample", Value: sample}, {Key: "temperature_c", Value: "25"}, {Key: "wavelength_nm", Value: "632.8"},
		{Key: "angle_deg", Value: "173"}, {Key: "solvent", Value: "water"}, {Key: "viscosity_mpas", Value: "0.890022"},
		{Key: "refractive_index", Value: "1.33162"},
	}
	var b bytes.Buffer
	if err := csvdata.Write(&b, meta, tau, "us", dls.KindG2, cols); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
}

func readResultsCSV(t *testing.T, path string) []map[string]string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	var out []map[string]string
	for _, row := range rows[1:] {
		m := map[string]string{}
		for i, h := range rows[0] {
			m[h] = row[i]
		}
		out = append(out, m)
	}
	return out
}

func hashTree(t *testing.T, dir string) map[string][32]byte {
	t.Helper()
	h := map[string][32]byte{}
	filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if err == nil && !d.IsDir() {
			b, _ := os.ReadFile(p)
			h[p] = sha256.Sum256(b)
		}
		return nil
	})
	return h
}

// batchDir builds an input folder: two good files (one with three runs), a
// file with a non-numeric cell, and one missing its temperature.
func batchDir(t *testing.T) string {
	dir := t.TempDir()
	writeMono(t, filepath.Join(dir, "a_latex.csv"), "latex", 1)
	writeMono(t, filepath.Join(dir, "b_multi.csv"), "multi", 3)
	os.WriteFile(filepath.Join(dir, "c_bad.csv"), []byte("# temperature_c: 25\ntau_s,g2\n1e-6,1.9\n2e-6,abc\n"), 0o644)
	os.MkdirAll(filepath.Join(dir, "sub"), 0o755)
	b, _ := os.ReadFile(filepath.Join(dir, "a_latex.csv"))
	os.WriteFile(filepath.Join(dir, "sub", "d_notemp.csv"), bytes.Replace(b, []byte("# temperature_c: 25\n"), nil, 1), 0o644)
	return dir
}

func TestRunBatch(t *testing.T) {
	in := batchDir(t)
	before := hashTree(t, in)
	out := filepath.Join(t.TempDir(), "out")
	code, stdout, stderr := runCmd(t, "run", in, "--out", out, "-j", "2")
	if code != exitSomeFailed {
		t.Fatalf("exit %d, want %d (some failed); stderr: %s", code, exitSomeFailed, stderr)
	}
	rows := readResultsCSV(t, filepath.Join(out, "results.csv"))
	if len(rows) != 6 {
		t.Fatalf("%d rows, want 6 (1 + 3 runs + 2 failures)", len(rows))
	}
	// Sorted by path then run label.
	wantOrder := []string{"a_latex.csv", "b_multi.csv[r1]", "b_multi.csv[r2]", "b_multi.csv[r3]", "c_bad.csv", filepath.Join("sub", "d_notemp.csv")}
	for i, r := range rows {
		id := filepath.FromSlash(r["file"]) // relative to the input root, the folder named
		if r["run"] != "" {
			id += "[" + r["run"] + "]"
		}
		if id != wantOrder[i] {
			t.Errorf("row %d is %s, want %s", i, id, wantOrder[i])
		}
	}
	// Round trip of the worked example: Γ = 3418.78 1/s at 173° gives
	// 100.00 nm. The file stores g2 to 7 decimals, which moves Γ̄ by far
	// less than 1e-5; the tolerance 0.01 nm is the worked value's rounding.
	for _, r := range rows[:4] {
		if r["status"] != "ok" {
			t.Errorf("%s[%s]: status %s (%s)", r["file"], r["run"], r["status"], r["message"])
			continue
		}
		z, _ := strconv.ParseFloat(r["z_avg_nm"], 64)
		if math.Abs(z-100) > 0.01 {
			t.Errorf("%s: z-average %.3f nm, want 100.00", r["file"], z)
		}
	}
	bad := rows[4]
	if bad["status"] != "error" || !strings.Contains(bad["message"], "c_bad.csv:4") {
		t.Errorf("non-numeric cell: status %s, message %q; want error naming c_bad.csv:4", bad["status"], bad["message"])
	}
	nt := rows[5]
	if nt["status"] != "error" || !strings.Contains(nt["message"], "temperature_c") {
		t.Errorf("missing temperature: status %s, message %q", nt["status"], nt["message"])
	}
	if !strings.Contains(stdout, "6 measurements: 4 ok, 0 warn, 2 error") {
		t.Errorf("summary lacks the counts:\n%s", stdout)
	}
	if !strings.Contains(stdout, "qualified staff") {
		t.Error("summary lacks the caution")
	}
	// No input was modified or added.
	after := hashTree(t, in)
	if len(after) != len(before) {
		t.Errorf("input folder now has %d files, had %d", len(after), len(before))
	}
	for p, h := range before {
		if after[p] != h {
			t.Errorf("%s changed", p)
		}
	}
	// results.json carries the same records, provenance and the caution.
	var doc struct {
		Caution string `json:"caution"`
		Results []struct {
			File   string      `json:"file"`
			ZAvg   float64     `json:"z_avg_nm"`
			Params []dls.Param `json:"params"`
		} `json:"results"`
	}
	b, err := os.ReadFile(filepath.Join(out, "results.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Results) != 6 || !strings.Contains(doc.Caution, "qualified staff") {
		t.Fatalf("results.json: %d results, caution %q", len(doc.Results), doc.Caution)
	}
	found := false
	for _, p := range doc.Results[0].Params {
		if p.Key == "temperature_c" && p.Origin == dls.OriginFile && strings.HasSuffix(p.Where, "a_latex.csv:2") {
			found = true
		}
	}
	if !found {
		t.Errorf("temperature provenance missing: %+v", doc.Results[0].Params)
	}
}

func TestRunSameBytesAnyJobs(t *testing.T) {
	in := batchDir(t)
	var first map[string][]byte
	for _, j := range []string{"1", "2", "7"} {
		out := filepath.Join(t.TempDir(), "out")
		runCmd(t, "run", in, "--out", out, "-j", j, "--quiet")
		got := map[string][]byte{}
		for _, name := range []string{"results.csv", "samples.csv", "results.json", "manifest.json", "report/index.html"} {
			b, err := os.ReadFile(filepath.Join(out, name))
			if err != nil {
				t.Fatal(err)
			}
			got[name] = b
		}
		if first == nil {
			first = got
			continue
		}
		for name, b := range got {
			if !bytes.Equal(b, first[name]) {
				t.Errorf("-j %s: %s differs from -j 1", j, name)
			}
		}
	}
}

func TestRunPrecedence(t *testing.T) {
	// --set wins over the file; --default fills only gaps.
	in := batchDir(t)
	out := filepath.Join(t.TempDir(), "out")
	code, _, stderr := runCmd(t, "run", in, "--out", out, "--quiet", "--default", "temperature_c=20", "--set", "angle_deg=90")
	if code != exitSomeFailed {
		t.Fatalf("exit %d; %s", code, stderr)
	}
	rows := readResultsCSV(t, filepath.Join(out, "results.csv"))
	for _, r := range rows {
		if r["status"] == "error" {
			continue
		}
		if r["angle_deg"] != "90.00" {
			t.Errorf("%s: angle %s, want the --set 90", r["file"], r["angle_deg"])
		}
		want := "25.00"
		if strings.Contains(r["file"], "d_notemp") {
			want = "20.00"
		}
		if r["temperature_c"] != want {
			t.Errorf("%s: temperature %s, want %s", r["file"], r["temperature_c"], want)
		}
	}
}

func TestRunExitCodes(t *testing.T) {
	good := t.TempDir()
	writeMono(t, filepath.Join(good, "a.csv"), "a", 1)
	bad := t.TempDir()
	os.WriteFile(filepath.Join(bad, "x.csv"), nil, 0o644)
	empty := t.TempDir()
	cases := []struct {
		name string
		args []string
		want int
	}{
		{"all ok", []string{"run", good, "--out", filepath.Join(t.TempDir(), "o"), "-q"}, exitOK},
		{"every measurement failed", []string{"run", bad, "--out", filepath.Join(t.TempDir(), "o"), "-q"}, exitFatal},
		{"no files found", []string{"run", empty, "--out", filepath.Join(t.TempDir(), "o"), "-q"}, exitFatal},
		{"missing --out", []string{"run", good}, exitUsage},
		{"no paths", []string{"run", "--out", t.TempDir()}, exitUsage},
		{"unknown flag", []string{"run", good, "--out", t.TempDir(), "--frobnicate"}, exitUsage},
		{"bad enum", []string{"run", good, "--out", t.TempDir(), "--cumulant-method", "quadratic"}, exitUsage},
		{"bad --set key", []string{"run", good, "--out", t.TempDir(), "--set", "colour=blue"}, exitUsage},
		{"bad order", []string{"run", good, "--out", t.TempDir(), "--cumulant-order", "4"}, exitUsage},
		{"out inside input", []string{"run", good, "--out", filepath.Join(good, "results")}, exitUsage},
		{"gcv criterion", []string{"run", good, "--out", filepath.Join(t.TempDir(), "o"), "-q", "--alpha-criterion", "gcv"}, exitOK},
		{"fixed criterion", []string{"run", good, "--out", filepath.Join(t.TempDir(), "o"), "-q", "--alpha-criterion", "fixed", "--alpha-lambda", "1e-4"}, exitOK},
		{"fixed without lambda", []string{"run", good, "--out", t.TempDir(), "--alpha-criterion", "fixed"}, exitUsage},
		{"unknown criterion", []string{"run", good, "--out", t.TempDir(), "--alpha-criterion", "guess"}, exitUsage},
		{"bad target", []string{"run", good, "--out", t.TempDir(), "--prob-reject-target", "1.5"}, exitUsage},
		{"bad grid", []string{"run", good, "--out", t.TempDir(), "--grid-points", "5"}, exitUsage},
		{"bad particle index", []string{"run", good, "--out", t.TempDir(), "--default-particle-ri", "1.59-0.1i"}, exitUsage},
		{"negative uncertainty", []string{"run", good, "--out", t.TempDir(), "--u-temperature-k", "-1"}, exitUsage},
		{"cumulants only", []string{"run", good, "--out", filepath.Join(t.TempDir(), "o"), "-q", "--no-distribution", "--no-report"}, exitOK},
		{"help", []string{"run", "--help"}, exitOK},
		{"unknown command", []string{"frobnicate"}, exitUsage},
		{"top help", []string{"--help"}, exitOK},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if code, _, stderr := runCmd(t, c.args...); code != c.want {
				t.Errorf("exit %d, want %d; stderr: %s", code, c.want, stderr)
			}
		})
	}
	if _, err := os.Stat(filepath.Join(good, "results")); err == nil {
		t.Error("an output folder was created inside the input")
	}
}

func TestRunRefusesToReplace(t *testing.T) {
	in := t.TempDir()
	writeMono(t, filepath.Join(in, "a.csv"), "a", 1)
	out := filepath.Join(t.TempDir(), "o")
	if code, _, _ := runCmd(t, "run", in, "--out", out, "-q"); code != exitOK {
		t.Fatalf("first run exit %d", code)
	}
	if code, _, _ := runCmd(t, "run", in, "--out", out, "-q"); code != exitUsage {
		t.Errorf("second run without --force: exit %d, want %d", code, exitUsage)
	}
	if code, _, _ := runCmd(t, "run", in, "--out", out, "-q", "--force"); code != exitOK {
		t.Errorf("--force: exit %d", code)
	}
}

// TestHelpListsExitCodes: each command's --help lists its own exit codes
// (run's five outcome codes and 130; verify's 0, 1, 2), and the top-level
// help points to them.
func TestHelpListsExitCodes(t *testing.T) {
	for _, tc := range []struct {
		args  []string
		codes []string
	}{
		{[]string{"run", "--help"}, []string{"0 ", "1 ", "2 ", "3 ", "4 ", "5 ", "130"}},
		{[]string{"verify", "--help"}, []string{"0 ", "1 ", "2 "}},
		{[]string{"diff", "--help"}, []string{"0 ", "1 ", "2 "}},
		{[]string{"merge", "--help"}, []string{"0 ", "1 ", "2 ", "4 ", "5 "}},
		{[]string{"simulate", "--help"}, []string{"0 ", "1 ", "2 ", "130"}},
		{[]string{"solvents", "--help"}, []string{"0 ", "1 ", "2 "}},
		{[]string{"flags", "--help"}, []string{"0 ", "2 "}},
	} {
		_, stdout, _ := runCmd(t, tc.args...)
		if strings.Contains(stdout, "%%") {
			t.Errorf("%v: help shows a doubled %%%%", tc.args)
		}
		if !strings.Contains(stdout, "\nExit codes:\n") {
			t.Errorf("%v: no exit codes section", tc.args)
		}
		for _, code := range tc.codes {
			if !strings.Contains(stdout, "\n  "+code) {
				t.Errorf("%v: help does not list exit code %s", tc.args, code)
			}
		}
	}
	if _, stdout, _ := runCmd(t, "--help"); !strings.Contains(stdout, "flags and exit codes of a command") || !strings.Contains(stdout, "verify") {
		t.Errorf("top-level help: %s", stdout)
	}
}

func TestDemoInvalidBatch(t *testing.T) {
	// The second demo night: the reference latex reads about 109 nm against
	// its window 100.8 ± 3 nm, so system suitability fails and the lot's
	// verdict is invalid (exit 5), whatever its own values.
	out := filepath.Join(t.TempDir(), "o")
	code, stdout, stderr := runCmd(t, "run", "../../testdata/demo-invalid", "--sheet", "../../testdata/demo-invalid-sheet.csv",
		"--spec", "../../testdata/demo-spec.csv", "--out", out)
	if code != exitInvalid {
		t.Fatalf("exit %d, want %d\n%s\n%s", code, exitInvalid, stdout, stderr)
	}
	b, err := os.ReadFile(filepath.Join(out, "samples.csv"))
	if err != nil {
		t.Fatal(err)
	}
	rows, _ := csv.NewReader(bytes.NewReader(b)).ReadAll()
	verdict := map[string]string{}
	for _, r := range rows[1:] {
		verdict[r[1]] = r[18]
	}
	if verdict["G2413"] != "invalid" || verdict["RL-100-B7"] != "fail" {
		t.Errorf("verdicts %v, want G2413 invalid and the reference failed", verdict)
	}
	if !strings.Contains(stdout, "BATCH INVALID") {
		t.Errorf("summary does not say the batch is invalid:\n%s", stdout)
	}
}

func TestMalformedSheetStopsBeforeAnalysis(t *testing.T) {
	// A malformed sample sheet or specification is a usage error naming
	// file, line and column, and no results are written.
	in := t.TempDir()
	writeMono(t, filepath.Join(in, "a.csv"), "a", 1)
	bad := filepath.Join(t.TempDir(), "sheet.csv")
	os.WriteFile(bad, []byte("file,temperature_c\na.csv,warm\n"), 0o644)
	badSpec := filepath.Join(t.TempDir(), "spec.csv")
	os.WriteFile(badSpec, []byte("product,quantity,max\np,sizee,3\n"), 0o644)
	for _, c := range []struct {
		flag, path, where string
	}{{"--sheet", bad, "sheet.csv:2:7"}, {"--spec", badSpec, "spec.csv:2:3"}} {
		out := filepath.Join(t.TempDir(), "o")
		code, _, stderr := runCmd(t, "run", in, c.flag, c.path, "--out", out)
		if code != exitUsage || !strings.Contains(stderr, c.where) {
			t.Errorf("%s: exit %d, stderr %q; want %d naming %s", c.flag, code, stderr, exitUsage, c.where)
		}
		if _, err := os.Stat(filepath.Join(out, "results.csv")); err == nil {
			t.Errorf("%s: results were written despite the bad file", c.flag)
		}
	}
}

func TestHostileSheetNamesInReport(t *testing.T) {
	// Sample names from a sheet with HTML and path syntax are shown as
	// text in the report and never become file names.
	in := t.TempDir()
	writeMono(t, filepath.Join(in, "a.csv"), "a", 1)
	writeMono(t, filepath.Join(in, "b.csv"), "b", 1)
	sh := filepath.Join(t.TempDir(), "sheet.csv")
	os.WriteFile(sh, []byte("file,sample,lot\na.csv,<script>alert(1)</script>,../../etc/passwd\nb.csv,../../x,\"<img src=x onerror=alert(2)>\"\n"), 0o644)
	out := filepath.Join(t.TempDir(), "o")
	if code, _, stderr := runCmd(t, "run", in, "--sheet", sh, "--out", out, "-q"); code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var names []string
	filepath.WalkDir(out, func(p string, d os.DirEntry, err error) error {
		if err == nil && !d.IsDir() {
			rel, _ := filepath.Rel(out, p)
			names = append(names, rel)
		}
		return nil
	})
	want := "manifest.json report/index.html report/sample-0001.html report/sample-0002.html results.csv results.json samples.csv summary.txt"
	if strings.Join(names, " ") != want {
		t.Errorf("files written: %v, want %s", names, want)
	}
	for _, page := range []string{"index.html", "sample-0001.html", "sample-0002.html"} {
		b, err := os.ReadFile(filepath.Join(out, "report", page))
		if err != nil {
			t.Fatal(err)
		}
		s := string(b)
		if strings.Contains(s, "<script") || strings.Contains(s, "<img") {
			t.Errorf("%s holds an unescaped element from the sheet", page)
		}
		if page == "index.html" && !strings.Contains(s, "&lt;script&gt;alert(1)&lt;/script&gt;") {
			t.Errorf("index does not show the sample name as text")
		}
	}
}

func TestSheetReportsUnmatched(t *testing.T) {
	// A file no row matches and a row matching no file are both reported
	// (stderr and results.json), never silently ignored.
	in := t.TempDir()
	writeMono(t, filepath.Join(in, "a.csv"), "a", 1)
	writeMono(t, filepath.Join(in, "b.csv"), "b", 1)
	sh := filepath.Join(t.TempDir(), "sheet.csv")
	os.WriteFile(sh, []byte("file,lot\na.csv,L1\nzz*.csv,L9\n"), 0o644)
	out := filepath.Join(t.TempDir(), "o")
	code, _, stderr := runCmd(t, "run", in, "--sheet", sh, "--out", out, "-q")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if !strings.Contains(stderr, "b.csv: no row of the sample sheet matches") || !strings.Contains(stderr, `row "zz*.csv" matches no file`) {
		t.Errorf("stderr %q", stderr)
	}
	b, _ := os.ReadFile(filepath.Join(out, "results.json"))
	var doc struct {
		Sheet struct {
			UnmatchedFiles []string `json:"unmatched_files"`
			UnusedRows     []string `json:"unused_rows"`
		} `json:"sheet"`
	}
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Sheet.UnmatchedFiles) != 1 || !strings.HasSuffix(doc.Sheet.UnmatchedFiles[0], "b.csv") || len(doc.Sheet.UnusedRows) != 1 {
		t.Errorf("sheet report %+v", doc.Sheet)
	}
}

func TestManifest(t *testing.T) {
	// manifest.json holds the SHA-256 of each input and output (checked
	// here against crypto/sha256 of the files themselves) and the settings.
	in := batchDir(t)
	out := filepath.Join(t.TempDir(), "o")
	runCmd(t, "run", in, "--out", out, "-q")
	b, err := os.ReadFile(filepath.Join(out, "manifest.json"))
	if err != nil {
		t.Fatal(err)
	}
	var m struct {
		Version  string         `json:"version"`
		Complete bool           `json:"complete"`
		Root     string         `json:"root"`
		Settings map[string]any `json:"settings"`
		Inputs   []struct {
			Path   string `json:"path"`
			SHA256 string `json:"sha256"`
		} `json:"inputs"`
		Outputs []struct {
			Path   string `json:"path"`
			SHA256 string `json:"sha256"`
		} `json:"outputs"`
	}
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	if len(m.Inputs) != 4 || m.Version != report.Version() || !m.Complete || m.Settings["cumulant_method"] != "nonlinear" {
		t.Fatalf("manifest %+v", m)
	}
	sum := func(p string) string {
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		h := sha256.Sum256(b)
		return fmt.Sprintf("%x", h[:])
	}
	for _, f := range m.Inputs {
		if f.SHA256 != sum(filepath.Join(m.Root, f.Path)) {
			t.Errorf("input %s: hash differs", f.Path)
		}
	}
	seen := map[string]bool{}
	for _, f := range m.Outputs {
		seen[f.Path] = true
		if f.SHA256 != sum(filepath.Join(out, f.Path)) {
			t.Errorf("output %s: hash differs", f.Path)
		}
	}
	for _, want := range []string{"results.csv", "samples.csv", "results.json", "report/index.html"} {
		if !seen[want] {
			t.Errorf("manifest lacks %s", want)
		}
	}
}
