// Package simplan reads simulation plans for `dlsbatch simulate --plan`
// and writes what a simulated job produces: the correlogram file and the
// ground-truth record set (truth.json).
//
// A plan is a CSV table read by io/csvtable (the project's one reader of
// hand-edited tables): one row per output file, columns
//
//	file (required; a plain name ending in .csv), sample, runs, population,
//	solvent, temperature_c, wavelength_nm, angle_deg, viscosity_mpas,
//	refractive_index, material, particle_ri, count_rate_kcps, duration_s,
//	beta, baseline, seed, dust_bursts, sigma (yes or no),
//	noise (gaussian, correlated or photon; see sim.ParseNoise)
//
// Numbers are decimal as dls.ParseNumber reads them (no hexadecimal, digit
// separators, inf or nan); runs, dust_bursts and seed are whole numbers.
// Empty cells take the value of the defaults given to Parse. A row without
// a seed takes the default seed plus its row number (0-based). Every error
// is a *dls.PosError naming the plan, line and column.
package simplan

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"dlsbatch/dls"
	"dlsbatch/dls/sim"
	"dlsbatch/io/atomicfile"
	"dlsbatch/io/csvdata"
	"dlsbatch/io/csvtable"
)

// row is one plan record as gocsv maps it; every cell is text so that
// conversion errors can name their cell.
type row struct {
	File            string `csv:"file"`
	Sample          string `csv:"sample"`
	Runs            string `csv:"runs"`
	Population      string `csv:"population"`
	Solvent         string `csv:"solvent"`
	TemperatureC    string `csv:"temperature_c"`
	WavelengthNm    string `csv:"wavelength_nm"`
	AngleDeg        string `csv:"angle_deg"`
	ViscosityMPaS   string `csv:"viscosity_mpas"`
	RefractiveIndex string `csv:"refractive_index"`
	Material        string `csv:"material"`
	ParticleRI      string `csv:"particle_ri"`
	CountRateKcps   string `csv:"count_rate_kcps"`
	DurationS       string `csv:"duration_s"`
	Beta            string `csv:"beta"`
	Baseline        string `csv:"baseline"`
	Seed            string `csv:"seed"`
	DustBursts      string `csv:"dust_bursts"`
	Sigma           string `csv:"sigma"`
	Noise           string `csv:"noise"`
}

// Columns returns the plan columns, in the order documented.
func Columns() []string {
	return []string{"file", "sample", "runs", "population", "solvent", "temperature_c", "wavelength_nm",
		"angle_deg", "viscosity_mpas", "refractive_index", "material", "particle_ri", "count_rate_kcps", "duration_s",
		"beta", "baseline", "seed", "dust_bursts", "sigma", "noise"}
}

// Entry is a plan row turned into a job, with what is needed to point at
// its cells.
type Entry struct {
	Job  sim.Job
	Line int // line of the row in the plan
	t    *csvtable.Table
	row  int
}

// At positions an error about the entry's job: a *sim.FieldError is placed
// at its column's cell (when the plan has that column), anything else at
// the row.
func (e Entry) At(err error) error {
	field := ""
	var fe *sim.FieldError
	if errors.As(err, &fe) {
		field, err = fe.Field, fe.Err
	}
	if c := e.t.Col(field); field != "" && c >= 0 {
		return e.t.Err(e.row, c, err)
	}
	return &dls.PosError{File: e.t.File, Line: e.Line, Err: err}
}

// ReadFile reads the plan at path; see Parse.
func ReadFile(path string, def sim.Job) ([]Entry, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	return Parse(bytes.NewReader(data), path, def)
}

// Parse reads a plan from r (name identifies it in errors) into one entry
// per row, filling empty cells from def.
func Parse(r io.Reader, name string, def sim.Job) ([]Entry, error) {
	t, err := csvtable.Read(r, name)
	if errors.Is(err, dls.ErrEmpty) {
		return nil, &dls.PosError{File: name, Err: fmt.Errorf("no plan rows: %w", dls.ErrEmpty)}
	}
	if err != nil {
		return nil, err
	}
	if err := t.CheckHeader(Columns(), []string{"file"}); err != nil {
		return nil, err
	}
	if len(t.Rows) == 0 {
		return nil, &dls.PosError{File: name, Err: fmt.Errorf("no plan rows: %w", dls.ErrEmpty)}
	}
	var rows []row
	if err := t.Unmarshal(&rows); err != nil {
		return nil, err
	}
	seen := map[string]int{}
	out := make([]Entry, 0, len(rows))
	for i, r := range rows {
		e := Entry{Job: def, Line: t.Line(i), t: t, row: i}
		e.Job.Seed = def.Seed + uint64(i)
		if err := fill(&e.Job, r); err != nil {
			return nil, e.At(err)
		}
		key := strings.ToLower(e.Job.File)
		if prev, dup := seen[key]; dup {
			return nil, e.At(&sim.FieldError{Field: "file", Err: fmt.Errorf("%q already planned on line %d", e.Job.File, prev)})
		}
		seen[key] = e.Line
		out = append(out, e)
	}
	return out, nil
}

// fill copies the non-empty cells of a plan row into j. Errors are
// *sim.FieldError.
func fill(j *sim.Job, r row) error {
	bad := func(field string, err error) error { return &sim.FieldError{Field: field, Err: err} }
	f := r.File
	switch {
	case f == "":
		return bad("file", errors.New("empty file name"))
	case f != filepath.Base(f) || strings.ContainsAny(f, `/\:`) || strings.HasPrefix(f, "."):
		return bad("file", fmt.Errorf("%q is not a plain file name", f))
	case !strings.HasSuffix(strings.ToLower(f), ".csv"):
		return bad("file", fmt.Errorf("%q does not end in .csv", f))
	}
	j.File = f
	for _, s := range []struct {
		v   string
		dst *string
	}{{r.Sample, &j.Sample}, {r.Population, &j.Population}, {r.Solvent, &j.Solvent},
		{r.Material, &j.Material}, {r.ParticleRI, &j.ParticleRI}} {
		if s.v != "" {
			*s.dst = s.v
		}
	}
	floats := []struct {
		col string
		v   string
		dst *float64
	}{
		{"temperature_c", r.TemperatureC, &j.TemperatureC}, {"wavelength_nm", r.WavelengthNm, &j.WavelengthNm},
		{"angle_deg", r.AngleDeg, &j.AngleDeg}, {"viscosity_mpas", r.ViscosityMPaS, &j.ViscosityMPaS},
		{"refractive_index", r.RefractiveIndex, &j.RefractiveIndex}, {"count_rate_kcps", r.CountRateKcps, &j.CountRateKcps},
		{"duration_s", r.DurationS, &j.DurationS}, {"beta", r.Beta, &j.Beta}, {"baseline", r.Baseline, &j.Baseline},
	}
	for _, x := range floats {
		if x.v == "" {
			continue
		}
		p, err := dls.ParseNumber(x.v)
		if err != nil {
			return bad(x.col, err)
		}
		*x.dst = p
	}
	ints := []struct {
		col string
		v   string
		dst *int
	}{{"runs", r.Runs, &j.Runs}, {"dust_bursts", r.DustBursts, &j.DustBursts}}
	for _, x := range ints {
		if x.v == "" {
			continue
		}
		p, err := strconv.Atoi(x.v)
		if err != nil {
			return bad(x.col, fmt.Errorf("%q is not a whole number: %w", x.v, err))
		}
		*x.dst = p
	}
	if v := r.Seed; v != "" {
		p, err := strconv.ParseUint(v, 10, 64)
		if err != nil {
			return bad("seed", fmt.Errorf("%q is not a non-negative whole number: %w", v, err))
		}
		j.Seed = p
	}
	switch v := strings.ToLower(r.Sigma); v {
	case "":
	case "yes", "true", "1":
		j.Sigma = true
	case "no", "false", "0":
		j.Sigma = false
	default:
		return bad("sigma", fmt.Errorf("%q: want yes or no", v))
	}
	if r.Noise != "" {
		n, err := sim.ParseNoise(r.Noise)
		if err != nil {
			return bad("noise", err)
		}
		j.Noise = n
	}
	return nil
}

// WriteCorrelogram writes a simulated job as a correlogram CSV (lags in s,
// g2 columns, σ columns where the job asked for them).
func WriteCorrelogram(w io.Writer, res *sim.JobResult) error {
	cols := make([]csvdata.Column, len(res.Runs))
	for i, r := range res.Runs {
		cols[i] = csvdata.Column{Label: r.Label, Values: r.G2, Sigma: r.Sigma}
	}
	return csvdata.Write(w, res.Meta, res.TauS, "s", dls.KindG2, cols)
}

// TruthJSON renders the ground truth of simulated files as truth.json,
// with generator naming the tool and its version.
func TruthJSON(recs []sim.TruthRecord, generator string) ([]byte, error) {
	doc := struct {
		Generator    string            `json:"generator"`
		Note         string            `json:"note"`
		Measurements []sim.TruthRecord `json:"measurements"`
	}{Generator: generator, Note: sim.TruthNote, Measurements: recs}
	b, err := json.MarshalIndent(doc, "", "  ")
	if err != nil {
		return nil, fmt.Errorf("truth.json: %w", err)
	}
	return append(b, '\n'), nil
}

// CheckOutDir refuses an output folder that exists and holds anything,
// unless force, and one that holds the plan itself.
func CheckOutDir(dir, plan string, force bool) error {
	absDir, err := filepath.Abs(dir)
	if err != nil {
		return err
	}
	absPlan, err := filepath.Abs(plan)
	if err != nil {
		return err
	}
	if filepath.Dir(absPlan) == absDir {
		return fmt.Errorf("--out %s holds the plan %s; choose another folder", dir, plan)
	}
	entries, err := os.ReadDir(dir)
	switch {
	case errors.Is(err, os.ErrNotExist):
		return nil
	case err != nil:
		return fmt.Errorf("--out %s: %w", dir, err)
	case len(entries) > 0 && !force:
		return fmt.Errorf("--out %s exists and is not empty; use --force to write into it", dir)
	}
	return nil
}

// CheckOutFiles refuses, unless force, an output or truth file that
// exists, and the two naming the same file ("" names none).
func CheckOutFiles(output, truth string, force bool) error {
	for _, p := range []string{output, truth} {
		if _, err := os.Stat(p); p != "" && !force && err == nil {
			return fmt.Errorf("%s exists; use --force to replace it", p)
		}
	}
	if output != "" && output == truth {
		return errors.New("--output and --truth name the same file")
	}
	return nil
}

// RunPlan simulates every entry and writes its correlogram and, last,
// truth.json (sorted by file) into dir; nothing is written unless every
// entry simulates. Errors about an entry are *dls.PosError in the plan; a
// cancelled ctx stops before anything is written; warn receives the
// warnings of each entry with its plan line.
func RunPlan(ctx context.Context, entries []Entry, grid *sim.Grid, o sim.JobOptions, dir string, warn func(string)) error {
	files := make([][]byte, len(entries))
	truths := make([]sim.TruthRecord, len(entries))
	for i, en := range entries {
		if err := ctx.Err(); err != nil {
			return err
		}
		res, err := en.Job.Run(grid, o)
		if err != nil {
			return en.At(err)
		}
		for _, w := range res.Warnings {
			warn(fmt.Sprintf("%s:%d: %s", en.t.File, en.Line, w))
		}
		var b bytes.Buffer
		if err := WriteCorrelogram(&b, res); err != nil {
			return en.At(err)
		}
		files[i], truths[i] = b.Bytes(), res.Truth
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	for i, en := range entries {
		if err := atomicfile.Write(filepath.Join(dir, en.Job.File), files[i]); err != nil {
			return err
		}
	}
	sort.Slice(truths, func(a, b int) bool { return truths[a].File < truths[b].File })
	t, err := TruthJSON(truths, "dlsbatch simulate")
	if err != nil {
		return err
	}
	return atomicfile.Write(filepath.Join(dir, "truth.json"), t)
}

// RunSingle simulates one job and writes its correlogram to output ("" =
// stdout) and its truth record to truth ("" = none). Errors about the job
// are *sim.FieldError.
func RunSingle(j sim.Job, grid *sim.Grid, o sim.JobOptions, output, truth string, stdout io.Writer, warn func(string)) error {
	j.File = filepath.Base(output)
	if output == "" {
		j.File = "-"
	}
	res, err := j.Run(grid, o)
	if err != nil {
		return err
	}
	for _, w := range res.Warnings {
		warn(w)
	}
	var b bytes.Buffer
	if err := WriteCorrelogram(&b, res); err != nil {
		return err
	}
	if output == "" {
		_, err = stdout.Write(b.Bytes())
	} else {
		err = atomicfile.Write(output, b.Bytes())
	}
	if err != nil || truth == "" {
		return err
	}
	t, err := TruthJSON([]sim.TruthRecord{res.Truth}, "dlsbatch simulate")
	if err != nil {
		return err
	}
	return atomicfile.Write(truth, t)
}
