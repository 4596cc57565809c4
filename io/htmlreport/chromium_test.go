package htmlreport

import (
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// checkScript is the CI check that renders a report in headless Chromium.
var checkScript = filepath.Join("..", "..", ".ci", "check-report.sh")

// runCheck runs the check script on dir and returns its output and error.
func runCheck(t *testing.T, dir string) (string, error) {
	t.Helper()
	// Installing chromium (first run on a fresh machine) takes a minute or
	// two; rendering a page a few seconds.
	ctx, cancel := context.WithTimeout(context.Background(), 10*time.Minute)
	defer cancel()
	cmd := exec.CommandContext(ctx, "bash", checkScript, dir)
	cmd.Env = append(os.Environ(), "CHECK_REPORT_SHOTS="+t.TempDir())
	out, err := cmd.CombinedOutput()
	return string(out), err
}

// The demo report renders in a real browser with no console error and a
// screenshot that is not blank; and the check itself fails on a page with
// a script error and on a blank page, so that a pass means something.
// The script installs Debian's chromium when it is missing (root only).
func TestChromiumRender(t *testing.T) {
	if _, err := os.Stat("/usr/bin/chromium"); err != nil && os.Geteuid() != 0 {
		t.Skip("/usr/bin/chromium is missing and only root can install it")
	}
	if testing.Short() {
		t.Skip("starts a browser: slow")
	}
	dir := filepath.Join(t.TempDir(), "report")
	if _, err := Write(dir, demoReport(t)); err != nil {
		t.Fatal(err)
	}
	out, err := runCheck(t, dir)
	if err != nil {
		t.Fatalf("check-report failed: %v\n%s", err, out)
	}
	for _, want := range []string{"ok index.html", "ok sample-0001.html"} {
		if !strings.Contains(out, want) {
			t.Errorf("check-report output lacks %q:\n%s", want, out)
		}
	}

	for _, tc := range []struct {
		name, page, want string
	}{
		{"script error", `<!DOCTYPE html><html><body><h1>x</h1><script>undefinedFunction();</script></body></html>`, "console"},
		{"blank page", `<!DOCTYPE html><html><body></body></html>`, "blank"},
		{"external image", `<!DOCTYPE html><html><body><img src="https://example.invalid/x.png"/></body></html>`, "external"},
		{"missing page", `<!DOCTYPE html><html><body><a href="sample-0009.html">x</a></body></html>`, "sample-0009.html"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			bad := t.TempDir()
			if err := os.WriteFile(filepath.Join(bad, "index.html"), []byte(tc.page), 0o644); err != nil {
				t.Fatal(err)
			}
			out, err := runCheck(t, bad)
			if err == nil {
				t.Fatalf("check-report passed a bad page:\n%s", out)
			}
			if !strings.Contains(out, tc.want) {
				t.Errorf("failure message lacks %q:\n%s", tc.want, out)
			}
		})
	}
}
