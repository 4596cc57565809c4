package main

import (
	"strings"
	"testing"

	"dlsbatch/dls"
)

func TestParamsFlag(t *testing.T) {
	f := paramsFlag{flag: "set", origin: dls.OriginFlag}
	if err := f.Set("temperature_c= 25"); err != nil {
		t.Fatal(err)
	}
	if p := f.params[0]; p.Key != "temperature_c" || p.Value != "25" || p.Origin != dls.OriginFlag || p.Where != "--set temperature_c= 25" {
		t.Errorf("param %+v", p)
	}
	for _, bad := range []string{"temperature_c", "=25", "colour=blue", ""} {
		if err := f.Set(bad); err == nil {
			t.Errorf("%q accepted", bad)
		}
	}
	e := newEnum("a", "a", "b")
	if err := e.Set("c"); err == nil || !strings.Contains(err.Error(), "a, b") {
		t.Errorf("enum error %v does not list the allowed values", err)
	}
}

func FuzzParamsFlag(f *testing.F) {
	f.Add("temperature_c=25")
	f.Add("sample=a=b")
	f.Add("=")
	f.Fuzz(func(t *testing.T, s string) {
		p := paramsFlag{flag: "set", origin: dls.OriginFlag}
		if err := p.Set(s); err == nil {
			if len(p.params) != 1 || !dls.IsMetadataKey(p.params[0].Key) {
				t.Fatalf("accepted %q as %+v", s, p.params)
			}
		}
	})
}

func TestFlagsCommand(t *testing.T) {
	code, out, _ := runCmd(t, "flags")
	if code != exitOK {
		t.Fatalf("exit %d", code)
	}
	for _, c := range []string{"LOW-INTERCEPT", "DUST", "OUTLIER", "HIGH-RSD", "threshold"} {
		if !strings.Contains(out, c) {
			t.Errorf("flags listing lacks %s", c)
		}
	}
	if code, _, _ := runCmd(t, "flags", "extra"); code != exitUsage {
		t.Errorf("flags with an argument: exit %d", code)
	}
	if code, out, _ := runCmd(t, "flags", "--help"); code != exitOK || !strings.Contains(out, "stable") {
		t.Errorf("flags --help: exit %d", code)
	}
}
