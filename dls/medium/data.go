package medium

import (
	"dlsbatch/dls"
	"embed"
	"encoding/csv"
	"fmt"
	"strconv"
	"strings"
)

// The built-in solvent data with their citations; see the header comments of
// each file.
//
//go:embed data/viscosity_dippr101.tsv data/refractive_index.tsv data/solvents.tsv
var solventData embed.FS

// DataFile returns the content of one of the embedded data files
// ("viscosity_dippr101.tsv", "refractive_index.tsv", "solvents.tsv"), for
// listing sources.
func DataFile(name string) ([]byte, error) { return solventData.ReadFile("data/" + name) }

// tsvRecords reads an embedded tab-separated file with "#" comments and a
// header row into maps keyed by column name.
func tsvRecords(name string) ([]map[string]string, error) {
	f, err := solventData.Open("data/" + name)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	r := csv.NewReader(f)
	r.Comma = '\t'
	r.Comment = '#'
	r.LazyQuotes = true
	rows, err := r.ReadAll()
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	if len(rows) < 2 {
		return nil, fmt.Errorf("%s: %w", name, dls.ErrEmpty)
	}
	head := rows[0]
	out := make([]map[string]string, 0, len(rows)-1)
	for _, row := range rows[1:] {
		m := make(map[string]string, len(head))
		for i, h := range head {
			m[h] = strings.TrimSpace(row[i])
		}
		out = append(out, m)
	}
	return out, nil
}

// floats parses the named columns of rec.
func floats(rec map[string]string, cols ...string) ([]float64, error) {
	out := make([]float64, len(cols))
	for i, c := range cols {
		v, err := strconv.ParseFloat(rec[c], 64)
		if err != nil {
			return nil, fmt.Errorf("column %s: %w", c, err)
		}
		out[i] = v
	}
	return out, nil
}

// Short citations used in source strings; the full ones are in the data
// files and in doc.go.
const refPerry = "Perry's Handbook 8th ed. (2008) Table 2-313"

// shortRef turns a full citation "A, B, Journal 1, 2-3 (2024), doi:…" into
// "A, B, Journal 1, 2-3 (2024)".
func shortRef(s string) string {
	if i := strings.Index(s, ", doi:"); i >= 0 {
		return s[:i]
	}
	return s
}

// builtinSolvents builds the table entries from the embedded data.
func builtinSolvents() ([]*Solvent, error) {
	visc, err := tsvRecords("viscosity_dippr101.tsv")
	if err != nil {
		return nil, err
	}
	index, err := tsvRecords("refractive_index.tsv")
	if err != nil {
		return nil, err
	}
	table, err := tsvRecords("solvents.tsv")
	if err != nil {
		return nil, err
	}
	viscByCAS := make(map[string]map[string]string)
	for _, r := range visc {
		viscByCAS[r["CAS"]] = r
	}
	indexByCAS := make(map[string]map[string]string)
	for _, r := range index {
		indexByCAS[r["CAS"]] = r
	}

	out := []*Solvent{waterSolvent()}
	if g, err := GlycerolWater(1); err == nil {
		out = append(out, g)
	} else {
		return nil, err
	}
	for _, rec := range table {
		s, err := builtinEntry(rec, viscByCAS[rec["CAS"]], indexByCAS[rec["CAS"]])
		if err != nil {
			return nil, fmt.Errorf("solvents.tsv: %s: %w", rec["name"], err)
		}
		out = append(out, s)
	}
	return out, nil
}

func builtinEntry(rec, vr, ir map[string]string) (*Solvent, error) {
	if vr == nil || ir == nil {
		return nil, fmt.Errorf("CAS %s lacks viscosity or index data", rec["CAS"])
	}
	c, err := floats(vr, "C1", "C2", "C3", "C4", "C5", "Tmin_K", "Tmax_K")
	if err != nil {
		return nil, fmt.Errorf("viscosity: %w", err)
	}
	tb, err := floats(rec, "t_boil_c")
	if err != nil {
		return nil, err
	}
	tMin := c[5]
	tMax := min(c[6], dls.KelvinFromCelsius(tb[0]))
	d := DIPPR101{C: [5]float64{c[0], c[1], c[2], c[3], c[4]}, TMinK: tMin, TMaxK: tMax, Ref: refPerry}

	formula, err := strconv.Atoi(ir["formula"])
	if err != nil {
		return nil, fmt.Errorf("index formula: %w", err)
	}
	var coef []float64
	for _, f := range strings.Fields(ir["coefficients"]) {
		v, err := strconv.ParseFloat(f, 64)
		if err != nil {
			return nil, fmt.Errorf("index coefficients: %w", err)
		}
		coef = append(coef, v)
	}
	lr, err := floats(ir, "lambda_min_um", "lambda_max_um")
	if err != nil {
		return nil, err
	}
	disp := Dispersion{
		Formula: formula, Coef: coef,
		LambdaMinM: lr[0] * 1e-6, LambdaMaxM: lr[1] * 1e-6,
		TMinK: tMin, TMaxK: tMax,
		Ref: shortRef(ir["source"]),
	}
	if ir["T_c"] != "" {
		v, err := floats(ir, "T_c")
		if err != nil {
			return nil, err
		}
		disp.TRefK = dls.KelvinFromCelsius(v[0])
	} else {
		v, err := floats(rec, "index_t_assumed_c")
		if err != nil {
			return nil, fmt.Errorf("index temperature not stated and none assumed: %w", err)
		}
		disp.TRefK, disp.TRefAssumed = dls.KelvinFromCelsius(v[0]), true
	}
	if ir["dn_dT_per_K"] != "" {
		v, err := floats(ir, "dn_dT_per_K")
		if err != nil {
			return nil, err
		}
		disp.DnDTPerK = v[0]
		src := ir["dn_dT_source"]
		if i := strings.Index(src, ", J. "); i >= 0 { // keep "Author & Author 19xx data"
			src = src[:i]
		}
		disp.DnDTSource = "from the data of " + src + " " + yearOf(ir["dn_dT_source"])
	} else {
		v, err := floats(rec, "dn_dT_per_K")
		if err != nil {
			return nil, err
		}
		disp.DnDTPerK, disp.DnDTSource = v[0], rec["dn_dT_source"]
	}
	if err := disp.validate(); err != nil {
		return nil, err
	}
	var aliases []string
	for _, a := range strings.Split(rec["aliases"], "|") {
		if a = strings.TrimSpace(a); a != "" {
			aliases = append(aliases, a)
		}
	}
	note := fmt.Sprintf("liquid %.1f–%.1f °C at 0.1 MPa", tMin-dls.ZeroCelsiusK, tMax-dls.ZeroCelsiusK)
	return &Solvent{
		Name: rec["name"], Aliases: aliases, CAS: rec["CAS"],
		Viscosity: d, Index: disp, Origin: "built-in", Note: note,
	}, nil
}

// yearOf returns the first "(YYYY)" of a citation, without parentheses.
func yearOf(s string) string {
	for i := 0; i+6 <= len(s); i++ {
		if s[i] == '(' && s[i+5] == ')' {
			if _, err := strconv.Atoi(s[i+1 : i+5]); err == nil {
				return s[i+1 : i+5]
			}
		}
	}
	return ""
}

// waterSolvent is the water entry: IAPWS 2008 viscosity and IAPWS R9-97
// index, both with the Pátek 2009 density at 0.101325 MPa.
func waterSolvent() *Solvent {
	return &Solvent{
		Name: "water", Aliases: []string{"h2o"}, CAS: "7732-18-5",
		Viscosity: waterViscosityLaw{}, Index: waterIndexLaw{},
		Origin: "built-in",
		Note:   "IAPWS formulations at 0.101325 MPa",
	}
}
