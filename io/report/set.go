package report

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"

	"dlsbatch/io/atomicfile"
	"dlsbatch/io/htmlreport"
)

// Set is everything one run writes into its output folder.
type Set struct {
	Doc *Document // results.json's content; its results and samples fill the tables
	// HTMLReport writes the offline report into DIR/report.
	HTMLReport bool
	// Inputs are the correlogram files read, in analysis order; Tables the
	// sample sheet, specification and solvent file that were given. Both
	// are hashed into the manifest under the paths given.
	Inputs, Tables []string
}

// Names of the files of a result set.
const (
	ResultsCSV   = "results.csv"
	SamplesCSV   = "samples.csv"
	ResultsJSON  = "results.json"
	ManifestJSON = "manifest.json"
	ReportDir    = "report"
)

// WriteSet writes the whole result set into dir (created when missing):
// results.csv, samples.csv, results.json, the HTML report when asked for,
// and last manifest.json with the SHA-256 of every input, table and
// output. Every file is written atomically (io/atomicfile).
func WriteSet(dir string, s *Set) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("output folder: %w", err)
	}
	d := s.Doc
	var csvBuf, smpBuf, jsonBuf bytes.Buffer
	if err := WriteCSV(&csvBuf, d.Results); err != nil {
		return err
	}
	if err := WriteSamplesCSV(&smpBuf, d.Samples, d.Results); err != nil {
		return err
	}
	if err := WriteJSON(&jsonBuf, d); err != nil {
		return err
	}
	m := &Manifest{Tool: d.Tool, Version: d.Version, Settings: d.Settings, Tables: []FileHash{}}
	for _, f := range []struct {
		name string
		data []byte
	}{{ResultsCSV, csvBuf.Bytes()}, {SamplesCSV, smpBuf.Bytes()}, {ResultsJSON, jsonBuf.Bytes()}} {
		m.Outputs = append(m.Outputs, HashBytes(f.name, f.data))
		if err := atomicfile.Write(filepath.Join(dir, f.name), f.data); err != nil {
			return err
		}
	}
	if s.HTMLReport {
		rep := htmlreport.FromRun(htmlreport.Run{Tool: d.Tool, Version: d.Version, Caution: d.Caution,
			Settings: d.Settings, Results: d.Results, Samples: d.Samples, Batch: d.Batch})
		names, err := htmlreport.Write(filepath.Join(dir, ReportDir), rep)
		if err != nil {
			return fmt.Errorf("report: %w", err)
		}
		for _, n := range names {
			h, err := HashFile(filepath.Join(dir, ReportDir, n))
			if err != nil {
				return err
			}
			h.Path = ReportDir + "/" + n
			m.Outputs = append(m.Outputs, h)
		}
	}
	for _, f := range s.Inputs {
		h, err := HashFile(f)
		if err != nil {
			return err
		}
		m.Inputs = append(m.Inputs, h)
	}
	for _, t := range s.Tables {
		h, err := HashFile(t)
		if err != nil {
			return err
		}
		m.Tables = append(m.Tables, h)
	}
	var b bytes.Buffer
	if err := WriteManifest(&b, m); err != nil {
		return err
	}
	return atomicfile.Write(filepath.Join(dir, ManifestJSON), b.Bytes())
}
