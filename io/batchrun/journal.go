package batchrun

import (
	"bufio"
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"sync"

	"dlsbatch/dls"
	"dlsbatch/io/atomicfile"
	"dlsbatch/io/report"
)

// The journal records each input file's results as the run finishes them,
// one JSON line per file, in .DIR.journal beside the output folder: a
// run killed at any point (or a power cut) leaves it, and `run --resume`
// takes the results of every file whose content, settings and tool
// version are unchanged from it instead of analysing the file again. A
// complete, published run removes it.
//
//	{"input_sha256":…, "settings_sha256":…, "version":…, "file":…, "results":[…]}
type journalEntry struct {
	InputSHA256    string        `json:"input_sha256"`
	SettingsSHA256 string        `json:"settings_sha256"`
	Version        string        `json:"version"`
	File           string        `json:"file"`
	Results        []*dls.Result `json:"results"`
}

// journalPath is the journal of the output folder out.
func journalPath(out string) string {
	abs, err := filepath.Abs(out)
	if err != nil {
		abs = out
	}
	return filepath.Join(filepath.Dir(abs), "."+filepath.Base(abs)+".journal")
}

// journal is an open journal of a run.
type journal struct {
	mu       sync.Mutex
	f        *os.File
	r        *os.File // the same file, for reading its records back (records)
	w        *bufio.Writer
	settings string // SHA-256 of the settings and tables
	version  string
	old      map[string]journalEntry // by file, from a resumed journal
	hashes   sync.Map                // rel file → input SHA-256
	reused   int
	written  counted // the file, counting the bytes written
	kicked   int64   // bytes whose writeback was started
	ignored  int
}

// openJournal starts the journal of a run. With resume, the entries of an
// earlier journal are loaded first (and kept in the new one as they are
// reused); without, an old journal is discarded.
func openJournal(path string, settings []byte, resume bool) (*journal, error) {
	h := sha256.Sum256(settings)
	j := &journal{settings: hex.EncodeToString(h[:]), version: report.Version(), old: map[string]journalEntry{}}
	if resume {
		if err := j.load(path); err != nil {
			return nil, err
		}
	}
	f, err := os.OpenFile(path, os.O_WRONLY|os.O_CREATE|os.O_TRUNC, 0o644)
	if err != nil {
		return nil, fmt.Errorf("journal: %w", err)
	}
	r, err := os.Open(path)
	if err != nil {
		f.Close()
		return nil, fmt.Errorf("journal: %w", err)
	}
	j.f, j.r = f, r
	j.written.w = f
	j.w = bufio.NewWriterSize(&j.written, 1<<16)
	return j, nil
}

// records reads the records add wrote, at the offsets it returned: the
// result stream keeps them here rather than writing them a second time.
func (j *journal) records() io.ReaderAt { return j.r }

func (j *journal) load(path string) error {
	f, err := os.Open(path)
	if errors.Is(err, fs.ErrNotExist) {
		return nil
	}
	if err != nil {
		return fmt.Errorf("journal: %w", err)
	}
	defer f.Close()
	dec := json.NewDecoder(f)
	for {
		var e journalEntry
		err := dec.Decode(&e)
		if errors.Is(err, io.EOF) {
			return nil
		}
		if err != nil {
			return nil // a line cut by the kill: what came before stands
		}
		if e.SettingsSHA256 != j.settings || e.Version != j.version {
			j.ignored++
			continue
		}
		j.old[e.File] = e
	}
}

// cached gives the journal's results for the file named rel whose
// content has the SHA-256 sum.
func (j *journal) cached(rel, sum string) ([]*dls.Result, bool) {
	j.hashes.Store(rel, sum)
	e, ok := j.old[rel]
	if !ok {
		return nil, false
	}
	j.mu.Lock()
	defer j.mu.Unlock()
	if e.InputSHA256 != sum {
		j.ignored++
		return nil, false
	}
	j.reused++
	return e.Results, true
}

// add records the results of one file (called in input order), given
// their JSON records as results.json holds them, and returns the offset of
// each record in the file (records reads them there once add returned).
func (j *journal) add(results []*dls.Result, records [][]byte) ([]int64, error) {
	if len(results) == 0 {
		return nil, nil
	}
	rel := results[0].File
	sum, _ := j.hashes.LoadAndDelete(rel) // taken once: the map holds only the files in flight
	s, _ := sum.(string)
	head, err := json.Marshal(journalEntry{InputSHA256: s, SettingsSHA256: j.settings, Version: j.version, File: rel})
	if err != nil {
		return nil, fmt.Errorf("journal: %w", err)
	}
	// The entry's encoding with the records spliced in for "results":null.
	head = bytes.TrimSuffix(head, []byte(`"results":null}`))
	j.mu.Lock()
	defer j.mu.Unlock()
	at := make([]int64, len(records))
	pos := j.written.n + int64(j.w.Buffered()) + int64(len(head)) + int64(len(`"results":[`))
	j.w.Write(head)
	j.w.WriteString(`"results":[`)
	for i, r := range records {
		if i > 0 {
			j.w.WriteByte(',')
			pos++
		}
		at[i] = pos
		pos += int64(len(r))
		j.w.Write(r)
	}
	if _, err := j.w.WriteString("]}\n"); err != nil {
		return nil, fmt.Errorf("journal: %w", err)
	}
	// Each file's line reaches the file system as it is done (and so can
	// be read back); every few MiB its writeback is started, so that the
	// flush of the result set at the end of the run does not also wait
	// for the whole journal.
	if err := j.w.Flush(); err != nil {
		return nil, fmt.Errorf("journal: %w", err)
	}
	if j.written.n-j.kicked >= journalKick {
		atomicfile.StartWriteback(j.f, j.kicked, j.written.n-j.kicked)
		j.kicked = j.written.n
	}
	return at, nil
}

// journalKick is how many bytes the journal grows by between two starts
// of its writeback (atomicfile.StartWriteback).
const journalKick = 4 << 20

// counted writes to w and counts the bytes written.
type counted struct {
	w io.Writer
	n int64
}

func (c *counted) Write(p []byte) (int, error) {
	n, err := c.w.Write(p)
	c.n += int64(n)
	return n, err
}

// close ends the journal; remove deletes it (the run is published whole).
func (j *journal) close(remove bool) {
	j.w.Flush()
	j.f.Close()
	j.r.Close()
	if remove {
		os.Remove(j.f.Name())
	}
}
