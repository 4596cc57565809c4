package csvdata

import (
	"fmt"
	"strings"

	"dlsbatch/dls"
	"dlsbatch/io/safetext"
)

// runCols are the cells of one run: its correlation column and, when given,
// its sigma column (-1 when not).
type runCols struct {
	label     string
	corr      int
	sigma     int
	corrName  string
	sigmaName string
}

// layout is what the header row says: which cell holds the lag, which the
// correlation values of each run and their uncertainties.
type layout struct {
	names   []string
	lag     int
	lagName string
	unit    lagUnit
	kind    dls.CorrKind
	runs    []runCols
	unused  []string // names of cells that are read by no run (format mode only)
	foreign bool     // some column was named by the options
}

// headerError is a problem with the header row; col is the 1-based cell it
// concerns, 0 when it concerns the row as a whole.
type headerError struct {
	col int
	err error
}

func hErr(col int, format string, args ...any) *headerError {
	return &headerError{col: col, err: fmt.Errorf(format, args...)}
}

var kindsByStem = []dls.CorrKind{dls.KindG2m1, dls.KindG2, dls.KindG1}

// hasPrefixFold reports whether s begins with the ASCII prefix p, ignoring
// ASCII case.
func hasPrefixFold(s, p string) bool {
	if len(s) < len(p) {
		return false
	}
	for i := 0; i < len(p); i++ {
		c := s[i]
		if c >= 'A' && c <= 'Z' {
			c += 'a' - 'A'
		}
		if c != p[i] {
			return false
		}
	}
	return true
}

func equalFoldASCII(s, p string) bool { return len(s) == len(p) && hasPrefixFold(s, p) }

// formatLag reports whether name is a lag column of the format: tau_s,
// tau_ms or tau_us.
func formatLag(name string) (lagUnit, bool) {
	switch {
	case equalFoldASCII(name, "tau_s"):
		return unitS, true
	case equalFoldASCII(name, "tau_ms"):
		return unitMs, true
	case equalFoldASCII(name, "tau_us"):
		return unitUs, true
	}
	return lagUnit{}, false
}

// formatCorr reports whether name is a correlation column of the format:
// g2, g2m1 or g1, alone or followed by "_" and a non-empty label.
func formatCorr(name string) (kind dls.CorrKind, label string, ok bool) {
	for _, k := range kindsByStem {
		stem := k.String()
		if equalFoldASCII(name, stem) {
			return k, "", true
		}
		if len(name) > len(stem)+1 && hasPrefixFold(name, stem+"_") {
			return k, name[len(stem)+1:], true
		}
	}
	return 0, "", false
}

// formatSigma reports whether name is a sigma column of the format: sigma
// or sigma_<label>.
func formatSigma(name string) (label string, ok bool) {
	if equalFoldASCII(name, "sigma") {
		return "", true
	}
	if len(name) > len("sigma_") && hasPrefixFold(name, "sigma_") {
		return name[len("sigma_"):], true
	}
	return "", false
}

// maxListed is the most column names a message lists.
const maxListed = 10

// quoteList lists the non-empty names as excerpts (safetext.Excerpt), at
// most maxListed of them, with the number of the others.
func quoteList(names []string) string {
	var b strings.Builder
	n := 0
	for _, s := range names {
		if s == "" {
			continue
		}
		if n == maxListed {
			rest := 0
			for _, s := range names {
				if s != "" {
					rest++
				}
			}
			fmt.Fprintf(&b, " and %d more", rest-maxListed)
			break
		}
		if n > 0 {
			b.WriteString(", ")
		}
		b.WriteString(safetext.Excerpt(s))
		n++
	}
	if n == 0 {
		return "no named columns"
	}
	return b.String()
}

// find returns the index of the cell named name (trimmed, case-insensitive),
// or -1.
func find(names []string, name string) int {
	name = strings.TrimSpace(name)
	for i, n := range names {
		if n != "" && strings.EqualFold(n, name) {
			return i
		}
	}
	return -1
}

// resolve works out the layout of a header row.
func resolve(names []string, o *Options) (*layout, *headerError) {
	L := &layout{names: names, lag: -1}
	seen := make(map[string]int, len(names))
	for i, n := range names {
		if n == "" {
			continue
		}
		k := strings.ToLower(n)
		if j, dup := seen[k]; dup {
			return nil, hErr(i+1, "column %d %s repeats the name of column %d: %w", i+1, safetext.Excerpt(n), j+1, dls.ErrBadHeader)
		}
		seen[k] = i
	}
	used := make([]bool, len(names))

	// The lag column.
	if o.TauColumn != "" {
		L.foreign = true
		L.lag = find(names, o.TauColumn)
		if L.lag < 0 {
			return nil, hErr(0, "no lag column named %s; found %s: %w", safetext.Excerpt(o.TauColumn), quoteList(names), dls.ErrBadHeader)
		}
		L.lagName = names[L.lag]
		u, ok := parseUnit(o.TauUnit)
		nu, named := unitFromName(L.lagName)
		switch {
		case ok && named && nu != u:
			return nil, hErr(L.lag+1, "the name of lag column %s says %s but the unit given is %s: drop the unit option or correct it: %w",
				safetext.Excerpt(L.lagName), nu.name, u.name, dls.ErrBadHeader)
		case !ok && !named:
			return nil, hErr(L.lag+1, "the name of lag column %s carries no unit: give the unit (s, ms or us): %w", safetext.Excerpt(L.lagName), dls.ErrBadHeader)
		case !ok:
			u = nu
		}
		L.unit = u
	} else {
		for i, n := range names {
			u, ok := formatLag(n)
			if !ok {
				continue
			}
			if L.lag >= 0 {
				return nil, hErr(i+1, "two lag columns, %s and %s: %w", safetext.Excerpt(L.lagName), safetext.Excerpt(n), dls.ErrBadHeader)
			}
			L.lag, L.lagName, L.unit = i, n, u
		}
		if L.lag < 0 {
			return nil, hErr(0, "no lag column: found %s; expected one of tau_s, tau_ms or tau_us (or name the lag column of a foreign export and its unit): %w",
				quoteList(names), dls.ErrBadHeader)
		}
		if o.TauUnit != "" {
			if u, _ := parseUnit(o.TauUnit); u != L.unit {
				return nil, hErr(L.lag+1, "lag column %s is in %s but the unit given is %s: %w", safetext.Excerpt(L.lagName), L.unit.name, u.name, dls.ErrBadHeader)
			}
		}
	}
	used[L.lag] = true

	// The correlation columns, one per run.
	if len(o.CorrColumns) > 0 {
		L.foreign = true
		labels := map[string]string{}
		for _, c := range o.CorrColumns {
			i := find(names, c)
			if i < 0 {
				return nil, hErr(0, "no correlation column named %s; found %s: %w", safetext.Excerpt(strings.TrimSpace(c)), quoteList(names), dls.ErrBadHeader)
			}
			if used[i] {
				return nil, hErr(i+1, "column %s is named twice among the lag and correlation columns: %w", safetext.Excerpt(names[i]), dls.ErrBadHeader)
			}
			used[i] = true
			n := names[i]
			k, label, isFormat := formatCorr(n)
			switch {
			case o.CorrKind != 0:
				if isFormat && k != o.CorrKind {
					isFormat = false // the label rule of the format needs the stem of the kind
				}
				k = o.CorrKind
			case !isFormat:
				return nil, hErr(i+1, "cannot tell the kind of correlation column %s from its name: give the kind (g2, g2m1 or g1): %w", safetext.Excerpt(n), dls.ErrBadHeader)
			case L.kind != 0 && k != L.kind:
				return nil, hErr(i+1, "correlation columns of two kinds, %s and %s: %w", L.kind, k, dls.ErrBadHeader)
			}
			L.kind = k
			if !isFormat {
				label = ""
				if len(o.CorrColumns) > 1 {
					label = n
				}
			}
			lk := strings.ToLower(label)
			if prev, dup := labels[lk]; dup {
				return nil, hErr(i+1, "columns %s and %s give the same run label %s: %w", safetext.Excerpt(prev), safetext.Excerpt(n), safetext.Excerpt(label), dls.ErrBadHeader)
			}
			labels[lk] = n
			L.runs = append(L.runs, runCols{label: label, corr: i, sigma: -1, corrName: n})
		}
	} else {
		for i, n := range names {
			k, label, ok := formatCorr(n)
			if !ok || used[i] {
				continue
			}
			if L.kind != 0 && k != L.kind {
				return nil, hErr(i+1, "correlation columns of two kinds, %s and %s: %w", L.kind, k, dls.ErrBadHeader)
			}
			L.kind = k
			used[i] = true
			L.runs = append(L.runs, runCols{label: label, corr: i, sigma: -1, corrName: n})
		}
		if len(L.runs) == 0 {
			return nil, hErr(0, "no correlation column: found %s; expected g2, g2m1 or g1, or several of one kind as g2_<label> (or name the correlation column of a foreign export and its kind): %w",
				quoteList(names), dls.ErrBadHeader)
		}
		if o.CorrKind != 0 && o.CorrKind != L.kind {
			return nil, hErr(L.runs[0].corr+1, "correlation column %s is %s but the kind given is %s: %w", safetext.Excerpt(L.runs[0].corrName), L.kind, o.CorrKind, dls.ErrBadHeader)
		}
	}

	// The sigma columns.
	if o.SigmaColumn != "" {
		L.foreign = true
		i := find(names, o.SigmaColumn)
		if i < 0 {
			return nil, hErr(0, "no sigma column named %s; found %s: %w", safetext.Excerpt(strings.TrimSpace(o.SigmaColumn)), quoteList(names), dls.ErrBadHeader)
		}
		if used[i] {
			return nil, hErr(i+1, "column %s cannot be the sigma column: it is read as lag or correlation: %w", safetext.Excerpt(names[i]), dls.ErrBadHeader)
		}
		if len(L.runs) != 1 {
			return nil, hErr(i+1, "sigma column %s needs exactly one correlation column, the header has %d: %w", safetext.Excerpt(names[i]), len(L.runs), dls.ErrBadHeader)
		}
		used[i] = true
		L.runs[0].sigma, L.runs[0].sigmaName = i, names[i]
	} else {
		byLabel := make(map[string]int, len(L.runs))
		for r, rc := range L.runs {
			if _, label, ok := formatCorr(rc.corrName); ok && (o.CorrKind == 0 || strings.EqualFold(label, rc.label)) {
				byLabel[strings.ToLower(label)] = r
			}
		}
		for i, n := range names {
			label, ok := formatSigma(n)
			if !ok || used[i] {
				continue
			}
			r, match := byLabel[strings.ToLower(label)]
			if !match {
				if len(o.CorrColumns) > 0 {
					continue // a run left out by the options
				}
				want := L.kind.String()
				if label != "" {
					want += "_" + label
				}
				return nil, hErr(i+1, "sigma column %s has no correlation column %s: %w", safetext.Excerpt(n), safetext.Excerpt(want), dls.ErrBadHeader)
			}
			used[i] = true
			L.runs[r].sigma, L.runs[r].sigmaName = i, n
		}
	}

	if !L.foreign {
		for i, n := range names {
			if n != "" && !used[i] {
				L.unused = append(L.unused, n)
			}
		}
	}
	return L, nil
}
