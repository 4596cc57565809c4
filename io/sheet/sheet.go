// Package sheet reads sample sheets: CSV tables that set metadata per
// measurement file for a batch.
//
// A sample sheet has one header row and one row per file (or group of
// files). Columns:
//
//	file      required  a file name ("03_lot7.csv"), a path relative to the
//	                    input folder ("night2/03_lot7.csv"), or a glob
//	                    ("*_lot7*.csv", "night2/*.csv")
//	run       optional  a run label: the row then applies to that run only
//	any metadata key    sample, temperature_c, wavelength_nm, angle_deg,
//	                    solvent, viscosity_mpas, refractive_index,
//	                    particle_ri, concentration_mg_ml,
//	                    particle_density_g_cm3, volume_fraction,
//	                    count_rate_kcps, duration_s, lot, product, role,
//	                    group, medium_volume_fraction,
//	                    medium_relative_viscosity, kd, u_viscosity_mpas,
//	                    u_refractive_index, u_kd, u_volume_fraction,
//	                    u_medium_volume_fraction,
//	                    u_medium_relative_viscosity, measured_at
//
// A role is sample, reference or blank, in any letter case (dls.ParseRole).
// Empty cells set nothing. Unknown columns are an error (a misspelt column
// would otherwise be silently ignored), and so is a value that breaks its
// key's rule (csvdata.CheckMetaValue: numbers as dls.ParseNumber reads
// them); every error names file, line and column. The physical range of
// each value is checked by the analysis (dls.PlausibleRanges). Lines starting with
// '#' are comments. Cells are separated by ',', ';' or tabs, as the header
// row shows (io/csvtable); in a sheet not delimited by ',', numbers may use
// a decimal comma ("25,0"), stored with a point.
//
// Every row that matches a measurement applies, in sheet order: a later
// row overrides an earlier one, so a glob row can set what a group shares
// and a row for one file what it alone needs. Sheet values rank below
// command-line flags and above the file's own metadata. The sheet's values
// are never used as paths: patterns are only compared with the names of
// files found under the inputs.
//
// Batch order: a sheet whose rows name each file on a row of its own (a
// name or a pattern that matches that file alone) gives the order in which
// the files were measured, where the measured_at metadata does not
// (Ranks; package dls/spec).
package sheet

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path"
	"path/filepath"
	"strings"

	"dlsbatch/dls"
	"dlsbatch/io/csvdata"
	"dlsbatch/io/csvtable"
	"dlsbatch/io/safetext"
)

// Row is one row of a sample sheet.
type Row struct {
	Line    int
	Pattern string
	Run     string
	Params  []dls.Param // Origin dls.OriginSheet, Where "sheet.csv:line:column"
}

// Sheet is a parsed sample sheet.
type Sheet struct {
	File string
	Rows []Row
}

// Columns lists the columns a sheet may have.
func Columns() []string {
	return append([]string{"file"}, dls.MetadataKeys()...)
}

// Load reads the sample sheet at path, with "sample sheet: " before an
// error; an empty path gives no sheet (nil) and no error.
func Load(path string) (*Sheet, error) {
	if path == "" {
		return nil, nil
	}
	s, err := ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("sample sheet: %w", err)
	}
	return s, nil
}

// ReadFile parses the sample sheet at path.
func ReadFile(p string) (*Sheet, error) {
	f, err := os.Open(p)
	if err != nil {
		return nil, err // the caller names the table ("sample sheet: …")
	}
	defer f.Close()
	return Parse(f, p)
}

// Parse reads a sample sheet from r; name identifies it in errors and
// provenance.
func Parse(r io.Reader, name string) (*Sheet, error) {
	t, err := csvtable.Read(r, name)
	if err != nil {
		return nil, err
	}
	if err := t.CheckHeader(Columns(), []string{"file"}); err != nil {
		return nil, err
	}
	fileCol, runCol := t.Col("file"), t.Col(dls.KeyRun)
	s := &Sheet{File: name}
	for i, rec := range t.Rows {
		row := Row{Line: t.Line(i), Pattern: filepath.ToSlash(rec[fileCol])}
		if row.Pattern == "" {
			return nil, t.Err(i, fileCol, errors.New("empty file pattern"))
		}
		if _, err := path.Match(row.Pattern, ""); err != nil {
			return nil, t.Err(i, fileCol, fmt.Errorf("pattern %s: %w", safetext.Excerpt(row.Pattern), err))
		}
		if runCol >= 0 {
			row.Run = rec[runCol]
		}
		for j, v := range rec {
			key := t.Header[j]
			if j == fileCol || j == runCol || v == "" {
				continue
			}
			if t.Comma != ',' {
				v = csvdata.DecimalPoint(key, v) // "25,0" in a ';' sheet is 25.0
			}
			if err := csvdata.CheckMetaValue(key, v); err != nil {
				if v != rec[j] {
					err = csvdata.CheckMetaValue(key, rec[j]) // quote the cell as written
				}
				return nil, t.Err(i, j, err)
			}
			if key == dls.KeyRole {
				// Validated here; the value is kept as written (the
				// analysis reads it in lower case).
				if _, err := dls.ParseRole(v); err != nil {
					return nil, t.Err(i, j, fmt.Errorf("role %s: want one of %s: %w", safetext.Excerpt(v), strings.Join(roleNames(), ", "), dls.ErrBadMetadata))
				}
			}
			p := t.Pos[i+1][j]
			row.Params = append(row.Params, dls.Param{Key: key, Value: v, Origin: dls.OriginSheet,
				Where: fmt.Sprintf("%s:%d:%d", name, p[0], p[1])})
		}
		s.Rows = append(s.Rows, row)
	}
	return s, nil
}

// matches reports whether pattern names a file whose path relative to its
// input folder is rel (slash-separated): the pattern is compared with the
// relative path and, when it has no '/', with the base name.
func matches(pattern, rel string) bool {
	if ok, _ := path.Match(pattern, rel); ok {
		return true
	}
	if !strings.Contains(pattern, "/") {
		ok, _ := path.Match(pattern, path.Base(rel))
		return ok
	}
	return false
}

// Apply sets, with sheet precedence, the values of every row matching the
// measurement (rel is its path relative to its input folder) and returns
// the indices of the rows applied.
func (s *Sheet) Apply(m *dls.Measurement, rel string) []int {
	rel = filepath.ToSlash(rel)
	var used []int
	for i, row := range s.Rows {
		if !matches(row.Pattern, rel) || (row.Run != "" && row.Run != m.Run) {
			continue
		}
		for _, p := range row.Params {
			m.Meta.Set(p)
		}
		used = append(used, i)
	}
	return used
}

// Unmatched lists the rows that match none of the files (relative paths)
// given: each is a mistake worth reporting.
func (s *Sheet) Unmatched(rels []string) []Row {
	var out []Row
	for _, row := range s.Rows {
		hit := false
		for _, r := range rels {
			if matches(row.Pattern, filepath.ToSlash(r)) {
				hit = true
				break
			}
		}
		if !hit {
			out = append(out, row)
		}
	}
	return out
}

// Matches reports whether some row applies to the file rel.
func (s *Sheet) Matches(rel string) bool {
	for _, row := range s.Rows {
		if matches(row.Pattern, filepath.ToSlash(rel)) {
			return true
		}
	}
	return false
}

// MatchReport records how a sample sheet matched the files of a run.
type MatchReport struct {
	File           string   `json:"file"`
	UnmatchedFiles []string `json:"unmatched_files"` // files no row matches, as found
	UnusedRows     []string `json:"unused_rows"`     // "sheet:line: row "pattern" matches no file"
}

// Check matches the sheet (read from the file named name) against the
// files of a run; rel maps each file to its path relative to the input
// folder it was found in, as patterns see it.
func (s *Sheet) Check(name string, files []string, rel map[string]string) *MatchReport {
	rep := &MatchReport{File: name, UnmatchedFiles: []string{}, UnusedRows: []string{}}
	all := make([]string, len(files))
	for i, f := range files {
		all[i] = rel[f]
		if !s.Matches(rel[f]) {
			rep.UnmatchedFiles = append(rep.UnmatchedFiles, f)
		}
	}
	for _, row := range s.Unmatched(all) {
		rep.UnusedRows = append(rep.UnusedRows, fmt.Sprintf("%s:%d: row %s matches no file", name, row.Line, safetext.Excerpt(row.Pattern)))
	}
	return rep
}

func roleNames() []string {
	var out []string
	for _, r := range dls.Roles() {
		out = append(out, string(r))
	}
	return out
}

// Ranks returns, for each file (paths relative to its input folder, as
// patterns see them), the index of the first row that names that file
// alone, matching it and no other file of rels, or -1 when no row does: a
// sheet that lists every file on a row of its own gives the batch order
// (package dls/spec, BatchOrder).
func (s *Sheet) Ranks(rels []string) []int {
	rank := make([]int, len(rels))
	for i := range rank {
		rank[i] = -1
	}
	for k, row := range s.Rows {
		hit := -1
		for i, r := range rels {
			if matches(row.Pattern, filepath.ToSlash(r)) {
				if hit >= 0 && rels[hit] != r {
					hit = -2
					break
				}
				if hit == -1 {
					hit = i
				}
			}
		}
		if hit < 0 {
			continue
		}
		for i, r := range rels {
			if r == rels[hit] && rank[i] < 0 {
				rank[i] = k
			}
		}
	}
	return rank
}

// Rename names the sheet name in its rows' provenance (Where) and in
// messages, e.g. by its path relative to the run's input root, so that
// outputs do not depend on how the sheet's path was typed.
func (s *Sheet) Rename(name string) {
	for i := range s.Rows {
		for j := range s.Rows[i].Params {
			p := &s.Rows[i].Params[j]
			if rest, ok := strings.CutPrefix(p.Where, s.File+":"); ok {
				p.Where = name + ":" + rest
			}
		}
	}
	s.File = name
}
