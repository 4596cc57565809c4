package report

import (
	"crypto/sha256"
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

// HashFile returns the size and SHA-256 of the file at path.
func HashFile(path string) (FileHash, error) {
	f, err := os.Open(path)
	if err != nil {
		return FileHash{}, fmt.Errorf("manifest: %w", err)
	}
	defer f.Close()
	h := sha256.New()
	n, err := io.Copy(h, f)
	if err != nil {
		return FileHash{}, fmt.Errorf("manifest: %s: %w", path, err)
	}
	return FileHash{Path: path, Bytes: n, SHA256: hex.EncodeToString(h.Sum(nil))}, nil
}

// HashBytes returns the FileHash of data written under the name path.
func HashBytes(path string, data []byte) FileHash {
	s := sha256.Sum256(data)
	return FileHash{Path: path, Bytes: int64(len(data)), SHA256: hex.EncodeToString(s[:])}
}

// WriteManifest writes m as indented JSON.
func WriteManifest(w io.Writer, m *Manifest) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", " ")
	if err := enc.Encode(m); err != nil {
		return fmt.Errorf("manifest: %w", err)
	}
	return nil
}
