package report

import (
	"fmt"
	"io"
	"text/tabwriter"

	"dlsbatch/dls/qc"
)

// WriteFlagTable lists the quality-control flags (code, level, meaning,
// threshold) as an aligned text table.
func WriteFlagTable(w io.Writer, defs []qc.Definition) error {
	return buffered(w, func(w io.Writer) error { return writeFlagTable(w, defs) })
}

func writeFlagTable(w io.Writer, defs []qc.Definition) error {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "code\tlevel\tmeaning\tthreshold")
	for _, d := range defs {
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\n", d.Code, d.Level, d.Meaning, d.Threshold)
	}
	return tw.Flush()
}
