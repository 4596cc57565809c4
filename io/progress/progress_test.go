package progress

import (
	"strings"
	"testing"
	"time"
)

// TestLines: in lines mode a line is written at each new tenth (the last
// at the end), with the time left extrapolated linearly (a clock the test drives:
// 1 s per item, so after 30 of 100 items 70 s are left).
func TestLines(t *testing.T) {
	var b strings.Builder
	r := New(&b, Lines, false, "x: ")
	clock := time.Unix(0, 0)
	r.now = func() time.Time { return clock }
	for i := 0; i <= 100; i++ {
		r.Update("analysing", i, 100)
		clock = clock.Add(time.Second)
	}
	r.Done()
	lines := strings.Split(strings.TrimSpace(b.String()), "\n")
	if len(lines) != 10 {
		t.Fatalf("%d lines, want 10 (every tenth, the last at the end):\n%s", len(lines), b.String())
	}
	if !strings.Contains(lines[2], "analysing 30/100 (30 %), 30s, about 1m10s left") {
		t.Errorf("line 3: %q", lines[2])
	}
	if !strings.HasPrefix(lines[9], "x: analysing 100/100 (100 %)") {
		t.Errorf("last line: %q", lines[9])
	}
	var quiet strings.Builder
	New(&quiet, None, true, "").Update("analysing", 1, 2)
	if quiet.Len() != 0 {
		t.Error("mode none wrote")
	}
}

// TestLinesEveryTenSeconds: a slow phase still reports every 10 s.
func TestLinesEveryTenSeconds(t *testing.T) {
	var b strings.Builder
	r := New(&b, Auto, false, "")
	clock := time.Unix(0, 0)
	r.now = func() time.Time { return clock }
	for i := 0; i < 30; i++ { // 30 of 1000 items, 5 s each: 0 % → 3 %
		r.Update("report", i, 1000)
		clock = clock.Add(5 * time.Second)
	}
	if n := strings.Count(b.String(), "\n"); n < 14 || n > 16 {
		t.Errorf("%d lines over 150 s, want about one per 10 s:\n%s", n, b.String())
	}
}
