package report

import (
	"fmt"
	"io"
	"math"
	"strings"
	"text/tabwriter"

	"dlsbatch/dls"
	"dlsbatch/dls/medium"
)

const absoluteSuffix = "; absolute index, vacuum wavelength"

// WriteSolventTable lists entries with their ranges and sources.
func WriteSolventTable(w io.Writer, list []*medium.Solvent) error {
	return buffered(w, func(w io.Writer) error { return writeSolventTable(w, list) })
}

func writeSolventTable(w io.Writer, list []*medium.Solvent) error {
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

// WriteSolventValues prints viscosity and index of each entry at one state.
func WriteSolventValues(w io.Writer, list []*medium.Solvent, tK, lambdaM float64, extrapolate bool) error {
	return buffered(w, func(w io.Writer) error { return writeSolventValues(w, list, tK, lambdaM, extrapolate) })
}

func writeSolventValues(w io.Writer, list []*medium.Solvent, tK, lambdaM float64, extrapolate bool) error {
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
