package csvdata_test

import (
	"fmt"
	"math"
	"os"
	"strings"

	"dlsbatch/dls"
	"dlsbatch/io/csvdata"
)

func ExampleRead() {
	const file = `# sample: demo-7
# temperature_c: 25.0
tau_us,g2_a,g2_b
1,1.80,1.90
2,1.70,1.85
4,1.55,1.78
8,1.35,1.66
16,1.15,1.45
32,1.03,1.22
64,1.00,1.06
128,1.00,1.01
`
	for _, e := range csvdata.Read(strings.NewReader(file), "demo.csv", nil) {
		if e.Err != nil {
			fmt.Println(e.Err)
			continue
		}
		m := e.M
		t, _ := m.Meta.Get(dls.KeyTemperatureC)
		fmt.Printf("%s: %d points, first lag %.3g s, %s(first) = %.2f, T = %s °C from %s\n",
			m.ID(), len(m.TauS), m.TauS[0], m.Kind, m.Corr[0], t.Value, t.Where)
	}
	// Output:
	// demo.csv[a]: 8 points, first lag 1e-06 s, g2(first) = 1.80, T = 25.0 °C from demo.csv:2
	// demo.csv[b]: 8 points, first lag 1e-06 s, g2(first) = 1.90, T = 25.0 °C from demo.csv:2
}

func ExampleRead_foreign() {
	const file = `Point;Delay (ms);Norm. correlation
1;0,001;1,812
2;0,002;1,797
3;0,004;1,768
4;0,008;1,713
5;0,016;1,612
6;0,032;1,446
7;0,064;1,225
8;0,128;1,055
`
	o := &csvdata.Options{TauColumn: "Delay (ms)", CorrColumns: []string{"Norm. correlation"}, CorrKind: dls.KindG2}
	e := csvdata.Read(strings.NewReader(file), "export.csv", o)[0]
	if e.Err != nil {
		fmt.Println(e.Err)
		return
	}
	fmt.Printf("%d points from %.3g s to %.3g s\n", len(e.M.TauS), e.M.TauS[0], e.M.TauS[len(e.M.TauS)-1])
	// Output:
	// 8 points from 1e-06 s to 0.000128 s
}

func ExampleRead_error() {
	const file = "tau_s,g2\n1e-6,1.9\n2e-6,oops\n"
	e := csvdata.Read(strings.NewReader(file), "bad.csv", nil)[0]
	fmt.Println(e.Err)
	// Output:
	// bad.csv:3:2: column "g2": "oops": not a number
}

func ExampleWrite() {
	tau := make([]float64, 3)
	g1 := make([]float64, 3)
	for k := range tau {
		tau[k] = 1e-6 * math.Pow(2, float64(k))
		g1[k] = math.Exp(-1000 * tau[k]) // a decay rate of 1000 1/s
	}
	meta := []dls.Param{{Key: dls.KeySample, Value: "demo-7"}, {Key: dls.KeyAngleDeg, Value: "90"}}
	if err := csvdata.Write(os.Stdout, meta, tau, "us", dls.KindG1, []csvdata.Column{{Values: g1}}); err != nil {
		fmt.Println(err)
	}
	// Output:
	// # sample: demo-7
	// # angle_deg: 90
	// tau_us,g1
	// 1.000000e+00,0.9990005
	// 2.000000e+00,0.9980020
	// 4.000000e+00,0.9960080
}
