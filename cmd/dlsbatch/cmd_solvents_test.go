package main

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

func solventsCmd(t *testing.T, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	var out, errb bytes.Buffer
	code = runSolvents(context.Background(), env{stdout: &out, stderr: &errb}, args)
	return code, out.String(), errb.String()
}

func TestSolventsHelp(t *testing.T) {
	code, out, errs := solventsCmd(t, "--help")
	if code != exitOK || !strings.Contains(out, "Usage: dlsbatch solvents") || !strings.Contains(out, "--temperature-c") {
		t.Errorf("--help: code %d, stdout %q, stderr %q", code, out, errs)
	}
	if errs != "" {
		t.Errorf("--help wrote to stderr: %q", errs)
	}
	if code, _, errs := solventsCmd(t, "--no-such-flag"); code != exitUsage || !strings.Contains(errs, "unknown flag") {
		t.Errorf("bad flag: code %d, stderr %q", code, errs)
	}
	if code, _, errs := solventsCmd(t, "heavy water"); code != exitUsage || !strings.Contains(errs, "unknown solvent") {
		t.Errorf("unknown solvent: code %d, stderr %q", code, errs)
	}
}

func TestSolventsListing(t *testing.T) {
	code, out, errs := solventsCmd(t)
	if code != exitOK {
		t.Fatalf("code %d, stderr %q", code, errs)
	}
	// Every entry with its range and source; DMSO melts at 18.5 °C
	// (Perry's Tmin 291.67 K) and boils at 189.0 °C.
	for _, want := range []string{"water", "IAPWS 2008", "dimethyl sulfoxide", "18.5–189.0", "Table 2-313", "glycerol-water:W", "toluene"} {
		if !strings.Contains(out, want) {
			t.Errorf("listing lacks %q", want)
		}
	}
}

// The example of the help text, checked against the IAPWS values: water at
// 37 °C, viscosity 0.6913 mPa·s (IAPWS 2008 with Pátek density at
// 0.101325 MPa, computed by an independent script: 691.30 µPa·s; printed to
// 4 decimals).
func TestSolventsAtState(t *testing.T) {
	code, out, errs := solventsCmd(t, "--temperature-c", "37", "--wavelength-nm", "532", "water", "ethanol", "glycerol-water:0.3")
	if code != exitOK {
		t.Fatalf("code %d, stderr %q", code, errs)
	}
	m := regexp.MustCompile(`(?m)^water\s+([0-9.]+)\s+([0-9.]+)\s+ok$`).FindStringSubmatch(out)
	if m == nil {
		t.Fatalf("no water row in\n%s", out)
	}
	if mu, _ := strconv.ParseFloat(m[1], 64); mu < 0.69125 || mu > 0.69135 {
		t.Errorf("water viscosity %s mPa·s, want 0.6913", m[1])
	}
	// Laser-line table at 37 °C, 532 nm: 1.33339 (IAPWS R9-97, computed
	// by an independent script, 5 decimals).
	if m[2] != "1.33339" {
		t.Errorf("water index %s, want 1.33339", m[2])
	}
	// The glycerol dispersion starts at 589.3 nm: the row says out of range.
	if !strings.Contains(out, "532.0 nm is outside 589–1050 nm") {
		t.Errorf("glycerol–water at 532 nm not reported out of range:\n%s", out)
	}
	if !strings.Contains(out, "corrected to 37.00 °C") {
		t.Errorf("ethanol index source does not state the correction:\n%s", out)
	}
	code, out, _ = solventsCmd(t, "--wavelength-nm", "532", "--extrapolate", "glycerol-water:0.3")
	if code != exitOK || !strings.Contains(out, "extrapolated") {
		t.Errorf("--extrapolate: code %d\n%s", code, out)
	}
	if code, _, _ := solventsCmd(t, "--temperature-c", "-300"); code != exitUsage {
		t.Errorf("below absolute zero: code %d, want %d", code, exitUsage)
	}
}

func TestSolventsUserFile(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "mine.csv")
	// Constant viscosity 0.5542 mPa·s: the toluene reference value of
	// Santos et al., J. Phys. Chem. Ref. Data 35, 1 (2006).
	csv := "name,t_min_c,t_max_c,viscosity_model,viscosity_params,index_model,index_params,source\n" +
		"toluene-ref,24,26,constant,0.5542,constant,1.4945,Santos et al. 2006\n"
	if err := os.WriteFile(path, []byte(csv), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errs := solventsCmd(t, "--file", path, "--temperature-c", "25", "toluene-ref")
	if code != exitOK {
		t.Fatalf("code %d, stderr %q", code, errs)
	}
	if !regexp.MustCompile(`(?m)^toluene-ref\s+0\.5542\s+1\.49450\s+ok$`).MatchString(out) {
		t.Errorf("user entry not printed:\n%s", out)
	}
	bad := filepath.Join(dir, "bad.csv")
	if err := os.WriteFile(bad, []byte("name,colour\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	code, _, errs = solventsCmd(t, "--file", bad)
	if code != exitUsage || !strings.Contains(errs, bad+":1:6:") {
		t.Errorf("bad file: code %d, stderr %q; want %s:1:6", code, errs, bad)
	}
}
