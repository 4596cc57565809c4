package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestCommandStaysThin: the command is flags, wiring, progress and exit
// codes; what it does lives in the packages below it. The project keeps
// it under 925 non-test lines (a rule of its layout, DEVELOPERS.md; 900
// until merge took run's -j, --progress and profile flags), so logic that
// creeps in here fails a test and moves where it belongs.
func TestCommandStaysThin(t *testing.T) {
	files, _ := filepath.Glob("*.go")
	n := 0
	for _, f := range files {
		if strings.HasSuffix(f, "_test.go") {
			continue
		}
		b, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		n += bytes.Count(b, []byte("\n"))
	}
	if n == 0 || n > 925 {
		t.Errorf("cmd/dlsbatch holds %d non-test lines; the limit is 925", n)
	}
}
