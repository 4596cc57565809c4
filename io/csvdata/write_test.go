package csvdata_test

import (
	"bytes"
	"math"
	"strings"
	"testing"

	"dlsbatch/dls"
	"dlsbatch/io/csvdata"
)

// TestWriteFormat checks the bytes against the format as documented: the
// expected text follows C's printf conversions %.6e and %.7f (ISO/IEC
// 9899:2018, 7.21.6.1), which strconv's 'e' and 'f' formats match.
func TestWriteFormat(t *testing.T) {
	meta := []dls.Param{{Key: "sample", Value: "demo 1"}, {Key: "temperature_c", Value: " 25.0 "}}
	tau := []float64{1e-6, 2.5e-6}
	var b bytes.Buffer
	err := csvdata.Write(&b, meta, tau, "us", dls.KindG2, []csvdata.Column{
		{Label: "a", Values: []float64{1.9, 1.85}, Sigma: []float64{1e-3, 2e-3}},
		{Label: "b", Values: []float64{1.8, 1.75}},
	})
	if err != nil {
		t.Fatal(err)
	}
	want := "# sample: demo 1\n# temperature_c: 25.0\ntau_us,g2_a,sigma_a,g2_b\n" +
		"1.000000e+00,1.9000000,1.000000e-03,1.8000000\n" +
		"2.500000e+00,1.8500000,2.000000e-03,1.7500000\n"
	if b.String() != want {
		t.Errorf("wrote\n%s\nwant\n%s", b.String(), want)
	}

	b.Reset()
	if err := csvdata.Write(&b, nil, tau, "ms", dls.KindG1, []csvdata.Column{{Values: []float64{0.9, 0.8}, Sigma: []float64{1e-3, 1e-3}}}); err != nil {
		t.Fatal(err)
	}
	if want := "tau_ms,g1,sigma\n1.000000e-03,0.9000000,1.000000e-03\n2.500000e-03,0.8000000,1.000000e-03\n"; b.String() != want {
		t.Errorf("wrote\n%s\nwant\n%s", b.String(), want)
	}
}

// TestWriteReadRoundTrip writes a closed-form decay (invented parameters)
// and reads it back within the precision of the written formats.
func TestWriteReadRoundTrip(t *testing.T) {
	const n = 200
	tau := make([]float64, n)
	for k := range tau {
		tau[k] = 5e-7 * math.Pow(1.06, float64(k))
	}
	cols := []csvdata.Column{{Label: "r1"}, {Label: "r2"}}
	for c := range cols {
		gamma := 1000.0 * float64(c+1)
		cols[c].Values = make([]float64, n)
		cols[c].Sigma = make([]float64, n)
		for k, tk := range tau {
			cols[c].Values[k] = 1 + 0.9*math.Exp(-2*gamma*tk)
			cols[c].Sigma[k] = 1e-4 * (1 + tk*1e3)
		}
	}
	meta := []dls.Param{{Key: "sample", Value: "demo"}, {Key: "angle_deg", Value: "90"}}
	for _, unit := range []string{"s", "ms", "us", "µs"} {
		t.Run(unit, func(t *testing.T) {
			var b bytes.Buffer
			if err := csvdata.Write(&b, meta, tau, unit, dls.KindG2, cols); err != nil {
				t.Fatal(err)
			}
			entries := csvdata.Read(&b, "w.csv", nil)
			if len(entries) != 2 {
				t.Fatalf("%d entries, want 2", len(entries))
			}
			for c, e := range entries {
				if e.Err != nil {
					t.Fatal(e.Err)
				}
				if e.Run != cols[c].Label || e.M.Meta.String("angle_deg") != "90" || e.M.Meta.String("sample") != "demo" {
					t.Errorf("run %q meta %v", e.Run, e.M.Meta.Params())
				}
				for k := range tau {
					// %.6e keeps 7 significant digits: rel error <= 5e-7.
					if rel := math.Abs(e.M.TauS[k]-tau[k]) / tau[k]; rel > 5e-7 {
						t.Fatalf("lag %d: %g, want %g", k, e.M.TauS[k], tau[k])
					}
					// %.7f: abs error <= 5e-8.
					if d := math.Abs(e.M.Corr[k] - cols[c].Values[k]); d > 5e-8 {
						t.Fatalf("value %d: %.9f, want %.9f", k, e.M.Corr[k], cols[c].Values[k])
					}
					if rel := math.Abs(e.M.Sigma[k]-cols[c].Sigma[k]) / cols[c].Sigma[k]; rel > 5e-7 {
						t.Fatalf("sigma %d: %g, want %g", k, e.M.Sigma[k], cols[c].Sigma[k])
					}
				}
			}
		})
	}
}

func TestWriteErrors(t *testing.T) {
	tau := []float64{1e-6, 2e-6}
	v := []float64{1.5, 1.4}
	tests := []struct {
		name string
		meta []dls.Param
		tau  []float64
		unit string
		kind dls.CorrKind
		cols []csvdata.Column
		want string
	}{
		{"bad unit", nil, tau, "min", dls.KindG2, []csvdata.Column{{Values: v}}, "lag unit"},
		{"bad kind", nil, tau, "s", 0, []csvdata.Column{{Values: v}}, "correlation kind"},
		{"no column", nil, tau, "s", dls.KindG2, nil, "no correlation column"},
		{"bad key", []dls.Param{{Key: "a b", Value: "1"}}, tau, "s", dls.KindG2, []csvdata.Column{{Values: v}}, "metadata key"},
		{"value with newline", []dls.Param{{Key: "sample", Value: "a\nb"}}, tau, "s", dls.KindG2, []csvdata.Column{{Values: v}}, "line break"},
		{"label with comma", nil, tau, "s", dls.KindG2, []csvdata.Column{{Label: "a,b", Values: v}}, "run label"},
		{"label twice", nil, tau, "s", dls.KindG2, []csvdata.Column{{Label: "a", Values: v}, {Label: "A", Values: v}}, "twice"},
		{"length mismatch", nil, tau, "s", dls.KindG2, []csvdata.Column{{Values: v[:1]}}, "1 values for 2 lags"},
		{"sigma length", nil, tau, "s", dls.KindG2, []csvdata.Column{{Values: v, Sigma: v[:1]}}, "sigma values"},
		{"NaN value", nil, tau, "s", dls.KindG2, []csvdata.Column{{Values: []float64{1, math.NaN()}}}, "NaN"},
		{"zero sigma", nil, tau, "s", dls.KindG2, []csvdata.Column{{Values: v, Sigma: []float64{1, 0}}}, "positive"},
		{"negative lag", nil, []float64{-1, 1}, "s", dls.KindG2, []csvdata.Column{{Values: v}}, "positive"},
		{"lags merge at the precision", nil, []float64{1, 1 + 1e-9}, "s", dls.KindG2, []csvdata.Column{{Values: v}}, "does not increase"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			var b bytes.Buffer
			err := csvdata.Write(&b, tc.meta, tc.tau, tc.unit, tc.kind, tc.cols)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %v, want one containing %q", err, tc.want)
			}
			if b.Len() != 0 {
				t.Errorf("wrote %d bytes despite the error", b.Len())
			}
		})
	}
}
