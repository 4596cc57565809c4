package main

import (
	"context"
	"fmt"
	"io"
	"math"
	"strings"
	"text/tabwriter"

	"github.com/spf13/pflag"

	"dlsbatch/dls"
	"dlsbatch/dls/medium"
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

const solventsUsage = `Usage: dlsbatch solvents [flags] [NAME...]

Without --temperature-c or --wavelength-nm: lists the solvent table, each
entry with its aliases, the temperature range (°C, at 0.1 MPa) and the
wavelength range (nm) in which its correlations hold, and their sources.
With either flag: prints viscosity and refractive index at that state (the
other flag takes its default), then the source of each value.

NAME restricts the output to the solvents named (name, alias or CAS
number); glycerol-water:W is a glycerol–water mixture of glycerol mass
fraction W (0.40 or 40%%).

Indices are absolute (relative to vacuum) at the vacuum wavelength; the
scattering vector needs only n/λ, so a relative-to-air index would go with
the wavelength in air.

Example:
  dlsbatch solvents --temperature-c 37 --wavelength-nm 532 water ethanol glycerol-water:0.3

Flags:
`

func runSolvents(ctx context.Context, e env, args []string) int {
	var o solventsOptions
	fs := pflag.NewFlagSet("solvents", pflag.ContinueOnError)
	o.addFlags(fs)
	if code, done := parseFlags(fs, e, "solvents", solventsUsage, args); done {
		return code
	}
	atState := fs.Changed("temperature-c") || fs.Changed("wavelength-nm")

	table := medium.NewDefaultTable()
	if o.file != "" {
		if err := solventfile.Load(o.file, table); err != nil {
			fmt.Fprintf(e.stderr, "dlsbatch solvents: %v\n", err)
			return exitUsage
		}
	}
	list := table.Solvents()
	if names := fs.Args(); len(names) > 0 {
		list = list[:0:0]
		for _, name := range names {
			s, err := table.Lookup(name)
			if err != nil {
				fmt.Fprintf(e.stderr, "dlsbatch solvents: %v\n", err)
				return exitUsage
			}
			list = append(list, s)
		}
	}

	var err error
	if atState {
		tK := dls.KelvinFromCelsius(o.temperatureC)
		lambdaM := o.wavelengthNm * 1e-9
		if math.IsNaN(tK) || math.IsInf(tK, 0) || tK <= 0 || !(lambdaM > 0) || math.IsInf(lambdaM, 0) {
			fmt.Fprintln(e.stderr, "dlsbatch solvents: --temperature-c must be above −273.15 and --wavelength-nm positive")
			return exitUsage
		}
		err = printSolventValues(e.stdout, list, tK, lambdaM, o.extrapolate)
	} else {
		err = printSolventTable(e.stdout, list)
	}
	if err != nil {
		fmt.Fprintf(e.stderr, "dlsbatch solvents: %v\n", err)
		return exitFatal
	}
	return exitOK
}

const absoluteSuffix = "; absolute index, vacuum wavelength"

// printSolventTable lists entries with their ranges and sources.
func printSolventTable(w io.Writer, list []*medium.Solvent) error {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "name\taliases\tt_range_c\tlambda_range_nm\tviscosity\tindex\tdefined")
	for _, s := range list {
		lo, hi := s.Viscosity.RangeK()
		ilo, ihi := s.Index.RangeK()
		tr := celsiusRange(lo, hi)
		if ilo != lo || ihi != hi {
			tr += " (index " + celsiusRange(ilo, ihi) + ")"
		}
		llo, lhi := s.Index.RangeLambdaM()
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\t%s\n", s.Name, aliasText(s), tr, nmRange(llo, lhi),
			s.Viscosity.Source(), strings.TrimSuffix(s.Index.Source(math.NaN()), absoluteSuffix), s.Origin)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	_, err := fmt.Fprintf(w, "\n%d entries. Mixtures: %s:W (W = glycerol mass fraction, Cheng 2008 viscosity).\n"+
		"Ranges are at 0.1 MPa; indices are absolute, at the vacuum wavelength.\n", len(list), medium.MixtureGlycerolWater)
	return err
}

// printSolventValues prints viscosity and index of each entry at one state.
func printSolventValues(w io.Writer, list []*medium.Solvent, tK, lambdaM float64, extrapolate bool) error {
	fmt.Fprintf(w, "at %.2f °C, 0.1 MPa, vacuum wavelength %.1f nm\n\n", tK-dls.ZeroCelsiusK, lambdaM*1e9)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "name\tviscosity_mpas\trefractive_index\tstatus")
	type note struct{ name, vsrc, isrc string }
	var notes []note
	for _, s := range list {
		p, err := s.Props(tK, lambdaM, extrapolate)
		switch {
		case err != nil:
			fmt.Fprintf(tw, "%s\t-\t-\t%v\n", s.Name, err)
			continue
		case len(p.Warnings) > 0:
			fmt.Fprintf(tw, "%s\t%.4f\t%.5f\t%s\n", s.Name, p.ViscosityPaS*1e3, p.RefractiveIndex, strings.Join(p.Warnings, "; "))
		default:
			fmt.Fprintf(tw, "%s\t%.4f\t%.5f\tok\n", s.Name, p.ViscosityPaS*1e3, p.RefractiveIndex)
		}
		notes = append(notes, note{s.Name, p.ViscositySource, strings.TrimSuffix(p.IndexSource, absoluteSuffix)})
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	if len(notes) > 0 {
		fmt.Fprintln(w, "\nsources:")
	}
	for _, n := range notes {
		fmt.Fprintf(w, "  %s: viscosity: %s\n  %s: index: %s\n", n.name, n.vsrc, n.name, n.isrc)
	}
	_, err := fmt.Fprintln(w, "\nIndices are absolute, at the vacuum wavelength.")
	return err
}

func aliasText(s *medium.Solvent) string {
	a := append([]string(nil), s.Aliases...)
	if s.CAS != "" {
		a = append(a, s.CAS)
	}
	if len(a) == 0 {
		return "-"
	}
	return strings.Join(a, ", ")
}

func celsiusRange(loK, hiK float64) string {
	return fmt.Sprintf("%.1f–%.1f", loK-dls.ZeroCelsiusK, hiK-dls.ZeroCelsiusK)
}

func nmRange(lo, hi float64) string {
	switch {
	case lo == 0 && math.IsInf(hi, 1):
		return "any"
	case math.IsInf(hi, 1):
		return fmt.Sprintf("from %.0f", lo*1e9)
	}
	return fmt.Sprintf("%.0f–%.0f", lo*1e9, hi*1e9)
}
