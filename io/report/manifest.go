package report

import (
	"bufio"
	"bytes"
	"crypto/sha256"
	"dlsbatch/io/plainfile"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"io"
	"os"
)

// FileHash identifies one file of a run by its SHA-256.
type FileHash struct {
	Path   string `json:"path"`
	Bytes  int64  `json:"bytes"`
	SHA256 string `json:"sha256"`
}

// Manifest records what a run read and wrote, so that a reprocessing can be
// shown to have used the same inputs and settings and produced the same
// bytes, and `dlsbatch verify` can check a result set later. It holds no
// clock time; the one absolute path is Root, so that the inputs can be
// found again from any working directory.
type Manifest struct {
	Tool    string `json:"tool"`
	Version string `json:"version"`
	// Complete is false for the set an interrupted run leaves: it holds
	// only the measurements finished (Files says how many), and no
	// verdicts.
	Complete bool       `json:"complete"`
	Files    FileCounts `json:"files"`
	// Root is the input root (absolute): every input and table path is
	// relative to it, with forward slashes.
	Root string `json:"root"`
	// Shard, in the set of one shard of a split batch, says which part it
	// is and of what batch (merge checks it); absent otherwise.
	Shard    *ShardInfo `json:"shard,omitempty"`
	Settings *Settings  `json:"settings"`
	// Inputs are the correlogram files in analysis order; Tables the sample
	// sheet, specification, solvent file and QC thresholds file when given.
	Inputs  []FileHash `json:"inputs"`
	Tables  []FileHash `json:"tables"`
	Outputs []FileHash `json:"outputs"`
}

// ShardInfo identifies part Index of a batch split Count ways: the batch
// has BatchInputs inputs (files and input problems), and BatchSHA256 is the
// SHA-256 of their paths relative to the root, one per line, sorted.
type ShardInfo struct {
	Index       int    `json:"index"`
	Count       int    `json:"count"`
	BatchInputs int    `json:"batch_inputs"`
	BatchSHA256 string `json:"batch_sha256"`
}

// FileCounts are the input files of a run: found, and analysed (all of
// them unless the run was interrupted).
type FileCounts struct {
	Found    int `json:"found"`
	Analysed int `json:"analysed"`
}

// Digest is a file's size and SHA-256, held as 32 bytes: what a run keeps
// of each input until the manifest is written.
type Digest struct {
	Bytes  int64
	SHA256 [sha256.Size]byte
}

// DigestFile returns the size and SHA-256 of the file at path.
func DigestFile(path string) (Digest, error) {
	f, err := os.Open(path)
	if err != nil {
		return Digest{}, fmt.Errorf("manifest: %w", err)
	}
	defer f.Close()
	h := sha256.New()
	n, err := io.Copy(h, f)
	if err != nil {
		return Digest{}, fmt.Errorf("manifest: %s: %w", path, err)
	}
	d := Digest{Bytes: n}
	h.Sum(d.SHA256[:0])
	return d, nil
}

// ReadDigest reads the file at path whole when it holds at most max
// bytes and returns its digest with its content, so that a file analysed
// is opened once and the bytes hashed are the bytes read; a larger file is
// hashed as it streams past and its content not kept (nil).
func ReadDigest(path string, max int64) (Digest, []byte, error) {
	f, err := plainfile.Open(path)
	if err != nil {
		return Digest{}, nil, fmt.Errorf("manifest: %w", err)
	}
	defer f.Close()
	size := int64(bytes.MinRead)
	if st, err := f.Stat(); err == nil && st.Size() >= 0 && st.Size() <= max {
		size = st.Size() + 1 // +1: the read that meets the end
	}
	buf := bytes.NewBuffer(make([]byte, 0, size))
	if _, err := buf.ReadFrom(io.LimitReader(f, max+1)); err != nil {
		return Digest{}, nil, fmt.Errorf("manifest: %s: %w", path, err)
	}
	h := sha256.New()
	h.Write(buf.Bytes())
	content := buf.Bytes()
	n := int64(len(content))
	if n > max { // larger than the limit (or grown since): hash the rest, keep nothing
		m, err := io.Copy(h, f)
		if err != nil {
			return Digest{}, nil, fmt.Errorf("manifest: %s: %w", path, err)
		}
		n, content = n+m, nil
	}
	d := Digest{Bytes: n}
	h.Sum(d.SHA256[:0])
	return d, content, nil
}

// Hex is the digest in hex, as the manifest records it.
func (d Digest) Hex() string { return hex.EncodeToString(d.SHA256[:]) }

// DigestOf returns the digest a manifest entry records.
func DigestOf(h FileHash) (Digest, error) {
	d := Digest{Bytes: h.Bytes}
	if len(h.SHA256) != 2*sha256.Size {
		return Digest{}, fmt.Errorf("manifest: %s: sha256 %q is not 64 hex digits", h.Path, h.SHA256)
	}
	if _, err := hex.Decode(d.SHA256[:], []byte(h.SHA256)); err != nil {
		return Digest{}, fmt.Errorf("manifest: %s: sha256 %q is not 64 hex digits", h.Path, h.SHA256)
	}
	return d, nil
}

// HashFile returns the size and SHA-256 of the file at path.
func HashFile(path string) (FileHash, error) {
	d, err := DigestFile(path)
	if err != nil {
		return FileHash{}, err
	}
	return FileHash{Path: path, Bytes: d.Bytes, SHA256: d.Hex()}, nil
}

// WriteManifest writes m as indented JSON (one space per level), the
// bytes json.Encoder with SetIndent("", " ") gives, with the lists of
// files written one entry at a time: a batch of tens of thousands of
// inputs is never one buffer.
func WriteManifest(w io.Writer, m *Manifest) error {
	return writeManifest(w, m, len(m.Inputs), func(i int) FileHash { return m.Inputs[i] })
}

// writeManifest is WriteManifest with n inputs, the i-th given by input
// (m.Inputs is not read; nil and empty write as for n = 0 and an empty
// m.Inputs).
func writeManifest(w io.Writer, m *Manifest, n int, input func(i int) FileHash) error {
	head := *m
	head.Inputs, head.Tables, head.Outputs = nil, nil, nil
	b, err := json.MarshalIndent(&head, "", " ")
	if err != nil {
		return fmt.Errorf("manifest: %w", err)
	}
	// The lists are the last three fields: cut the head before them.
	cut := bytes.LastIndex(b, []byte("\n \"inputs\": null"))
	if cut < 0 {
		return fmt.Errorf("manifest: unexpected encoding of the head")
	}
	bw := bufio.NewWriterSize(w, 1<<16)
	bw.Write(b[:cut])
	for k, list := range []struct {
		name string
		null bool
		n    int
		file func(i int) FileHash
	}{
		{"inputs", m.Inputs == nil && n == 0, n, input},
		{"tables", m.Tables == nil, len(m.Tables), func(i int) FileHash { return m.Tables[i] }},
		{"outputs", m.Outputs == nil, len(m.Outputs), func(i int) FileHash { return m.Outputs[i] }},
	} {
		if k > 0 {
			bw.WriteString(",") // the head ends with the comma before inputs
		}
		bw.WriteString("\n \"" + list.name + "\": ")
		switch {
		case list.null:
			bw.WriteString("null")
			continue
		case list.n == 0:
			bw.WriteString("[]")
			continue
		}
		bw.WriteString("[")
		for i := range list.n {
			f := list.file(i)
			e, err := json.MarshalIndent(&f, "  ", " ")
			if err != nil {
				return fmt.Errorf("manifest: %w", err)
			}
			if i > 0 {
				bw.WriteString(",")
			}
			bw.WriteString("\n  ")
			bw.Write(e)
		}
		bw.WriteString("\n ]")
	}
	bw.WriteString("\n}\n")
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("manifest: %w", err)
	}
	return nil
}
