package sizedist

import (
	"errors"
	"fmt"
	"math"

	"dlsbatch/dls"
	"dlsbatch/dls/mie"
)

// Input is a decay-rate spectrum and the physics needed to turn it into
// size distributions.
type Input struct {
	// GammaPerS is the log-spaced decay-rate grid, increasing; Amplitude the
	// intensity amplitude of each log bin (non-negative).
	GammaPerS []float64
	Amplitude []float64

	TempK        float64
	ViscosityPaS float64
	Optics       dls.Optics
	// ParticleIndex is the particle's complex refractive index (Bohren &
	// Huffman convention, imaginary part ≥ 0).
	ParticleIndex complex128
	Polarization  mie.Polarization
	// Cache, when not nil, supplies the Mie intensities of grids and
	// optics seen before (shared by a batch; safe for concurrent use).
	Cache *WeightCache
}

// Distribution holds intensity-, volume- and number-weighted size
// distributions on one log-spaced diameter grid. Each weighting sums to 1.
// Because the grid is uniform in ln d, the values are fractions per log bin
// and need no Jacobian.
type Distribution struct {
	DiameterNm []float64 // increasing
	Intensity  []float64
	Volume     []float64
	Number     []float64
	// Scatter is the Mie scattered intensity per particle at the
	// detection angle, relative to its largest value on the grid.
	Scatter []float64
	// Masked marks bins near a Mie minimum, where the scattered intensity
	// is below MieMaskFraction of its largest value within a factor two in
	// size; their number and volume weights use that floor instead, so
	// that a near-zero C(d) cannot blow a ripple of the intensity solution
	// up into a number population.
	Masked   []bool
	Warnings []string
}

// MieMaskFraction is the depth below the local maximum of the scattered
// intensity at which a bin counts as sitting in a Mie minimum (common
// practice: about 1e-3).
const MieMaskFraction = 1e-3

// ErrEmpty reports a spectrum with no positive amplitude.
var ErrEmpty = errors.New("empty size distribution")

// New maps each rate Γ_j to the Stokes–Einstein diameter
// d_j = k_B·T·q²/(3π·η·Γ_j), and converts the intensity amplitudes x_j to
// number and volume weights with the Mie intensity C(d_j) of one particle:
//
//	N_j ∝ x_j / C(d_j),   V_j ∝ N_j·d_j³
//
// (Finsy 1994; Bohren & Huffman 1983 for C). Number and volume weights are
// derived quantities, of lower confidence than the intensity weights they
// come from: regularisation broadening and ripple carry through and are
// amplified at small sizes.
func New(in Input) (*Distribution, error) {
	n := len(in.GammaPerS)
	if n == 0 || len(in.Amplitude) != n {
		return nil, fmt.Errorf("size distribution: %d rates and %d amplitudes", n, len(in.Amplitude))
	}
	if err := in.Optics.Validate(); err != nil {
		return nil, fmt.Errorf("size distribution: %w", err)
	}
	if !(in.TempK > 0) || !(in.ViscosityPaS > 0) {
		return nil, fmt.Errorf("size distribution: temperature %g K, viscosity %g Pa·s", in.TempK, in.ViscosityPaS)
	}
	q := in.Optics.Q()
	d := &Distribution{
		DiameterNm: make([]float64, n),
		Intensity:  make([]float64, n),
		Volume:     make([]float64, n),
		Number:     make([]float64, n),
		Scatter:    make([]float64, n),
		Masked:     make([]bool, n),
	}
	diam := make([]float64, n) // metres, increasing
	var total float64
	for j := 0; j < n; j++ {
		k := n - 1 - j // largest rate = smallest size first
		g := in.GammaPerS[k]
		if !(g > 0) || (j > 0 && !(in.GammaPerS[k] < in.GammaPerS[k+1])) {
			return nil, fmt.Errorf("size distribution: rate grid must be positive and increasing")
		}
		a := in.Amplitude[k]
		if a < 0 || math.IsNaN(a) || math.IsInf(a, 0) {
			return nil, fmt.Errorf("size distribution: amplitude %g at Γ = %g 1/s", a, g)
		}
		diam[j] = dls.DiameterFromDiffusion(in.TempK, in.ViscosityPaS, dls.DiffusionFromRate(g, q))
		d.DiameterNm[j] = diam[j] * 1e9
		d.Intensity[j] = a
		total += a
	}
	if !(total > 0) {
		return nil, ErrEmpty
	}
	var c []float64 // read only: may be shared through the cache
	var err error
	if in.Cache != nil {
		c, err = in.Cache.intensities(diam, in.Optics.WavelengthM, in.Optics.RefractiveIndex, in.ParticleIndex, in.Optics.AngleRad, in.Polarization)
	} else {
		c, err = mie.IntensityGrid(diam, in.Optics.WavelengthM, in.Optics.RefractiveIndex, in.ParticleIndex, in.Optics.AngleRad, in.Polarization)
	}
	if err != nil {
		return nil, fmt.Errorf("size distribution: Mie weights: %w", err)
	}
	cmax := 0.0
	for _, v := range c {
		cmax = math.Max(cmax, v)
	}
	if !(cmax > 0) {
		return nil, fmt.Errorf("size distribution: Mie weights are all zero")
	}
	// Local maximum of C within a factor two in diameter either side.
	step := math.Log(diam[min(1, n-1)] / diam[0])
	half := n
	if step > 0 {
		half = int(math.Ceil(math.Ln2 / step))
	}
	var nSum, vSum, maskedI float64
	for j := 0; j < n; j++ {
		d.Scatter[j] = c[j] / cmax
		local := 0.0
		for k := max(0, j-half); k <= min(n-1, j+half); k++ {
			local = math.Max(local, c[k])
		}
		cj := c[j]
		if cj < MieMaskFraction*local {
			d.Masked[j] = true
			cj = MieMaskFraction * local
			maskedI += d.Intensity[j]
		}
		d.Intensity[j] /= total
		d.Number[j] = d.Intensity[j] / cj
		nSum += d.Number[j]
	}
	for j := 0; j < n; j++ {
		d.Number[j] /= nSum
		dn := d.DiameterNm[j]
		d.Volume[j] = d.Number[j] * dn * dn * dn
		vSum += d.Volume[j]
	}
	for j := 0; j < n; j++ {
		d.Volume[j] /= vSum
	}
	if maskedI/total > 0.01 {
		d.Warnings = append(d.Warnings, fmt.Sprintf("%.0f %% of the intensity lies in bins near a Mie minimum: number and volume weights there are floored and uncertain", 100*maskedI/total))
	}
	return d, nil
}

// Percentile returns the diameter in nm below which the fraction p of the
// weights w lies (0 < p < 1), on the distribution's grid. Each grid point is
// the centre of a log bin; the cumulative sum is interpolated linearly in
// ln d across the bin that crosses p.
func (d *Distribution) Percentile(w []float64, p float64) float64 {
	n := len(d.DiameterNm)
	if n == 0 {
		return 0
	}
	if n == 1 {
		return d.DiameterNm[0]
	}
	var total float64
	for _, v := range w {
		total += v
	}
	if !(total > 0) {
		return 0
	}
	edge := func(j int) float64 { // ln of the lower edge of bin j
		if j == 0 {
			return 1.5*math.Log(d.DiameterNm[0]) - 0.5*math.Log(d.DiameterNm[1])
		}
		if j == n {
			return 1.5*math.Log(d.DiameterNm[n-1]) - 0.5*math.Log(d.DiameterNm[n-2])
		}
		return 0.5 * (math.Log(d.DiameterNm[j-1]) + math.Log(d.DiameterNm[j]))
	}
	target := p * total
	cum := 0.0
	for j := 0; j < n; j++ {
		if cum+w[j] >= target && w[j] > 0 {
			f := (target - cum) / w[j]
			return math.Exp(edge(j) + f*(edge(j+1)-edge(j)))
		}
		cum += w[j]
	}
	return d.DiameterNm[n-1]
}
