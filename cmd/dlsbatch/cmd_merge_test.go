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
// the report pages' hashes); merge refuses a missing shard, a shard given
// twice and a set that is not a shard.
func TestShardsMergeToOneRun(t *testing.T) {
	demo := filepath.Join("..", "..", "testdata")
	args := []string{filepath.Join(demo, "demo"), "--sheet", filepath.Join(demo, "demo-sheet.csv"),
		"--spec", filepath.Join(demo, "demo-spec.csv"), "-q"}
	tmp := t.TempDir()
	whole := filepath.Join(tmp, "whole")
	if code, _, stderr := runCmd(t, append([]string{"run", "--out", whole}, args...)...); code != exitSpecFailed {
		t.Fatalf("whole run: exit %d: %s", code, stderr)
	}
	var shards []string
	for k := range 3 {
		d := filepath.Join(tmp, "shard"+string(rune('0'+k)))
		shards = append(shards, d)
		code, _, stderr := runCmd(t, append([]string{"run", "--out", d, "--shard", string(rune('0'+k)) + "/3"}, args...)...)
		if code == exitUsage || code == exitFatal {
			t.Fatalf("shard %d: exit %d: %s", k, code, stderr)
		}
	}
	merged := filepath.Join(tmp, "merged")
	if code, _, stderr := runCmd(t, append([]string{"merge", "--out", merged, "-q"}, shards...)...); code != exitSpecFailed {
		t.Fatalf("merge: exit %d: %s", code, stderr)
	}
	for _, f := range []string{"results.csv", "samples.csv", "results.json", "manifest.json"} {
		a, _ := os.ReadFile(filepath.Join(whole, f))
		b, err := os.ReadFile(filepath.Join(merged, f))
		if err != nil || !bytes.Equal(a, b) {
			t.Errorf("%s: merged differs from the whole run: %s", f, firstDiff(a, b))
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
