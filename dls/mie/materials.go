package mie

import (
	_ "embed"
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
	"sync"
)

// ErrUnknownMaterial is wrapped by MaterialIndex for a name not in the
// table; the message lists the known names.
var ErrUnknownMaterial = errors.New("unknown material")

// ErrWavelengthRange is wrapped by MaterialIndex for a wavelength outside
// the range the material's data cover; the message names the range.
var ErrWavelengthRange = errors.New("wavelength outside the material's data range")

//go:embed data/particle-refractive-index.tsv
var materialTSV string

// tableRow is one line of the material table.
type tableRow struct {
	lambdaNm float64
	m        complex128
	source   string
	method   string
	note     string
}

// dispersion is a published dispersion formula n(λ) for a transparent
// material, valid over [loNm, hiNm] according to its source.
type dispersion struct {
	loNm, hiNm float64
	n          func(um float64) float64 // λ in µm
}

// sellmeier returns n from n² − 1 = Σ B_i λ²/(λ² − C_i), λ and √C_i in µm.
func sellmeier(um float64, b, c []float64) float64 {
	l2 := um * um
	s := 1.0
	for i := range b {
		s += b[i] * l2 / (l2 - c[i])
	}
	return math.Sqrt(s)
}

// formulas holds the dispersion formulas that are evaluated instead of
// interpolating the tabulated lines.
var formulas = map[string]dispersion{
	// Sultanova, Kasarova & Nikolov, Acta Phys. Pol. A 116, 585 (2009):
	// n² − 1 = 1.4435 λ²/(λ² − 0.020216), 0.4368–1.052 µm, 20 °C.
	"polystyrene": {436.8, 1052, func(um float64) float64 {
		return sellmeier(um, []float64{1.4435}, []float64{0.020216})
	}},
	// Malitson, J. Opt. Soc. Am. 55, 1205 (1965), 0.21–3.71 µm, 20 °C
	// (coefficients from memory of the paper; they reproduce the table's
	// eight lines to the printed 4 decimals).
	"SiO2_fused": {210, 3710, func(um float64) float64 {
		return sellmeier(um,
			[]float64{0.6961663, 0.4079426, 0.8974794},
			[]float64{0.0684043 * 0.0684043, 0.1162414 * 0.1162414, 9.896161 * 9.896161})
	}},
	// Devore, J. Opt. Soc. Am. 41, 416 (1951): n² = A + B/(λ² − C),
	// 0.43–1.53 µm; ordinary and extraordinary rays of rutile.
	"TiO2_rutile_o": {430, 1530, func(um float64) float64 {
		return math.Sqrt(5.913 + 0.2441/(um*um-0.0803))
	}},
	"TiO2_rutile_e": {430, 1530, func(um float64) float64 {
		return math.Sqrt(7.197 + 0.3322/(um*um-0.0843))
	}},
}

type material struct {
	name string
	rows []tableRow // sorted by wavelength
}

var materialTable = sync.OnceValue(func() map[string]*material {
	mats, err := parseMaterialTable(materialTSV)
	if err != nil {
		panic("mie: embedded material table: " + err.Error())
	}
	return mats
})

// parseMaterialTable reads the tab-separated table: '#' comment lines, a
// header, then material, wavelength_nm, n, k, source, method, note.
func parseMaterialTable(text string) (map[string]*material, error) {
	mats := map[string]*material{}
	header := true
	for i, line := range strings.Split(text, "\n") {
		line = strings.TrimRight(line, "\r")
		if line == "" || strings.HasPrefix(line, "#") {
			continue
		}
		f := strings.Split(line, "\t")
		if header {
			if len(f) < 4 || f[0] != "material" || f[1] != "wavelength_nm" || f[2] != "n" || f[3] != "k" {
				return nil, fmt.Errorf("line %d: unexpected header %q", i+1, line)
			}
			header = false
			continue
		}
		if len(f) != 7 {
			return nil, fmt.Errorf("line %d: %d fields, want 7", i+1, len(f))
		}
		var v [3]float64
		for j := range v {
			x, err := strconv.ParseFloat(f[j+1], 64)
			if err != nil {
				return nil, fmt.Errorf("line %d field %d: %w", i+1, j+2, err)
			}
			v[j] = x
		}
		mt := mats[f[0]]
		if mt == nil {
			mt = &material{name: f[0]}
			mats[f[0]] = mt
		}
		mt.rows = append(mt.rows, tableRow{lambdaNm: v[0], m: complex(v[1], v[2]), source: f[4], method: f[5], note: f[6]})
	}
	for _, mt := range mats {
		slices.SortFunc(mt.rows, func(a, b tableRow) int { return cmpFloat(a.lambdaNm, b.lambdaNm) })
		for i := 1; i < len(mt.rows); i++ {
			if mt.rows[i].lambdaNm == mt.rows[i-1].lambdaNm {
				return nil, fmt.Errorf("material %s: wavelength %g nm listed twice", mt.name, mt.rows[i].lambdaNm)
			}
		}
	}
	if len(mats) == 0 {
		return nil, errors.New("no rows")
	}
	return mats, nil
}

func cmpFloat(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

// Materials returns the names MaterialIndex knows, sorted.
func Materials() []string {
	mats := materialTable()
	names := make([]string, 0, len(mats))
	for n := range mats {
		names = append(names, n)
	}
	slices.Sort(names)
	return names
}

func lookupMaterial(name string) (*material, error) {
	mats := materialTable()
	if mt, ok := mats[name]; ok {
		return mt, nil
	}
	for n, mt := range mats {
		if strings.EqualFold(n, name) {
			return mt, nil
		}
	}
	return nil, fmt.Errorf("%q (known: %s): %w", name, strings.Join(Materials(), ", "), ErrUnknownMaterial)
}

// MaterialIndex returns the complex refractive index n + ik (k ≥ 0) of a
// particle material at vacuum wavelength lambdaVacM (m), and a citation of
// where it comes from and how it was obtained.
//
// For polystyrene, fused silica and rutile (ordinary "TiO2_rutile_o" and
// extraordinary "TiO2_rutile_e") the source's dispersion formula is
// evaluated, over the formula's range widened to the table's extrapolated
// 405 nm line (the citation then says "extrapolated"). The other materials
// (Au, Ag, PMMA, anatase, magnetite, the generic protein value) are
// interpolated linearly in wavelength between the tabulated laser lines
// 405–830 nm; between lines that is coarse for the metals, whose
// interband structure the 50–100 nm line spacing does not resolve. Names
// match case-insensitively; see Materials.
func MaterialIndex(name string, lambdaVacM float64) (complex128, string, error) {
	mt, err := lookupMaterial(name)
	if err != nil {
		return 0, "", fmt.Errorf("mie: material %w", err)
	}
	if math.IsNaN(lambdaVacM) || math.IsInf(lambdaVacM, 0) || lambdaVacM <= 0 {
		return 0, "", fmt.Errorf("mie: material %s: wavelength %g m must be finite and positive: %w", mt.name, lambdaVacM, ErrInvalidArgument)
	}
	nm := lambdaVacM * 1e9
	if r, ok := rowAt(mt.rows, nm); ok {
		nm = r.lambdaNm // 830e-9 m is 830.0000000000001 nm
	}
	rows := mt.rows
	src := rows[0].source
	tLo, tHi := rows[0].lambdaNm, rows[len(rows)-1].lambdaNm

	if f, ok := formulas[mt.name]; ok {
		lo, hi := math.Min(f.loNm, tLo), math.Max(f.hiNm, tHi)
		if nm < lo || nm > hi {
			return 0, "", fmt.Errorf("mie: material %s: wavelength %.4g nm outside %g–%g nm (formula range %g–%g nm): %w",
				mt.name, nm, lo, hi, f.loNm, f.hiNm, ErrWavelengthRange)
		}
		how := "dispersion formula"
		if nm < f.loNm || nm > f.hiNm {
			how = fmt.Sprintf("dispersion formula extrapolated outside its range %g–%g nm", f.loNm, f.hiNm)
			if r, ok := rowAt(rows, nm); ok && r.note != "" {
				how += " (" + r.note + ")"
			}
		}
		return complex(f.n(nm/1000), 0), src + "; " + how, nil
	}

	if nm < tLo || nm > tHi {
		return 0, "", fmt.Errorf("mie: material %s: wavelength %.4g nm outside the tabulated range %g–%g nm: %w",
			mt.name, nm, tLo, tHi, ErrWavelengthRange)
	}
	if r, ok := rowAt(rows, nm); ok {
		how := r.method
		if r.note != "" {
			how += " (" + r.note + ")"
		}
		return r.m, r.source + "; " + how, nil
	}
	i, _ := slices.BinarySearchFunc(rows, nm, func(r tableRow, v float64) int { return cmpFloat(r.lambdaNm, v) })
	a, b := rows[i-1], rows[i]
	t := (nm - a.lambdaNm) / (b.lambdaNm - a.lambdaNm)
	m := a.m + complex(t, 0)*(b.m-a.m)
	how := fmt.Sprintf("linear interpolation between the %g and %g nm values (%s)", a.lambdaNm, b.lambdaNm, a.method)
	return m, src + "; " + how, nil
}

// rowAt returns the table row within 0.01 nm of nm, if any.
func rowAt(rows []tableRow, nm float64) (tableRow, bool) {
	for _, r := range rows {
		if math.Abs(r.lambdaNm-nm) <= 0.01 {
			return r, true
		}
	}
	return tableRow{}, false
}
