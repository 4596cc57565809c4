package profile

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/spf13/pflag"
)

// TestStart: both profiles are written, as gzip-compressed protocol
// buffers (runtime/pprof's documented format: they start with the gzip
// magic bytes 1f 8b), the trace with the header go tool trace reads
// ("go 1.N trace"), and empty names write nothing.
func TestStart(t *testing.T) {
	dir := t.TempDir()
	cpu, mem, tr := filepath.Join(dir, "cpu.out"), filepath.Join(dir, "mem.out"), filepath.Join(dir, "trace.out")
	stop, err := Start(cpu, mem, tr)
	if err != nil {
		t.Fatal(err)
	}
	x := 0
	for i := range 1_000_000 {
		x += i % 7
	}
	_ = x
	if err := stop(); err != nil {
		t.Fatal(err)
	}
	for _, p := range []string{cpu, mem} {
		b, err := os.ReadFile(p)
		if err != nil || len(b) < 2 || b[0] != 0x1f || b[1] != 0x8b {
			t.Errorf("%s: %d bytes, %v; want a gzip-compressed profile", filepath.Base(p), len(b), err)
		}
	}
	if b, err := os.ReadFile(tr); err != nil || !strings.HasPrefix(string(b), "go 1.") || !strings.Contains(string(b[:min(len(b), 16)]), " trace") {
		t.Errorf("trace: %d bytes, %v; want a trace with its header", len(b), err)
	}
	stop, err = Start("", "", "")
	if err != nil || stop() != nil {
		t.Error("no profiles asked for: an error")
	}
	if _, err := Start(filepath.Join(dir, "missing", "cpu.out"), "", ""); err == nil {
		t.Error("an unwritable profile file was accepted")
	}
	if _, err := Start("", "", filepath.Join(dir, "missing", "trace.out")); err == nil {
		t.Error("an unwritable trace file was accepted")
	}
	// A CPU profile that cannot be written leaves no trace running: a
	// trace can be started again at once (runtime/trace refuses a second).
	if _, err := Start(filepath.Join(dir, "missing", "cpu.out"), "", filepath.Join(dir, "t1.out")); err == nil {
		t.Error("an unwritable profile file was accepted beside a trace")
	}
	stop, err = Start("", "", filepath.Join(dir, "t2.out"))
	if err != nil {
		t.Fatalf("a trace after a failed start: %v", err)
	}
	if err := stop(); err != nil {
		t.Error(err)
	}
}

// TestFilesFlags: the three flags fill Files, and Begin's end hands a
// profile that cannot be written to its caller (here a heap profile into
// a missing folder, found only when the run ends).
func TestFilesFlags(t *testing.T) {
	dir := t.TempDir()
	var f Files
	fs := pflag.NewFlagSet("x", pflag.ContinueOnError)
	f.AddFlags(fs, "test")
	cpu := filepath.Join(dir, "cpu.out")
	if err := fs.Parse([]string{"--cpuprofile", cpu, "--memprofile", filepath.Join(dir, "missing", "mem.out")}); err != nil {
		t.Fatal(err)
	}
	if f.CPU != cpu || f.Trace != "" {
		t.Fatalf("flags gave %+v", f)
	}
	var said []error
	end, err := f.Begin(func(err error) { said = append(said, err) })
	if err != nil {
		t.Fatal(err)
	}
	end()
	if len(said) != 1 || !strings.Contains(said[0].Error(), "--memprofile") {
		t.Errorf("end said %v, want one --memprofile error", said)
	}
	if b, err := os.ReadFile(cpu); err != nil || len(b) < 2 || b[0] != 0x1f {
		t.Errorf("cpu profile: %d bytes, %v", len(b), err)
	}
}
