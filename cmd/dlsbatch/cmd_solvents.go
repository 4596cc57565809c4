package main

import (
	"context"
	"fmt"
	"math"

	"github.com/spf13/pflag"

	"dlsbatch/dls"
	"dlsbatch/dls/medium"
	"dlsbatch/io/report"
	"dlsbatch/io/solventfile"
)

// solventsOptions are the flags of `dlsbatch solvents`.
type solventsOptions struct {
	file         string
	temperatureC float64
	wavelengthNm float64
	extrapolate  bool
}

func (o *solventsOptions) addFlags(fs *pflag.FlagSet) {
	fs.StringVar(&o.file, "file", "", "user solvent file (CSV) whose entries are added to, or replace, the built-in ones")
	fs.Float64Var(&o.temperatureC, "temperature-c", 25, "temperature in °C at which to print viscosity and index")
	fs.Float64Var(&o.wavelengthNm, "wavelength-nm", 632.8, "vacuum wavelength in nm at which to print the index")
	fs.BoolVar(&o.extrapolate, "extrapolate", false, "print values outside a correlation's valid range (marked as extrapolated)")
}

func runSolvents(ctx context.Context, e env, args []string) int {
	var o solventsOptions
	fs := pflag.NewFlagSet("solvents", pflag.ContinueOnError)
	o.addFlags(fs)
	if code, done := parseFlags(fs, e, "solvents", help("solvents"), help("solvents.exits"), args); done {
		return code
	}
	fail := func(code int, msg any) int { fmt.Fprintln(e.stderr, "dlsbatch solvents:", msg); return code }
	atState := fs.Changed("temperature-c") || fs.Changed("wavelength-nm")

	table := medium.NewDefaultTable()
	if o.file != "" {
		if err := solventfile.Load(o.file, table); err != nil {
			return fail(exitUsage, err)
		}
	}
	list := table.Solvents()
	if names := fs.Args(); len(names) > 0 {
		list = list[:0:0]
		for _, name := range names {
			s, err := table.Lookup(name)
			if err != nil {
				return fail(exitUsage, err)
			}
			list = append(list, s)
		}
	}

	var err error
	if atState {
		tK := dls.KelvinFromCelsius(o.temperatureC)
		lambdaM := o.wavelengthNm * 1e-9
		if math.IsNaN(tK) || math.IsInf(tK, 0) || tK <= 0 || !(lambdaM > 0) || math.IsInf(lambdaM, 0) {
			return fail(exitUsage, "--temperature-c must be above −273.15 and --wavelength-nm positive")
		}
		err = report.WriteSolventValues(e.stdout, list, tK, lambdaM, o.extrapolate)
	} else {
		err = report.WriteSolventTable(e.stdout, list)
	}
	if err != nil {
		return fail(exitFatal, err)
	}
	return exitOK
}
