package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestShardsMergeToOneRun: the demo night run whole and as three shards
// merged give the same bytes in every output (tables, JSON, manifest with
// the report pages' hashes), with the default settings and with other
// settings of the joint analyses that merge recomputes (their target and
// the peaks' noise, which merge must take from the shards' records);
// merge refuses a missing shard, a shard given twice and a set that is
// not a shard.
func TestShardsMergeToOneRun(t *testing.T) {
	demo := filepath.Join("..", "..", "testdata")
	tmp := t.TempDir()
	var whole string
	var shards []string
	for v, extra := range [][]string{nil, {"--joint-prob-reject-target", "0.3", "--peak-uncertainty", "correlator-model"}} {
		args := append([]string{filepath.Join(demo, "demo"), "--sheet", filepath.Join(demo, "demo-sheet.csv"),
			"--spec", filepath.Join(demo, "demo-spec.csv"), "-q"}, extra...)
		dir := filepath.Join(tmp, string(rune('a'+v)))
		whole = filepath.Join(dir, "whole")
		if code, _, stderr := runCmd(t, append([]string{"run", "--out", whole}, args...)...); code != exitSpecFailed {
			t.Fatalf("%v: whole run: exit %d: %s", extra, code, stderr)
		}
		shards = nil
		for k := range 3 {
			d := filepath.Join(dir, "shard"+string(rune('0'+k)))
			shards = append(shards, d)
			code, _, stderr := runCmd(t, append([]string{"run", "--out", d, "--shard", string(rune('0'+k)) + "/3"}, args...)...)
			if code == exitUsage || code == exitFatal {
				t.Fatalf("%v: shard %d: exit %d: %s", extra, k, code, stderr)
			}
		}
		// The merge's output is the same at any -j (the manifest holds the
		// report pages' hashes); its CPU profile is written when asked for.
		merged, prof := filepath.Join(dir, "merged"), filepath.Join(dir, "cpu.out")
		margs := []string{"merge", "--out", merged, "-q", "-j", "2"}
		if v == 0 {
			margs = []string{"merge", "--out", merged, "-q", "-j", "1", "--cpuprofile", prof}
		}
		if code, _, stderr := runCmd(t, append(margs, shards...)...); code != exitSpecFailed {
			t.Fatalf("%v: merge: exit %d: %s", extra, code, stderr)
		}
		if b, err := os.ReadFile(prof); v == 0 && (err != nil || len(b) < 2 || b[0] != 0x1f || b[1] != 0x8b) {
			t.Errorf("merge --cpuprofile: %d bytes, %v; want a gzip-compressed profile", len(b), err)
		}
		for _, f := range []string{"results.csv", "samples.csv", "results.json", "manifest.json"} {
			a, _ := os.ReadFile(filepath.Join(whole, f))
			b, err := os.ReadFile(filepath.Join(merged, f))
			if err != nil || !bytes.Equal(a, b) {
				t.Errorf("%v: %s: merged differs from the whole run: %s", extra, f, firstDiff(a, b))
			}
		}
	}
	for _, tc := range []struct {
		name string
		dirs []string
		want string
	}{
		{"missing shard", shards[:2], "missing [2]"},
		{"shard twice", []string{shards[0], shards[1], shards[1]}, "both shard 1"},
		{"not a shard", []string{whole, shards[0], shards[1]}, "is not the set of a shard"},
	} {
		code, _, stderr := runCmd(t, append([]string{"merge", "--out", filepath.Join(tmp, "x"), "--force"}, tc.dirs...)...)
		if code != exitUsage || !strings.Contains(stderr, tc.want) {
			t.Errorf("%s: exit %d, %q; want %d and %q", tc.name, code, stderr, exitUsage, tc.want)
		}
	}
}
