package uncert

import (
	"fmt"
	"math"
	"slices"
)

// Extend returns a copy of the budget b with the components extra added
// and the combination done again over all of them: u_c, the shares, U,
// ν_eff and the Student factor, as ZAverage combines (GUM 5.1.2, G.4.1).
// Each extra component is given with its Value, StandardUncertainty,
// Sensitivity (nm per unit), Unit, DOF (0: infinite, as for Type B) and
// Basis; Extend computes its ContributionNm. Components for the
// corrections a pipeline applies (the medium's volume fraction, a
// viscosity model, k_D) enter this way. Errors wrap ErrBadInput: an
// uncertainty that is negative or not finite, or a component whose
// contribution is not finite. It panics for a nil b.
func Extend(b *Budget, extra ...Component) (*Budget, error) {
	if b == nil {
		panic("uncert: Extend needs a budget")
	}
	out := *b
	out.Components = slices.Clone(b.Components)
	out.Notes = slices.Clone(b.Notes)
	out.Unstated = slices.Clone(b.Unstated)
	for _, c := range extra {
		if !(c.StandardUncertainty >= 0) || math.IsInf(c.StandardUncertainty, 0) {
			return nil, fmt.Errorf("%s: standard uncertainty %g is not a non-negative number: %w", c.Name, c.StandardUncertainty, ErrBadInput)
		}
		c.ContributionNm = 0
		if c.StandardUncertainty != 0 {
			c.ContributionNm = c.Sensitivity * c.StandardUncertainty
		}
		if math.IsNaN(c.ContributionNm) || math.IsInf(c.ContributionNm, 0) || math.IsNaN(c.Value) || math.IsInf(c.Value, 0) {
			return nil, fmt.Errorf("%s: contribution is not finite: %w", c.Name, ErrBadInput)
		}
		out.Components = append(out.Components, c)
	}
	combine(&out)
	return &out, nil
}

// Scaled returns the budget of f·d from the budget b of d, for a size
// corrected by an exact factor f > 0 (the size at infinite dilution,
// d0 = d·(1 + k_D·φ), before the terms of k_D and φ are added with
// Extend): the value, every sensitivity and contribution and u_c times f;
// shares and degrees of freedom unchanged. It panics for a nil b or a
// factor that is not a positive finite number.
func Scaled(b *Budget, f float64) *Budget {
	if b == nil || !(f > 0) || math.IsInf(f, 0) {
		panic("uncert: Scaled needs a budget and a positive factor")
	}
	out := *b
	out.ZAvgNm = b.ZAvgNm * f
	out.Components = slices.Clone(b.Components)
	for i := range out.Components {
		out.Components[i].Sensitivity *= f
		out.Components[i].ContributionNm *= f
	}
	out.Notes = slices.Clone(b.Notes)
	out.Unstated = slices.Clone(b.Unstated)
	combine(&out)
	return &out
}

// combine redoes u_c, the shares, U, ν_eff and the Student factor of b
// from its components' contributions.
func combine(b *Budget) {
	_ = recombine(b) // Extend and Scaled check their inputs; a non-finite total stays visible in b
}

// SetBasis replaces the basis of the component named name in b (e.g. to
// say that a refractive index's uncertainty was stated with it), and
// reports whether b has such a component.
func SetBasis(b *Budget, name, basis string) bool {
	for i := range b.Components {
		if b.Components[i].Name == name {
			b.Components[i].Basis = basis
			return true
		}
	}
	return false
}
