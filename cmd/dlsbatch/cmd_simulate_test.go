package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"dlsbatch/dls/mie"
	"dlsbatch/io/csvdata"
)

// simCmd runs `dlsbatch simulate ARGS` with buffers.
func simCmd(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	return runCmd(t, append([]string{"simulate"}, args...)...)
}

func TestSimulateHelp(t *testing.T) {
	code, out, _ := simCmd(t, "--help")
	if code != exitOK {
		t.Fatalf("--help exit %d, want 0", code)
	}
	for _, f := range []string{"--plan", "--out", "--population", "--solvent", "--temperature-c", "--wavelength-nm",
		"--angle-deg", "--count-rate-kcps", "--duration-s", "--beta", "--seed", "--runs", "--sigma", "--output",
		"--dust-bursts", "--force", "dust_bursts", "particle_ri", "Exit codes"} {
		if !strings.Contains(out, f) {
			t.Errorf("--help does not mention %s", f)
		}
	}
	if code, _, _ := simCmd(t, "--no-such-flag"); code != exitUsage {
		t.Errorf("unknown flag: exit %d, want %d", code, exitUsage)
	}
}

// TestSimulateSingle writes one file to stdout and reads it back with the
// project's reader: three runs, sigma columns, the stated metadata, and the
// same bytes for the same seed.
func TestSimulateSingle(t *testing.T) {
	args := []string{"--population", "mono(100nm)", "--runs", "3", "--sigma", "--seed", "5", "--sample", "LAT-1"}
	code, out, errs := simCmd(t, args...)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	entries := csvdata.Read(strings.NewReader(out), "stdout", nil)
	if len(entries) != 3 {
		t.Fatalf("%d runs read, want 3", len(entries))
	}
	for i, e := range entries {
		if e.Err != nil {
			t.Fatal(e.Err)
		}
		m := e.M
		if want := "r" + strconv.Itoa(i+1); m.Run != want {
			t.Errorf("run %d label %q, want %q", i, m.Run, want)
		}
		// Default grid: 200 channels (2·8 + 8·23).
		if len(m.TauS) != 200 || m.Sigma == nil {
			t.Errorf("run %d: %d lags, sigma %v", i, len(m.TauS), m.Sigma != nil)
		}
		for k, v := range map[string]string{"sample": "LAT-1", "temperature_c": "25", "wavelength_nm": "632.8",
			"angle_deg": "173", "solvent": "water", "count_rate_kcps": "200", "duration_s": "10"} {
			if got := m.Meta.String(k); got != v {
				t.Errorf("metadata %s = %q, want %q", k, got, v)
			}
		}
		if _, ok := m.Meta.Get("particle_ri"); ok {
			t.Error("particle_ri written without a material or index")
		}
	}
	_, again, _ := simCmd(t, args...)
	if again != out {
		t.Error("same seed gave different bytes")
	}
	_, other, _ := simCmd(t, "--population", "mono(100nm)", "--runs", "3", "--sigma", "--seed", "6", "--sample", "LAT-1")
	if other == out {
		t.Error("different seeds gave the same bytes")
	}
}

func writePlan(t *testing.T, dir, text string) string {
	t.Helper()
	p := filepath.Join(dir, "plan.csv")
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

const testPlan = `# comment line, skipped
file,sample,runs,population,material,temperature_c,angle_deg,dust_bursts,sigma
01_ref.csv,PS ref,1,mono(100nm),polystyrene,25,173,,yes
02_gold.csv,Au,2,"lognormal(20nm,0.1,number)",Au,,90,,no
03_dust.csv,dusty,,mono(100nm),,37,,1,
`

// TestSimulatePlan runs a small plan and checks the files and truth.json:
// the metadata asked for, the material index from the material table at
// the wavelength, and the ground truth of a 100 nm sphere in water at 25 °C
// against the worked Stokes–Einstein value Γ(173°) = 3418.78 /s (k_B exact,
// η = 0.890022 mPa·s from IAPWS 2008, n = 1.33162 from IAPWS R9-97 at
// 632.8 nm; the solvent table computes both from the same correlations).
func TestSimulatePlan(t *testing.T) {
	dir := t.TempDir()
	plan := writePlan(t, dir, testPlan)
	out := filepath.Join(dir, "out")
	code, _, errs := simCmd(t, "--plan", plan, "--out", out)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	names, _ := filepath.Glob(filepath.Join(out, "*"))
	if len(names) != 4 {
		t.Fatalf("files written: %v, want 3 correlograms and truth.json", names)
	}
	gold := csvdata.ReadFile(filepath.Join(out, "02_gold.csv"), nil)
	if len(gold) != 2 || gold[0].Err != nil {
		t.Fatalf("02_gold.csv: %+v", gold)
	}
	auIndex, _, err := mie.MaterialIndex("Au", 632.8e-9)
	if err != nil {
		t.Fatal(err)
	}
	if got := gold[0].M.Meta.String("particle_ri"); got != mie.FormatComplexIndex(auIndex) {
		t.Errorf("gold particle_ri %q, want %q", got, mie.FormatComplexIndex(auIndex))
	}
	if gold[0].M.Sigma != nil {
		t.Error("gold: sigma written although the plan says no")
	}
	if got := gold[0].M.Meta.String("angle_deg"); got != "90" {
		t.Errorf("gold angle %q, want 90", got)
	}
	ref := csvdata.ReadFile(filepath.Join(out, "01_ref.csv"), nil)
	if ref[0].Err != nil || ref[0].M.Sigma == nil {
		t.Fatalf("01_ref.csv: %v, sigma %v", ref[0].Err, ref[0].M.Sigma != nil)
	}
	dust := csvdata.ReadFile(filepath.Join(out, "03_dust.csv"), nil)
	if dust[0].Err != nil || dust[0].M.Meta.String("temperature_c") != "37" {
		t.Fatalf("03_dust.csv: %v, temperature %q", dust[0].Err, dust[0].M.Meta.String("temperature_c"))
	}

	var truth struct {
		Measurements []struct {
			File          string  `json:"file"`
			ZAvgNm        float64 `json:"z_avg_nm"`
			PDI           float64 `json:"pdi"`
			GammaMeanPerS float64 `json:"gamma_mean_per_s"`
			DustBursts    int     `json:"dust_bursts"`
		} `json:"measurements"`
	}
	data, err := os.ReadFile(filepath.Join(out, "truth.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(data, &truth); err != nil {
		t.Fatal(err)
	}
	if len(truth.Measurements) != 3 || truth.Measurements[0].File != "01_ref.csv" || truth.Measurements[2].File != "03_dust.csv" {
		t.Fatalf("truth.json measurements: %+v", truth.Measurements)
	}
	m := truth.Measurements[0]
	// 2e-5 relative: the reference Γ has six digits (last one truncated)
	// and truth.json writes seven.
	if math.Abs(m.GammaMeanPerS-3418.78)/3418.78 > 2e-5 || math.Abs(m.ZAvgNm-100) > 1e-4 || m.PDI != 0 {
		t.Errorf("01_ref truth: Γ̄ %g, z %g nm, PDI %g; want 3418.78, 100, 0", m.GammaMeanPerS, m.ZAvgNm, m.PDI)
	}
	if truth.Measurements[2].DustBursts != 1 {
		t.Errorf("03_dust truth: dust bursts %d, want 1", truth.Measurements[2].DustBursts)
	}

	// Same plan again: refused without --force, same bytes with it.
	if code, _, errs := simCmd(t, "--plan", plan, "--out", out); code != exitUsage || !strings.Contains(errs, "not empty") {
		t.Errorf("second run into a full folder: exit %d, %q", code, errs)
	}
	first, _ := os.ReadFile(filepath.Join(out, "02_gold.csv"))
	if code, _, errs := simCmd(t, "--plan", plan, "--out", out, "--force"); code != exitOK {
		t.Fatalf("--force: exit %d: %s", code, errs)
	}
	second, _ := os.ReadFile(filepath.Join(out, "02_gold.csv"))
	if !bytes.Equal(first, second) {
		t.Error("the same plan gave different bytes")
	}
	// The plan's own folder is never an output folder.
	if code, _, errs := simCmd(t, "--plan", plan, "--out", dir, "--force"); code != exitUsage || !strings.Contains(errs, "holds the plan") {
		t.Errorf("--out next to the plan: exit %d, %q", code, errs)
	}
}

// TestSimulatePlanErrors checks that plan errors name file, line and column.
func TestSimulatePlanErrors(t *testing.T) {
	tests := []struct {
		name, plan, want string
	}{
		{"population", "file,population\na.csv,mono(100nm)\nb.csv,cube(3nm)\n", "plan.csv:3:7: population"},
		{"number", "# c\nfile,temperature_c\na.csv,warm\n", "plan.csv:3:7: temperature_c"},
		{"column", "file,colour\na.csv,red\n", "plan.csv:1:6: unknown column"},
		{"file name", "file\n../x.csv\n", "plan.csv:2:1: file"},
		{"duplicate", "file\na.csv\nA.csv\n", "plan.csv:3:1: file"},
		{"fields", "file,runs\na.csv,1,2\n", "plan.csv:2:1:"},
		{"material", "file,material\na.csv,unobtainium\n", "plan.csv:2:7: material"},
		{"solvent", "file,solvent\na.csv,mercury\n", "plan.csv:2:7: solvent"},
		{"sigma", "file,sigma\na.csv,maybe\n", "plan.csv:2:7: sigma"},
		{"empty", "# nothing\n", "plan.csv: no plan rows"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			plan := writePlan(t, dir, tc.plan)
			code, _, errs := simCmd(t, "--plan", plan, "--out", filepath.Join(dir, "out"))
			if code != exitUsage {
				t.Errorf("exit %d, want %d", code, exitUsage)
			}
			if !strings.Contains(errs, tc.want) {
				t.Errorf("stderr %q does not contain %q", errs, tc.want)
			}
			if _, err := os.Stat(filepath.Join(dir, "out")); err == nil {
				t.Error("output folder created although the plan is bad")
			}
		})
	}
}

func TestSimulateSingleFileGuards(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "a.csv")
	if code, _, errs := simCmd(t, "-o", p); code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if code, _, errs := simCmd(t, "-o", p); code != exitUsage || !strings.Contains(errs, "exists") {
		t.Errorf("overwrite without --force: exit %d, %q", code, errs)
	}
	for _, args := range [][]string{
		{"--out", dir},
		{"--plan", "x.csv"},
		{"--beta", "2"},
		{"--duration-s", "1"}, // shorter than the default grid's 3.4 s
		{"--population", "mono(100nm)+mono(5nm)"},
		{"--dt-ns", "0"},
		{"extra-argument"},
	} {
		if code, _, _ := simCmd(t, args...); code != exitUsage {
			t.Errorf("%v: exit %d, want %d", args, code, exitUsage)
		}
	}
}

// TestDemoUpToDate regenerates the demo data set from its plan with the
// command in the plan's header and compares it byte for byte with
// testdata/demo. A failure after a change to the simulator, the solvent
// table or the Mie code means the demo must be regenerated with that
// command.
func TestDemoUpToDate(t *testing.T) {
	if testing.Short() {
		t.Skip("regenerates 22 files")
	}
	plan := filepath.Join("..", "..", "testdata", "demo-plan.csv")
	want := filepath.Join("..", "..", "testdata", "demo")
	out := filepath.Join(t.TempDir(), "demo")
	if code, _, errs := simCmd(t, "--plan", plan, "--out", out); code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	got, _ := filepath.Glob(filepath.Join(out, "*"))
	ref, _ := filepath.Glob(filepath.Join(want, "*"))
	if len(got) != len(ref) || len(ref) < 21 {
		t.Fatalf("%d files generated, %d in testdata/demo", len(got), len(ref))
	}
	for _, p := range ref {
		a, _ := os.ReadFile(p)
		b, err := os.ReadFile(filepath.Join(out, filepath.Base(p)))
		if err != nil || !bytes.Equal(a, b) {
			t.Errorf("%s differs from a fresh run (regenerate with the command in testdata/demo-plan.csv)", filepath.Base(p))
		}
	}
}

// TestSimulateNoise runs the three noise models through the command: the
// photon model refuses a first sample time below 100 ns and σ from one
// run, writes σ as the standard deviation of its runs' g2 (its definition;
// tolerance 1e-4 relative for the written digits) and names itself in the
// truth record; the fast models need no more than the defaults; an
// unknown model is a usage error. A plan's noise column is positioned.
func TestSimulateNoise(t *testing.T) {
	photon := []string{"--noise", "photon", "--dt-ns", "1000", "--tau-max-s", "0.02", "--duration-s", "0.2", "--runs", "3"}
	for _, c := range []struct {
		name string
		args []string
		code int
		text string
	}{
		{"photon at the default 25 ns", []string{"--noise", "photon", "--duration-s", "1", "--tau-max-s", "0.05"}, exitUsage, "at least 100 ns"},
		{"photon σ from one run", []string{"--noise", "photon", "--dt-ns", "1000", "--tau-max-s", "0.02", "--duration-s", "0.2", "--sigma"}, exitUsage, "at least 2 runs"},
		{"unknown model", []string{"--noise", "pink"}, exitUsage, "gaussian, correlated, photon"},
		{"correlated", []string{"--noise", "correlated"}, exitOK, ""},
		{"photon", append(photon, "--sigma"), exitOK, ""},
	} {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			truth := filepath.Join(dir, "truth.json")
			code, out, errs := simCmd(t, append(c.args, "--truth", truth)...)
			if code != c.code || !strings.Contains(errs, c.text) {
				t.Fatalf("exit %d, stderr %q; want %d and %q", code, errs, c.code, c.text)
			}
			if code != exitOK {
				return
			}
			entries := csvdata.Read(strings.NewReader(out), "stdout", nil)
			tb, _ := os.ReadFile(truth)
			if c.name != "photon" {
				if len(entries) == 0 || entries[0].Err != nil || !strings.Contains(string(tb), `"noise": "correlated"`) {
					t.Fatalf("correlated: %d runs, truth %s", len(entries), tb)
				}
				return
			}
			if len(entries) != 3 || !strings.Contains(string(tb), `"noise": "photon"`) {
				t.Fatalf("%d runs, truth %s", len(entries), tb)
			}
			for k, s := range entries[0].M.Sigma {
				var m, ss float64
				for _, e := range entries {
					m += e.M.Corr[k] / 3
				}
				for _, e := range entries {
					ss += (e.M.Corr[k] - m) * (e.M.Corr[k] - m)
				}
				if sd := math.Sqrt(ss / 2); math.Abs(s-sd) > 1e-4*sd {
					t.Fatalf("channel %d: σ %g, standard deviation of the runs %g", k, s, sd)
				}
			}
		})
	}
	dir := t.TempDir()
	plan := writePlan(t, dir, "file,noise\na.csv,photon\n")
	code, _, errs := simCmd(t, "--plan", plan, "--out", filepath.Join(dir, "out"), "--duration-s", "1", "--tau-max-s", "0.05")
	if code != exitUsage || !strings.Contains(errs, "plan.csv:2:7: noise") {
		t.Errorf("plan at 25 ns: exit %d, stderr %q; want the noise cell", code, errs)
	}
}
