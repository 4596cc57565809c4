package spec

import (
	"fmt"
	"sort"
	"time"

	"dlsbatch/dls"
)

// Bases of a batch order.
const (
	OrderMeasuredAt = "measured_at" // the measured_at metadata of every measurement
	OrderSheet      = "sheet"       // the sample sheet's rows, one per file
	OrderPath       = "path"        // the input paths (results order)
)

// Order is the batch order: the measurements in the order they were
// taken, as far as the inputs tell it.
type Order struct {
	// Basis is what the order rests on (OrderMeasuredAt, OrderSheet or
	// OrderPath); Note says why a better basis was not used.
	Basis string `json:"basis"`
	Note  string `json:"note,omitempty"`
	// Index lists the results' indices in batch order.
	Index []int `json:"-"`
}

// BatchOrder orders n results (in path order): by measuredAt (one value
// per result, "" when absent) when every result has a valid one with the
// same form (all with a UTC offset or all without), else by sheetRank (the
// sample sheet row that names the result's file alone; -1 for none) when
// every result has one, else in path order. Ties keep path order, so the
// runs of one file stay in their order. Either slice may be nil.
func BatchOrder(n int, measuredAt []string, sheetRank []int) Order {
	idx := make([]int, n)
	for i := range idx {
		idx[i] = i
	}
	var notes []string
	if len(measuredAt) == n && n > 0 {
		times := make([]time.Time, n)
		given, offsets := 0, 0
		bad := ""
		for i, v := range measuredAt {
			if v == "" {
				continue
			}
			given++
			t, off, err := dls.ParseMeasuredAt(v)
			if err != nil && bad == "" {
				bad = err.Error()
			}
			if off {
				offsets++
			}
			times[i] = t
		}
		switch {
		case given == 0:
		case bad != "":
			notes = append(notes, "measured_at not used: "+bad)
		case given < n:
			notes = append(notes, fmt.Sprintf("measured_at not used: given for %d of %d measurements", given, n))
		case offsets != 0 && offsets != n:
			notes = append(notes, fmt.Sprintf("measured_at not used: %d of %d values have a UTC offset, the others none", offsets, n))
		default:
			sort.SliceStable(idx, func(a, b int) bool { return times[idx[a]].Before(times[idx[b]]) })
			return Order{Basis: OrderMeasuredAt, Index: idx}
		}
	}
	if len(sheetRank) == n && n > 0 {
		all := true
		for _, r := range sheetRank {
			all = all && r >= 0
		}
		if all {
			sort.SliceStable(idx, func(a, b int) bool { return sheetRank[idx[a]] < sheetRank[idx[b]] })
			return Order{Basis: OrderSheet, Note: joinNotes(notes), Index: idx}
		}
		notes = append(notes, "sheet order not used: not every file has a sheet row of its own")
	}
	return Order{Basis: OrderPath, Note: joinNotes(notes), Index: idx}
}

func joinNotes(n []string) string {
	out := ""
	for i, s := range n {
		if i > 0 {
			out += "; "
		}
		out += s
	}
	return out
}
