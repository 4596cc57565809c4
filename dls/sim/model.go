package sim

import (
	"fmt"
	"math"

	"dlsbatch/dls"
)

// Conditions are the physical conditions of one measurement.
type Conditions struct {
	TemperatureK float64    // sample temperature, K
	ViscosityPaS float64    // viscosity of the continuous phase, Pa·s
	Optics       dls.Optics // wavelength, angle and medium index
}

// Validate reports conditions no measurement can have.
func (c Conditions) Validate() error {
	if !(c.TemperatureK > 0) || math.IsInf(c.TemperatureK, 0) {
		return fmt.Errorf("temperature %g K is not a positive number", c.TemperatureK)
	}
	if !(c.ViscosityPaS > 0) || math.IsInf(c.ViscosityPaS, 0) {
		return fmt.Errorf("viscosity %g Pa·s is not a positive number", c.ViscosityPaS)
	}
	return c.Optics.Validate()
}

// Rayleigh is the scattered intensity per particle in the Rayleigh limit up
// to a constant factor, (d/100 nm)⁶. It is the scatter function used when a
// model is built with a nil one.
func Rayleigh(dM float64) float64 {
	x := dM / 1e-7
	x3 := x * x * x
	return x3 * x3
}

// Node is one point of the size quadrature.
type Node struct {
	DiameterM float64 // hydrodynamic diameter, m
	RatePerS  float64 // field decay rate Γ = D·q², 1/s
	Number    float64 // number weight; all nodes add up to 1
	Intensity float64 // intensity weight; all nodes add up to 1
	Component int     // index of the population component
}

// Truth is the exact cumulant description of a population under given
// conditions, computed by quadrature over the intensity weights:
//
//	Γ̄ = Σ wₖ Γₖ,  μ₂ = Σ wₖ (Γₖ − Γ̄)²,  PDI = μ₂/Γ̄²,  d_z = k_B·T·q²/(3π·η·Γ̄)
type Truth struct {
	GammaMeanPerS   float64 // intensity-weighted mean decay rate Γ̄, 1/s
	Mu2PerS2        float64 // second cumulant μ₂, 1/s²
	PDI             float64 // polydispersity index μ₂/Γ̄²
	ZAvgM           float64 // z-average (harmonic intensity-mean) diameter, m
	DiffusionM2PerS float64 // z-averaged diffusion coefficient Γ̄/q², m²/s
}

// Model is a population turned into decay rates and intensity weights
// under given conditions. It is read-only after NewModel and may be shared
// between goroutines.
type Model struct {
	Population Population
	Conditions Conditions
	Q          float64 // scattering vector, 1/m
	Nodes      []Node
	Truth      Truth
	// Rates and Weights are the nodes' decay rates and intensity weights
	// (the same numbers as in Nodes, kept contiguous for speed).
	Rates, Weights []float64
	// noise is a coarse description of the rate spectrum for the noise
	// model: one rate per monodisperse component, two per lognormal one.
	noise []rateWeight
}

type rateWeight struct{ rate, weight float64 }

// quadNodes is the number of nodes per lognormal component.
const quadNodes = 161

// Limits of the size quadrature; a lognormal's tails beyond them are cut.
const (
	quadMinM = 1e-10
	quadMaxM = 1e-4
)

// NewModel discretises the population on a log-size grid, turns each size
// into a decay rate by Stokes–Einstein under the conditions and weights it
// by scatter(d), the scattered intensity of one particle of diameter d (any
// constant factor). A nil scatter means Rayleigh (d⁶). A lognormal
// component with width σ is sampled at z = ln(d/median)/σ in ±(8 + 6σ) with
// trapezoid weights: wide enough for the d⁶ shift of the intensity
// distribution of a number lognormal (and the d⁻⁶ shift the other way).
func NewModel(p Population, c Conditions, scatter func(dM float64) float64) (*Model, error) {
	if err := p.Validate(); err != nil {
		return nil, err
	}
	if err := c.Validate(); err != nil {
		return nil, err
	}
	if scatter == nil {
		scatter = Rayleigh
	}
	m := &Model{Population: p, Conditions: c, Q: c.Optics.Q()}
	rate := func(d float64) float64 {
		return dls.DiffusionFromDiameter(c.TemperatureK, c.ViscosityPaS, d) * m.Q * m.Q
	}
	scat := func(d float64) (float64, error) {
		v := scatter(d)
		if !(v > 0) || math.IsInf(v, 0) {
			return 0, fmt.Errorf("scattered intensity %g at %.4g nm is not a positive number", v, d*1e9)
		}
		return v, nil
	}
	multi := len(p.Components) > 1
	for ci, comp := range p.Components {
		var nodes []Node
		switch comp.Shape {
		case Mono:
			in, err := scat(comp.MedianM)
			if err != nil {
				return nil, fmt.Errorf("component %d: %w", ci+1, err)
			}
			nodes = []Node{{DiameterM: comp.MedianM, Number: 1, Intensity: in}}
		case Lognormal:
			s := comp.Width
			zmax := 8 + 6*s
			lo := math.Max(-zmax, math.Log(quadMinM/comp.MedianM)/s)
			hi := math.Min(zmax, math.Log(quadMaxM/comp.MedianM)/s)
			h := (hi - lo) / (quadNodes - 1)
			for j := 0; j < quadNodes; j++ {
				z := lo + float64(j)*h
				d := comp.MedianM * math.Exp(s*z)
				w := math.Exp(-z*z/2) * h
				if j == 0 || j == quadNodes-1 {
					w /= 2
				}
				in, err := scat(d)
				if err != nil {
					return nil, fmt.Errorf("component %d: %w", ci+1, err)
				}
				nd := Node{DiameterM: d}
				if comp.Basis == ByNumber {
					nd.Number, nd.Intensity = w, w*in
				} else {
					nd.Number, nd.Intensity = w/in, w
				}
				nodes = append(nodes, nd)
			}
		}
		var nTot, iTot float64
		for _, nd := range nodes {
			nTot += nd.Number
			iTot += nd.Intensity
		}
		f := 1.0
		if multi {
			f = comp.Fraction
		}
		scale := f / iTot
		if multi && p.FractionBasis == ByNumber {
			scale = f / nTot
		}
		for i := range nodes {
			nodes[i].Number *= scale
			nodes[i].Intensity *= scale
			nodes[i].Component = ci
			nodes[i].RatePerS = rate(nodes[i].DiameterM)
		}
		m.Nodes = append(m.Nodes, nodes...)
	}
	var nTot, iTot float64
	for _, nd := range m.Nodes {
		nTot += nd.Number
		iTot += nd.Intensity
	}
	if !(iTot > 0) || !(nTot > 0) || math.IsInf(iTot, 0) || math.IsInf(nTot, 0) {
		return nil, fmt.Errorf("population weights do not add up to a positive number")
	}
	for i := range m.Nodes {
		m.Nodes[i].Number /= nTot
		m.Nodes[i].Intensity /= iTot
	}
	m.Rates = make([]float64, len(m.Nodes))
	m.Weights = make([]float64, len(m.Nodes))
	for i, nd := range m.Nodes {
		m.Rates[i], m.Weights[i] = nd.RatePerS, nd.Intensity
	}
	g, mu2 := moments(m.Rates, m.Weights)
	m.Truth = Truth{
		GammaMeanPerS:   g,
		Mu2PerS2:        mu2,
		PDI:             mu2 / (g * g),
		ZAvgM:           dls.BoltzmannJPerK * c.TemperatureK * m.Q * m.Q / (3 * math.Pi * c.ViscosityPaS * g),
		DiffusionM2PerS: g / (m.Q * m.Q),
	}
	// Coarse spectrum for the noise model.
	for ci := range p.Components {
		var r, w []float64
		for _, nd := range m.Nodes {
			if nd.Component == ci {
				r, w = append(r, nd.RatePerS), append(w, nd.Intensity)
			}
		}
		wc := 0.0
		for _, x := range w {
			wc += x
		}
		gc, mc := moments(r, w)
		if len(r) == 1 {
			m.noise = append(m.noise, rateWeight{gc, wc})
			continue
		}
		sd := math.Sqrt(math.Min(mc/(gc*gc), 0.81))
		m.noise = append(m.noise, rateWeight{gc * (1 - sd), wc / 2}, rateWeight{gc * (1 + sd), wc / 2})
	}
	return m, nil
}

// moments returns the weighted mean and variance of x.
func moments(x, w []float64) (mean, variance float64) {
	var sw float64
	for i := range x {
		mean += w[i] * x[i]
		sw += w[i]
	}
	mean /= sw
	for i := range x {
		d := x[i] - mean
		variance += w[i] * d * d
	}
	return mean, variance / sw
}

// G1 returns the field autocorrelation g1(τ) = Σ wₖ exp(−Γₖ τ) at lag tauS
// seconds.
func (m *Model) G1(tauS float64) float64 {
	s := 0.0
	for i, r := range m.Rates {
		s += m.Weights[i] * math.Exp(-r*tauS)
	}
	return s
}
