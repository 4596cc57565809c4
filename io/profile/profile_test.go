package profile

import (
	"os"
	"path/filepath"
	"testing"
)

// TestStart: both profiles are written, as gzip-compressed protocol
// buffers (runtime/pprof's documented format: they start with the gzip
// magic bytes 1f 8b), and empty names write nothing.
func TestStart(t *testing.T) {
	dir := t.TempDir()
	cpu, mem := filepath.Join(dir, "cpu.out"), filepath.Join(dir, "mem.out")
	stop, err := Start(cpu, mem)
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
	stop, err = Start("", "")
	if err != nil || stop() != nil {
		t.Error("no profiles asked for: an error")
	}
	if _, err := Start(filepath.Join(dir, "missing", "cpu.out"), ""); err == nil {
		t.Error("an unwritable profile file was accepted")
	}
}
