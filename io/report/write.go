package report

import (
	"bufio"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"sort"
	"strings"
	"text/tabwriter"

	"dlsbatch/dls"
)

// Caution is carried by every report: the results support, not replace,
// qualified review.
const Caution = "Results support, and do not replace, review by qualified staff under the site's quality system and local regulations."

// WriteCSV writes results.csv: a header and one row per result, in the
// order given.
func WriteCSV(w io.Writer, results []*dls.Result) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(ColumnNames()); err != nil {
		return fmt.Errorf("results csv: %w", err)
	}
	row := make([]string, len(columns))
	for _, r := range results {
		for i, c := range columns {
			row[i] = c.get(r)
		}
		if err := cw.Write(row); err != nil {
			return fmt.Errorf("results csv: %w", err)
		}
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return fmt.Errorf("results csv: %w", err)
	}
	return nil
}

// Document is the top level of results.json.
type Document struct {
	Tool     string         `json:"tool"`
	Version  string         `json:"version"`
	Caution  string         `json:"caution"`
	Settings map[string]any `json:"settings"`
	Counts   Counts         `json:"counts"`
	Results  []*dls.Result  `json:"results"`
}

// Counts are the numbers of results by status.
type Counts struct {
	Total int `json:"total"`
	OK    int `json:"ok"`
	Warn  int `json:"warn"`
	Error int `json:"error"`
}

// CountResults counts results by status.
func CountResults(results []*dls.Result) Counts {
	c := Counts{Total: len(results)}
	for _, r := range results {
		switch r.Status {
		case dls.StatusOK:
			c.OK++
		case dls.StatusWarn:
			c.Warn++
		default:
			c.Error++
		}
	}
	return c
}

// WriteJSON writes results.json: the document's fields indented, and each
// result compact on a line of its own, so that the file stays readable and
// greppable one measurement per line, and fast to write for thousands of
// measurements with their curves. Keys come in a fixed order (struct order;
// settings map keys sorted by encoding/json). JSON cannot carry NaN or Inf:
// a result holding one is refused, as a last guard behind the pipeline.
func WriteJSON(w io.Writer, doc *Document) error {
	for _, r := range doc.Results {
		if err := checkFinite(r); err != nil {
			return fmt.Errorf("results json: %s: %w", r.File, err)
		}
	}
	bw := bufio.NewWriter(w)
	field := func(name string, v any, last bool) error {
		b, err := json.Marshal(v)
		if err != nil {
			return err
		}
		fmt.Fprintf(bw, " %q: %s", name, b)
		if !last {
			bw.WriteString(",")
		}
		bw.WriteString("\n")
		return nil
	}
	bw.WriteString("{\n")
	for _, f := range []struct {
		name string
		v    any
	}{{"tool", doc.Tool}, {"version", doc.Version}, {"caution", doc.Caution}, {"settings", doc.Settings}, {"counts", doc.Counts}} {
		if err := field(f.name, f.v, false); err != nil {
			return fmt.Errorf("results json: %w", err)
		}
	}
	bw.WriteString(" \"results\": [")
	for i, r := range doc.Results {
		b, err := json.Marshal(r)
		if err != nil {
			return fmt.Errorf("results json: %s: %w", r.File, err)
		}
		if i > 0 {
			bw.WriteString(",")
		}
		bw.WriteString("\n  ")
		bw.Write(b)
	}
	bw.WriteString("\n ]\n}\n")
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("results json: %w", err)
	}
	return nil
}

func checkFinite(r *dls.Result) error {
	vals := []float64{r.TemperatureC, r.ViscosityMPaS, r.RefractiveIndex, r.WavelengthNm, r.AngleDeg, r.QPerM,
		r.GammaMeanPerS, r.GammaSEPerS, r.Mu2PerS2, r.Mu3PerS3, r.DiffusionM2PerS, r.ZAvgNm, r.ZAvgSENm, r.PDI, r.PDISE,
		r.Intercept, r.Baseline, r.FarBaseline, r.FitRMS, r.ReducedChi2, r.FitFirstTauS, r.FitLastTauS, r.RangeShiftPct,
		r.LinearZAvgNm, r.LinearPDI, r.CountRateKcps, r.DurationS}
	if r.Curves != nil {
		vals = append(vals, r.Curves.Fitted...)
		vals = append(vals, r.Curves.Residuals...)
	}
	for _, v := range vals {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("non-finite value in result")
		}
	}
	return nil
}

// WriteSummary prints a short table for the terminal: one line per sample
// (measurements, how many analysed, mean and standard deviation of the
// z-average, mean PDI), then the counts and the first problems.
func WriteSummary(w io.Writer, results []*dls.Result, maxProblems int) error {
	type agg struct {
		name         string
		n, used      int
		z, pdi       []float64
		temperatures map[string]bool
	}
	bySample := map[string]*agg{}
	var order []string
	for _, r := range results {
		key := r.Sample
		if key == "" {
			key = r.File
		}
		a := bySample[key]
		if a == nil {
			a = &agg{name: key, temperatures: map[string]bool{}}
			bySample[key] = a
			order = append(order, key)
		}
		a.n++
		if r.HasCumulants {
			a.used++
			a.z = append(a.z, r.ZAvgNm)
			a.pdi = append(a.pdi, r.PDI)
		}
		if r.HasConditions {
			a.temperatures[fixed(r.TemperatureC, 1)] = true
		}
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "sample\tT °C\tmeasured\tanalysed\tz-average nm\tSD nm\tPDI\t")
	for _, k := range order {
		a := bySample[k]
		ts := make([]string, 0, len(a.temperatures))
		for t := range a.temperatures {
			ts = append(ts, t)
		}
		sort.Strings(ts)
		zs, sd, pd := "–", "–", "–"
		if len(a.z) > 0 {
			m, s := meanSD(a.z)
			pm, _ := meanSD(a.pdi)
			zs, pd = fixed(m, 1), fixed(pm, 3)
			if len(a.z) > 1 {
				sd = fixed(s, 1)
			}
		}
		fmt.Fprintf(tw, "%s\t%s\t%d\t%d\t%s\t%s\t%s\t\n", a.name, strings.Join(ts, ","), a.n, a.used, zs, sd, pd)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	c := CountResults(results)
	fmt.Fprintf(w, "\n%d measurements: %d ok, %d warn, %d error\n", c.Total, c.OK, c.Warn, c.Error)
	shown := 0
	for _, r := range results {
		if r.Status == dls.StatusOK {
			continue
		}
		if shown == maxProblems {
			fmt.Fprintf(w, "  … %d more in results.csv\n", c.Warn+c.Error-shown)
			break
		}
		id := r.File
		if r.Run != "" {
			id += "[" + r.Run + "]"
		}
		msg := r.Message
		if rest, ok := strings.CutPrefix(msg, r.File+":"); ok {
			// Errors name file and line already: keep that, with the run.
			fmt.Fprintf(w, "  %-5s %s:%s\n", r.Status, id, rest)
			shown++
			continue
		}
		fmt.Fprintf(w, "  %-5s %s: %s\n", r.Status, id, msg)
		shown++
	}
	return nil
}

func meanSD(v []float64) (m, sd float64) {
	for _, x := range v {
		m += x
	}
	m /= float64(len(v))
	if len(v) < 2 {
		return m, 0
	}
	for _, x := range v {
		sd += (x - m) * (x - m)
	}
	return m, math.Sqrt(sd / float64(len(v)-1))
}
