package solventfile

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"
	"unicode"

	"dlsbatch/dls"
	"dlsbatch/dls/medium"
	"dlsbatch/io/csvtable"
	"dlsbatch/io/safetext"
)

// Models of the viscosity_model and index_model columns.
const (
	ViscosityConstant = "constant"
	ViscosityAndrade  = "andrade"
	ViscosityDIPPR101 = "dippr101"
	IndexConstant     = "constant"
	IndexCauchy       = "cauchy"
)

// Entry is one validated row of a solvent file, in the file's units.
type Entry struct {
	Name            string
	Aliases         []string
	TMinC, TMaxC    float64
	ViscosityModel  string
	ViscosityParams []float64
	IndexModel      string
	IndexParams     []float64
	// IndexTC is the temperature of the index data; HasIndexT is false when
	// the column was blank.
	IndexTC   float64
	HasIndexT bool
	DnDTPerK  float64
	// LambdaMinNm, LambdaMaxNm: 0 and +Inf when blank (constant index).
	LambdaMinNm, LambdaMaxNm float64
	Source                   string

	File string // as given to Parse
	Line int    // 1-based line of the row
}

// row is the text of one CSV record as gocsv maps it.
type row struct {
	Name            string `csv:"name"`
	Aliases         string `csv:"aliases"`
	TMinC           string `csv:"t_min_c"`
	TMaxC           string `csv:"t_max_c"`
	ViscosityModel  string `csv:"viscosity_model"`
	ViscosityParams string `csv:"viscosity_params"`
	IndexModel      string `csv:"index_model"`
	IndexParams     string `csv:"index_params"`
	IndexTC         string `csv:"index_t_c"`
	DnDTPerK        string `csv:"dn_dt_per_k"`
	LambdaMinNm     string `csv:"lambda_min_nm"`
	LambdaMaxNm     string `csv:"lambda_max_nm"`
	Source          string `csv:"source"`
}

// Columns lists the columns of a solvent file in the order Write uses.
var Columns = []string{"name", "aliases", "t_min_c", "t_max_c", "viscosity_model", "viscosity_params",
	"index_model", "index_params", "index_t_c", "dn_dt_per_k", "lambda_min_nm", "lambda_max_nm", "source"}

var required = []string{"name", "t_min_c", "t_max_c", "viscosity_model", "viscosity_params",
	"index_model", "index_params", "source"}

// Parse reads a solvent file from r; file names it in errors. Every error is
// a *dls.PosError.
func Parse(r io.Reader, file string) ([]Entry, error) {
	t, err := csvtable.Read(r, file)
	if err != nil {
		return nil, err
	}
	if err := t.CheckHeader(Columns, required); err != nil {
		return nil, err
	}
	var rows []row
	if len(t.Rows) > 0 {
		if err := t.Unmarshal(&rows); err != nil {
			return nil, err
		}
	}
	seen := make(map[string]int)
	out := make([]Entry, 0, len(rows))
	for i, rw := range rows {
		at := func(name string, err error) error {
			return t.Err(i, t.Col(name), err)
		}
		e, err := parseRow(rw, at)
		if err != nil {
			return nil, err
		}
		e.File, e.Line = file, t.Line(i)
		for _, k := range append([]string{e.Name}, e.Aliases...) {
			key := strings.ToLower(k)
			if prev, dup := seen[key]; dup {
				return nil, at("name", fmt.Errorf("%s already defined on line %d", safetext.Excerpt(k), prev))
			}
			seen[key] = e.Line
		}
		out = append(out, e)
	}
	return out, nil
}

// number parses one number (dls.ParseNumber).
func number(s string) (float64, error) {
	return dls.ParseNumber(strings.TrimSpace(s))
}

func numbers(s string) ([]float64, error) {
	var out []float64
	for _, f := range strings.Fields(s) {
		v, err := number(f)
		if err != nil {
			return nil, err
		}
		out = append(out, v)
	}
	return out, nil
}

func parseRow(rw row, at func(string, error) error) (Entry, error) {
	var e Entry
	e.Name = strings.TrimSpace(rw.Name)
	if e.Name == "" {
		return e, at("name", dls.ErrMissingValue)
	}
	if strings.Contains(e.Name, ":") {
		return e, at("name", fmt.Errorf("%s: ':' is reserved for mixtures", safetext.Excerpt(e.Name)))
	}
	if strings.HasPrefix(e.Name, "#") {
		return e, at("name", fmt.Errorf("%s: a name may not start with '#' (comment lines)", safetext.Excerpt(e.Name)))
	}
	for _, c := range []struct{ col, text string }{{"name", rw.Name}, {"aliases", rw.Aliases}, {"source", rw.Source}} {
		if strings.ContainsFunc(c.text, unicode.IsControl) {
			return e, at(c.col, fmt.Errorf("%s holds a control character", safetext.Excerpt(c.text)))
		}
	}
	for _, a := range strings.Split(rw.Aliases, "|") {
		if a = strings.TrimSpace(a); a != "" {
			if strings.Contains(a, ":") {
				return e, at("aliases", fmt.Errorf("%s: ':' is reserved for mixtures", safetext.Excerpt(a)))
			}
			e.Aliases = append(e.Aliases, a)
		}
	}
	var err error
	if e.TMinC, err = number(rw.TMinC); err != nil {
		return e, at("t_min_c", err)
	}
	if e.TMaxC, err = number(rw.TMaxC); err != nil {
		return e, at("t_max_c", err)
	}
	if !(e.TMinC < e.TMaxC) || e.TMinC <= -dls.ZeroCelsiusK {
		return e, at("t_max_c", fmt.Errorf("range %g–%g °C is empty or below absolute zero: %w", e.TMinC, e.TMaxC, dls.ErrOutOfRange))
	}

	e.ViscosityModel = strings.ToLower(strings.TrimSpace(rw.ViscosityModel))
	if e.ViscosityParams, err = numbers(rw.ViscosityParams); err != nil {
		return e, at("viscosity_params", err)
	}
	want := map[string]int{ViscosityConstant: 1, ViscosityAndrade: 2, ViscosityDIPPR101: 5}
	n, ok := want[e.ViscosityModel]
	if !ok {
		return e, at("viscosity_model", fmt.Errorf("%s: want constant, andrade or dippr101", safetext.Excerpt(rw.ViscosityModel)))
	}
	if len(e.ViscosityParams) != n {
		return e, at("viscosity_params", fmt.Errorf("%s takes %d numbers, got %d", e.ViscosityModel, n, len(e.ViscosityParams)))
	}
	if e.ViscosityModel == ViscosityConstant && !(e.ViscosityParams[0] > 0) {
		return e, at("viscosity_params", fmt.Errorf("viscosity %g mPa·s is not positive: %w", e.ViscosityParams[0], dls.ErrOutOfRange))
	}

	e.IndexModel = strings.ToLower(strings.TrimSpace(rw.IndexModel))
	if e.IndexParams, err = numbers(rw.IndexParams); err != nil {
		return e, at("index_params", err)
	}
	switch e.IndexModel {
	case IndexConstant:
		if len(e.IndexParams) != 1 {
			return e, at("index_params", fmt.Errorf("constant takes 1 number, got %d", len(e.IndexParams)))
		}
	case IndexCauchy:
		if len(e.IndexParams) < 2 {
			return e, at("index_params", fmt.Errorf("cauchy takes at least 2 numbers (A B), got %d", len(e.IndexParams)))
		}
	default:
		return e, at("index_model", fmt.Errorf("%s: want constant or cauchy", safetext.Excerpt(rw.IndexModel)))
	}
	if !(e.IndexParams[0] >= 1) || e.IndexParams[0] > 5 {
		return e, at("index_params", fmt.Errorf("index %g is outside 1–5: %w", e.IndexParams[0], dls.ErrOutOfRange))
	}
	if strings.TrimSpace(rw.IndexTC) != "" {
		if e.IndexTC, err = number(rw.IndexTC); err != nil {
			return e, at("index_t_c", err)
		}
		if e.IndexTC <= -dls.ZeroCelsiusK {
			return e, at("index_t_c", fmt.Errorf("%g °C is below absolute zero: %w", e.IndexTC, dls.ErrOutOfRange))
		}
		e.HasIndexT = true
	}
	if strings.TrimSpace(rw.DnDTPerK) != "" {
		if e.DnDTPerK, err = number(rw.DnDTPerK); err != nil {
			return e, at("dn_dt_per_k", err)
		}
		if e.DnDTPerK != 0 && !e.HasIndexT {
			return e, at("dn_dt_per_k", fmt.Errorf("dn/dT needs index_t_c: %w", dls.ErrMissingValue))
		}
		if math.Abs(e.DnDTPerK) > 0.01 {
			return e, at("dn_dt_per_k", fmt.Errorf("%g /K is not a liquid's dn/dT: %w", e.DnDTPerK, dls.ErrOutOfRange))
		}
	}
	e.LambdaMinNm, e.LambdaMaxNm = 0, math.Inf(1)
	if s := strings.TrimSpace(rw.LambdaMinNm); s != "" {
		if e.LambdaMinNm, err = number(s); err != nil {
			return e, at("lambda_min_nm", err)
		}
	}
	if s := strings.TrimSpace(rw.LambdaMaxNm); s != "" {
		if e.LambdaMaxNm, err = number(s); err != nil {
			return e, at("lambda_max_nm", err)
		}
	}
	if e.IndexModel == IndexCauchy && (e.LambdaMinNm == 0 || math.IsInf(e.LambdaMaxNm, 1)) {
		return e, at("lambda_min_nm", fmt.Errorf("a cauchy index needs lambda_min_nm and lambda_max_nm: %w", dls.ErrMissingValue))
	}
	if !(e.LambdaMinNm >= 0 && e.LambdaMinNm < e.LambdaMaxNm) {
		return e, at("lambda_max_nm", fmt.Errorf("range %g–%g nm is empty or negative: %w", e.LambdaMinNm, e.LambdaMaxNm, dls.ErrOutOfRange))
	}
	e.Source = strings.TrimSpace(rw.Source)
	if e.Source == "" {
		return e, at("source", fmt.Errorf("say where the numbers come from: %w", dls.ErrMissingValue))
	}
	return e, nil
}

// Solvent builds the table entry of e (SI inside).
func (e Entry) Solvent() *medium.Solvent {
	tMin, tMax := dls.KelvinFromCelsius(e.TMinC), dls.KelvinFromCelsius(e.TMaxC)
	p := e.ViscosityParams
	var v medium.ViscosityLaw
	switch e.ViscosityModel {
	case ViscosityConstant:
		v = medium.ConstantViscosity{PaS: p[0] * 1e-3, TMinK: tMin, TMaxK: tMax, Ref: e.Source}
	case ViscosityAndrade:
		v = medium.Andrade{A: p[0] + math.Log(1e-3), B: p[1], TMinK: tMin, TMaxK: tMax, Ref: e.Source}
	case ViscosityDIPPR101:
		v = medium.DIPPR101{C: [5]float64{p[0], p[1], p[2], p[3], p[4]}, TMinK: tMin, TMaxK: tMax, Ref: e.Source}
	default:
		panic("solventfile: Entry with unknown viscosity model " + e.ViscosityModel)
	}
	coef := []float64{e.IndexParams[0]}
	for i, c := range e.IndexParams[1:] {
		coef = append(coef, c, float64(-2*(i+1)))
	}
	d := medium.Dispersion{
		Formula: medium.FormulaCauchy, Coef: coef,
		LambdaMinM: e.LambdaMinNm * 1e-9, LambdaMaxM: e.LambdaMaxNm * 1e-9,
		DnDTPerK: e.DnDTPerK, DnDTSource: "from the solvent file",
		TMinK: tMin, TMaxK: tMax, Ref: e.Source,
	}
	if e.HasIndexT {
		d.TRefK = dls.KelvinFromCelsius(e.IndexTC)
	}
	return &medium.Solvent{
		Name: e.Name, Aliases: e.Aliases, Viscosity: v, Index: d,
		Origin: fmt.Sprintf("%s:%d", e.File, e.Line),
	}
}

// ReadFile parses the solvent file at path.
func ReadFile(path string) ([]Entry, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, &dls.PosError{File: path, Err: err}
	}
	defer f.Close()
	return Parse(f, path)
}

// Load reads the solvent file at path and adds its entries to t, each
// replacing the entries that share a name or alias with it.
func Load(path string, t *medium.Table) error {
	entries, err := ReadFile(path)
	if err != nil {
		return err
	}
	for _, e := range entries {
		if err := t.Add(e.Solvent()); err != nil {
			return &dls.PosError{File: e.File, Line: e.Line, Err: err}
		}
	}
	return nil
}

// Write writes entries as a solvent file that Parse reads back to the same
// entries (numbers in shortest round-trip form).
func Write(w io.Writer, entries []Entry) error {
	rows := make([]row, len(entries))
	for i, e := range entries {
		r := row{
			Name: e.Name, Aliases: strings.Join(e.Aliases, "|"),
			TMinC: fnum(e.TMinC), TMaxC: fnum(e.TMaxC),
			ViscosityModel: e.ViscosityModel, ViscosityParams: fnums(e.ViscosityParams),
			IndexModel: e.IndexModel, IndexParams: fnums(e.IndexParams),
			Source: e.Source,
		}
		if e.HasIndexT {
			r.IndexTC = fnum(e.IndexTC)
		}
		if e.DnDTPerK != 0 {
			r.DnDTPerK = fnum(e.DnDTPerK)
		}
		if e.LambdaMinNm != 0 {
			r.LambdaMinNm = fnum(e.LambdaMinNm)
		}
		if !math.IsInf(e.LambdaMaxNm, 1) {
			r.LambdaMaxNm = fnum(e.LambdaMaxNm)
		}
		rows[i] = r
	}
	cw := csv.NewWriter(w)
	if err := cw.Write(Columns); err != nil {
		return err
	}
	for _, r := range rows {
		if err := cw.Write([]string{r.Name, r.Aliases, r.TMinC, r.TMaxC, r.ViscosityModel, r.ViscosityParams,
			r.IndexModel, r.IndexParams, r.IndexTC, r.DnDTPerK, r.LambdaMinNm, r.LambdaMaxNm, r.Source}); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

func fnum(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

func fnums(v []float64) string {
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = fnum(x)
	}
	return strings.Join(s, " ")
}
