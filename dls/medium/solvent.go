package medium

import (
	"dlsbatch/dls"
	"fmt"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"
	"sync"
)

// Props are the properties of the continuous phase at one state.
type Props struct {
	ViscosityPaS    float64
	RefractiveIndex float64 // absolute index at the vacuum wavelength asked for
	// ViscositySource and IndexSource cite the correlation used and say
	// what was done (temperature of the index data, dn/dT correction).
	ViscositySource string
	IndexSource     string
	// Warnings name every extrapolation beyond a correlation's valid range.
	Warnings []string
}

// Solvent is one entry of a solvent table: a liquid with a viscosity law and
// a refractive-index law, each with its valid range and source. Entries
// returned by a Table are shared with it; treat them as read-only. Lookup,
// Solvents and NewDefaultTable hand out copies, so the built-in table
// cannot be changed through them.
type Solvent struct {
	Name    string
	Aliases []string // other names it is found by (case-insensitive)
	CAS     string   // CAS registry number, "" for mixtures and user entries without one

	Viscosity ViscosityLaw
	Index     IndexLaw

	// Origin says where the entry was defined: "built-in", or the file and
	// line of a user solvent file.
	Origin string
	// Note is free text shown in listings (e.g. the melting point).
	Note string
}

// Props returns viscosity and refractive index at temperature tK (kelvin) and
// vacuum wavelength lambdaM (metres). Outside a correlation's valid range it
// returns an error wrapping dls.ErrOutOfRange that names the range, unless
// extrapolate is set; then it returns the extrapolated value with a warning.
// A temperature or wavelength that is not a positive finite number is always
// an error.
func (s *Solvent) Props(tK, lambdaM float64, extrapolate bool) (Props, error) {
	var p Props
	if s == nil || s.Viscosity == nil || s.Index == nil {
		return p, fmt.Errorf("solvent entry without viscosity or index law")
	}
	if math.IsNaN(tK) || math.IsInf(tK, 0) {
		return p, fmt.Errorf("%s: temperature %g K: %w", s.Name, tK, dls.ErrNonFinite)
	}
	if math.IsNaN(lambdaM) || math.IsInf(lambdaM, 0) {
		return p, fmt.Errorf("%s: wavelength %g m: %w", s.Name, lambdaM, dls.ErrNonFinite)
	}
	if !(tK > 0) {
		return p, fmt.Errorf("%s: temperature %g K is not above absolute zero: %w", s.Name, tK, dls.ErrOutOfRange)
	}
	if !(lambdaM > 0) {
		return p, fmt.Errorf("%s: wavelength %g m is not positive: %w", s.Name, lambdaM, dls.ErrOutOfRange)
	}

	var rangeErrs []error
	vsrc := s.Viscosity.Source()
	lo, hi := s.Viscosity.RangeK()
	if err := checkTemperature(tK, lo, hi, vsrc); err != nil {
		rangeErrs = append(rangeErrs, err)
	}
	isrc := s.Index.Source(tK)
	// The index law usually shares the liquid range of the viscosity law;
	// name a range only once.
	if ilo, ihi := s.Index.RangeK(); ilo != lo || ihi != hi {
		if err := checkTemperature(tK, ilo, ihi, "refractive index, "+shortIndexSource(s.Index)); err != nil {
			rangeErrs = append(rangeErrs, err)
		}
	}
	llo, lhi := s.Index.RangeLambdaM()
	if err := checkWavelength(lambdaM, llo, lhi, "refractive index, "+shortIndexSource(s.Index)); err != nil {
		rangeErrs = append(rangeErrs, err)
	}
	if len(rangeErrs) > 0 && !extrapolate {
		return p, fmt.Errorf("%s: %w", s.Name, rangeErrs[0])
	}
	for _, err := range rangeErrs {
		p.Warnings = append(p.Warnings, s.Name+": extrapolated: "+strings.TrimSuffix(err.Error(), ": "+dls.ErrOutOfRange.Error()))
	}

	p.ViscosityPaS = s.Viscosity.ViscosityPaS(tK)
	p.RefractiveIndex = s.Index.RefractiveIndex(tK, lambdaM)
	p.ViscositySource = vsrc
	p.IndexSource = isrc
	if !(p.ViscosityPaS > 0) || math.IsInf(p.ViscosityPaS, 0) {
		return p, fmt.Errorf("%s: viscosity law gives %g Pa·s at %.2f °C: %w", s.Name, p.ViscosityPaS, tK-dls.ZeroCelsiusK, dls.ErrOutOfRange)
	}
	if !(p.RefractiveIndex >= 1) || math.IsInf(p.RefractiveIndex, 0) {
		return p, fmt.Errorf("%s: index law gives %g at %.1f nm: %w", s.Name, p.RefractiveIndex, lambdaM*1e9, dls.ErrOutOfRange)
	}
	return p, nil
}

// shortIndexSource is the index source without the temperature detail.
func shortIndexSource(l IndexLaw) string {
	if n, ok := l.(interface{ shortSource() string }); ok {
		return n.shortSource()
	}
	s := l.Source(math.NaN())
	if i := strings.Index(s, ", at "); i >= 0 {
		return s[:i]
	}
	if i := strings.Index(s, "; "); i >= 0 {
		return s[:i]
	}
	return s
}

// MixtureGlycerolWater is the stem of the mixture syntax
// "glycerol-water:W": W is the glycerol mass fraction, a number in [0, 1]
// ("glycerol-water:0.40") or a mass percentage with "%" ("glycerol-water:40%").
const MixtureGlycerolWater = "glycerol-water"

// Table is a set of solvents found by name, alias or CAS number
// (case-insensitive; spaces and underscores are the same). The zero value
// is an empty table. Mixtures in the "glycerol-water:W" syntax are always
// found and need no entry. A Table is not safe for concurrent Add;
// concurrent Lookup is safe.
type Table struct {
	byKey map[string]*Solvent
}

// NewDefaultTable returns a new table holding copies of the built-in
// entries, to which user entries may be added without changing the default
// table.
func NewDefaultTable() *Table {
	t := &Table{}
	for _, s := range defaultTable().Solvents() {
		if err := t.Add(s.clone()); err != nil {
			panic("medium: built-in solvent table: " + err.Error())
		}
	}
	return t
}

// solventKey normalises a name for lookup.
func solventKey(name string) string {
	name = strings.ToLower(strings.ReplaceAll(name, "_", " "))
	return strings.Join(strings.Fields(name), " ")
}

// Add puts s into the table. It replaces every entry that shares its name
// or one of its aliases with s (so a user file can override a built-in
// entry). It fails on an entry without a name or laws, or whose name uses
// the mixture syntax.
func (t *Table) Add(s *Solvent) error {
	if s == nil {
		return fmt.Errorf("nil solvent")
	}
	key := solventKey(s.Name)
	switch {
	case key == "":
		return fmt.Errorf("solvent without a name")
	case strings.Contains(key, ":"):
		return fmt.Errorf("solvent name %q: ':' is reserved for mixtures (%s:W)", s.Name, MixtureGlycerolWater)
	case s.Viscosity == nil:
		return fmt.Errorf("solvent %q has no viscosity law", s.Name)
	case s.Index == nil:
		return fmt.Errorf("solvent %q has no refractive-index law", s.Name)
	}
	if d, ok := s.Index.(Dispersion); ok {
		if err := d.validate(); err != nil {
			return fmt.Errorf("solvent %q: %w", s.Name, err)
		}
	}
	if t.byKey == nil {
		t.byKey = make(map[string]*Solvent)
	}
	keys := s.keys()
	for _, k := range keys {
		if old, ok := t.byKey[k]; ok {
			for _, ok := range old.keys() {
				if t.byKey[ok] == old {
					delete(t.byKey, ok)
				}
			}
		}
	}
	for _, k := range keys {
		t.byKey[k] = s
	}
	return nil
}

// clone returns a copy of s that shares no slice with it (the aliases and
// the coefficients of a dispersion formula); the laws are values.
func (s *Solvent) clone() *Solvent {
	c := *s
	c.Aliases = slices.Clone(s.Aliases)
	if d, ok := s.Index.(Dispersion); ok {
		d.Coef = slices.Clone(d.Coef)
		c.Index = d
	}
	return &c
}

func (s *Solvent) keys() []string {
	keys := []string{solventKey(s.Name)}
	for _, a := range s.Aliases {
		if k := solventKey(a); k != "" {
			keys = append(keys, k)
		}
	}
	if s.CAS != "" {
		keys = append(keys, solventKey(s.CAS))
	}
	return keys
}

// Lookup finds a solvent by name, alias or CAS number, or builds the
// mixture named "glycerol-water:W". An unknown name gives an error wrapping
// dls.ErrUnknownSolvent that lists the known names.
func (t *Table) Lookup(name string) (*Solvent, error) {
	key := solventKey(name)
	if stem, arg, ok := strings.Cut(key, ":"); ok {
		if strings.TrimSpace(stem) != MixtureGlycerolWater {
			return nil, fmt.Errorf("solvent %q: %w: the only mixture is %s:W (W = glycerol mass fraction)",
				name, dls.ErrUnknownSolvent, MixtureGlycerolWater)
		}
		w, err := parseMassFraction(arg)
		if err != nil {
			return nil, fmt.Errorf("solvent %q: %w", name, err)
		}
		return GlycerolWater(w)
	}
	if s, ok := t.byKey[key]; ok && key != "" {
		return s, nil
	}
	names := make([]string, 0, len(t.byKey)+1)
	for _, s := range t.Solvents() {
		names = append(names, s.Name)
	}
	names = append(names, MixtureGlycerolWater+":W")
	return nil, fmt.Errorf("solvent %q: %w (known: %s)", name, dls.ErrUnknownSolvent, strings.Join(names, ", "))
}

// parseMassFraction reads W of "glycerol-water:W": a fraction or a
// percentage ending in "%".
func parseMassFraction(s string) (float64, error) {
	s = strings.TrimSpace(s)
	pct := strings.HasSuffix(s, "%")
	num := strings.TrimSpace(strings.TrimSuffix(s, "%"))
	w, err := strconv.ParseFloat(num, 64)
	if err != nil {
		return 0, fmt.Errorf("glycerol mass fraction %q: %w", s, dls.ErrNotANumber)
	}
	if pct {
		w /= 100
	}
	return w, nil
}

// Solvents returns the entries of the table, each once, sorted by name
// (case-insensitive).
func (t *Table) Solvents() []*Solvent {
	seen := make(map[*Solvent]bool, len(t.byKey))
	out := make([]*Solvent, 0, len(t.byKey))
	for _, s := range t.byKey {
		if !seen[s] {
			seen[s] = true
			out = append(out, s)
		}
	}
	sort.Slice(out, func(i, j int) bool {
		a, b := solventKey(out[i].Name), solventKey(out[j].Name)
		if a != b {
			return a < b
		}
		return out[i].Name < out[j].Name
	})
	return out
}

// defaultTable is the built-in table, built once from the embedded data.
var defaultTable = sync.OnceValue(func() *Table {
	list, err := builtinSolvents()
	if err != nil {
		panic("medium: embedded solvent data: " + err.Error())
	}
	t := &Table{}
	for _, s := range list {
		if err := t.Add(s); err != nil {
			panic("medium: embedded solvent data: " + err.Error())
		}
	}
	return t
})

// Lookup finds a solvent of the built-in table by name, alias or CAS
// number (case-insensitive), or builds the mixture "glycerol-water:W" (W =
// glycerol mass fraction, "0.40" or "40%"). An unknown name gives an error
// wrapping dls.ErrUnknownSolvent that lists the known names. The entry is
// a copy: changing it does not change the table.
func Lookup(name string) (*Solvent, error) {
	s, err := defaultTable().Lookup(name)
	if err != nil {
		return nil, err
	}
	return s.clone(), nil
}

// Solvents returns copies of the built-in entries sorted by name, for
// listing.
func Solvents() []*Solvent {
	list := defaultTable().Solvents()
	for i, s := range list {
		list[i] = s.clone()
	}
	return list
}
