package htmlreport

import (
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
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

// printPages prints page to PDF in headless Chromium (A4, the report's
// print stylesheet) and returns the number of pages.
func printPages(t *testing.T, page string) int {
	t.Helper()
	pdf := filepath.Join(t.TempDir(), "page.pdf")
	ctx, cancel := context.WithTimeout(context.Background(), 3*time.Minute)
	defer cancel()
	cmd := exec.CommandContext(ctx, "/usr/bin/chromium", "--headless", "--no-sandbox", "--disable-gpu", "--no-first-run",
		"--disable-background-networking", "--disable-component-update", "--disable-sync", "--user-data-dir="+t.TempDir(),
		"--no-pdf-header-footer", "--virtual-time-budget=10000", "--print-to-pdf="+pdf, "file://"+page)
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("chromium: %v\n%s", err, out)
	}
	b, err := os.ReadFile(pdf)
	if err != nil {
		t.Fatal(err)
	}
	// Each page is a /Type /Page object (ISO 32000-1, 7.7.3.3); /Pages
	// is the tree's root.
	return len(regexp.MustCompile(`/Type\s*/Page[^s]`).FindAll(b, -1))
}

// Printed, a sample page takes about one A4 page per two runs, plus its
// head (verdict, summary, runs table): a sample of six runs prints on two
// to four pages (before the print stylesheet it took 14 pages for three).
// The index of the demo fits on one or two.
func TestPrintPages(t *testing.T) {
	if _, err := os.Stat("/usr/bin/chromium"); err != nil {
		t.Skip("/usr/bin/chromium is missing")
	}
	if testing.Short() {
		t.Skip("starts a browser: slow")
	}
	dir := filepath.Join(t.TempDir(), "report")
	if _, err := Write(dir, synthReport(1, 6)); err != nil {
		t.Fatal(err)
	}
	n := printPages(t, filepath.Join(dir, SamplePageName(0)))
	t.Logf("a sample of six runs: %d pages", n)
	if n < 2 || n > 4 {
		t.Errorf("a sample of six runs prints on %d pages, want 2 to 4", n)
	}
	demo := filepath.Join(t.TempDir(), "demo")
	if _, err := Write(demo, demoReport(t)); err != nil {
		t.Fatal(err)
	}
	n = printPages(t, filepath.Join(demo, "index.html"))
	t.Logf("the demo index: %d pages", n)
	if n < 1 || n > 2 {
		t.Errorf("the demo index prints on %d pages, want 1 or 2", n)
	}
}
