package main

import (
	"path/filepath"
	"strings"
	"testing"
)

// TestParseTimeValueChecks: --set and --default values are checked as the
// flag is parsed, with the number syntax of dls.ParseNumber and the roles
// of dls.ParseRole: a bad one is a usage error (exit 2, as run's help
// says) naming the flag, before any file is read. A table that cannot be
// opened is named once ("sample sheet: ", not twice).
func TestParseTimeValueChecks(t *testing.T) {
	demo := filepath.Join("..", "..", "testdata", "demo")
	cases := []struct {
		name string
		args []string
		code int
		want string
	}{
		{"decimal comma in --set", []string{"--set", "temperature_c=25,0"}, exitUsage, `"temperature_c=25,0"`},
		{"hexadecimal --default", []string{"--default", "angle_deg=0x1p7"}, exitUsage, "angle_deg"},
		{"unknown role", []string{"--set", "role=control"}, exitUsage, "role=control"},
		{"bad particle index", []string{"--default", "particle_ri=1.59+i"}, exitUsage, "particle_ri"},
		{"unknown key", []string{"--set", "temp=25"}, exitUsage, "unknown key"},
		{"missing sheet named once", []string{"--sheet", "no-such-sheet.csv"}, exitUsage, "sample sheet: open no-such-sheet.csv"},
		{"missing spec named once", []string{"--spec", "no-such-spec.csv"}, exitUsage, "specification: open no-such-spec.csv"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			args := append([]string{"run", "--out", filepath.Join(t.TempDir(), "out"), "--no-report"}, c.args...)
			code, _, stderr := runCmd(t, append(args, demo)...)
			if code != c.code || !strings.Contains(stderr, c.want) {
				t.Errorf("exit %d, stderr %q; want %d and %q", code, stderr, c.code, c.want)
			}
			for _, p := range []string{"sample sheet: sample sheet:", "specification: specification:"} {
				if strings.Contains(stderr, p) {
					t.Errorf("stderr %q doubles %q", stderr, p)
				}
			}
		})
	}
}

// TestEachCommandListsItsOwnExitCodes: --help of every command ends with
// the exit codes of that command (help/NAME.exits.txt).
func TestEachCommandListsItsOwnExitCodes(t *testing.T) {
	for _, sc := range subcommands() {
		code, stdout, _ := runCmd(t, sc.name, "--help")
		if code != exitOK || !strings.HasSuffix(stdout, "\nExit codes:\n"+help(sc.name+".exits")) {
			t.Errorf("%s --help (exit %d) does not end with its own exit codes:\n%s", sc.name, code, stdout)
		}
	}
}
