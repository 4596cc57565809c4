package sim

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Basis says in which weighting a distribution or a fraction is stated.
type Basis int

// Bases of a distribution or of mixture fractions.
const (
	ByNumber    Basis = iota + 1 // share of the particle count
	ByIntensity                  // share of the scattered intensity
)

// String returns "number" or "intensity".
func (b Basis) String() string {
	switch b {
	case ByNumber:
		return "number"
	case ByIntensity:
		return "intensity"
	}
	return fmt.Sprintf("Basis(%d)", int(b))
}

func parseBasis(s string) (Basis, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "number":
		return ByNumber, nil
	case "intensity":
		return ByIntensity, nil
	}
	return 0, fmt.Errorf("weighting %q: want number or intensity", s)
}

// Shape is the form of one population component.
type Shape int

// Component shapes.
const (
	Mono      Shape = iota + 1 // every particle has the median diameter
	Lognormal                  // ln d is normal about ln(median) with standard deviation Width
)

// Component is one population of a sample.
type Component struct {
	Shape Shape
	// MedianM is the diameter of a monodisperse component, or the median
	// diameter of a lognormal one, in metres.
	MedianM float64
	// Width is the standard deviation of ln d of a lognormal component
	// (the geometric standard deviation is exp(Width)); ignored for Mono.
	Width float64
	// Basis is the weighting in which the lognormal is stated; ignored for
	// Mono.
	Basis Basis
	// Fraction is the share of this component in a mixture, in the
	// weighting Population.FractionBasis. A single component may leave it
	// zero.
	Fraction float64
}

// Population is a sample of one or more components.
type Population struct {
	Components []Component
	// FractionBasis is the weighting of the components' fractions; it must
	// be set when there is more than one component.
	FractionBasis Basis
}

// MaxComponents is the largest number of components a population may have.
const MaxComponents = 4

// Validate reports a population that cannot be simulated.
func (p *Population) Validate() error {
	if len(p.Components) == 0 {
		return errors.New("population has no component")
	}
	if len(p.Components) > MaxComponents {
		return fmt.Errorf("population has %d components, at most %d are supported", len(p.Components), MaxComponents)
	}
	sum := 0.0
	for i, c := range p.Components {
		switch {
		case c.Shape != Mono && c.Shape != Lognormal:
			return fmt.Errorf("component %d: unknown shape %d", i+1, int(c.Shape))
		case !(c.MedianM > 1e-10 && c.MedianM < 1e-4):
			return fmt.Errorf("component %d: diameter %g m is outside 0.1 nm … 100 µm", i+1, c.MedianM)
		case c.Shape == Lognormal && !(c.Width > 0 && c.Width <= 1.5):
			return fmt.Errorf("component %d: lognormal width %g is outside (0, 1.5]", i+1, c.Width)
		case c.Shape == Lognormal && c.Basis != ByNumber && c.Basis != ByIntensity:
			return fmt.Errorf("component %d: lognormal needs a weighting (number or intensity)", i+1)
		case c.Fraction < 0 || math.IsNaN(c.Fraction) || math.IsInf(c.Fraction, 0):
			return fmt.Errorf("component %d: fraction %g is not a non-negative number", i+1, c.Fraction)
		}
		sum += c.Fraction
	}
	if len(p.Components) > 1 {
		if p.FractionBasis != ByNumber && p.FractionBasis != ByIntensity {
			return errors.New("a mixture needs the weighting of its fractions (number or intensity)")
		}
		if math.Abs(sum-1) > 1e-6 {
			return fmt.Errorf("mixture fractions add up to %.6g, not 1", sum)
		}
	}
	return nil
}

// String writes the population in the notation ParsePopulation reads, with
// diameters in nm and fractions in percent, to 12 significant digits.
func (p Population) String() string {
	var b strings.Builder
	multi := len(p.Components) > 1
	for i, c := range p.Components {
		if i > 0 {
			b.WriteByte('+')
		}
		if multi {
			b.WriteString(strconv.FormatFloat(c.Fraction*100, 'g', 12, 64))
			b.WriteByte('%')
		}
		d := strconv.FormatFloat(c.MedianM*1e9, 'g', 12, 64)
		switch c.Shape {
		case Mono:
			fmt.Fprintf(&b, "mono(%snm)", d)
		case Lognormal:
			fmt.Fprintf(&b, "lognormal(%snm,%s,%s)", d, strconv.FormatFloat(c.Width, 'g', 12, 64), c.Basis)
		default:
			fmt.Fprintf(&b, "shape%d(%snm)", int(c.Shape), d)
		}
	}
	if multi {
		b.WriteString("@" + p.FractionBasis.String())
	}
	return b.String()
}

// ParsePopulation reads a population written as
//
//	population := component { "+" component } [ "@" weighting ]
//	component  := [ percent "%" ] shape
//	shape      := "mono(" size ")" | "lognormal(" size "," width "," weighting ")"
//	size       := number [ "nm" | "um" ]        (nm when no unit is given)
//	weighting  := "number" | "intensity"
//
// for example "mono(100nm)", "lognormal(120nm,0.31,intensity)" or
// "70%mono(30nm)+30%mono(300nm)@intensity". Spaces are ignored. A mixture
// must give every fraction (adding up to 100 %) and their weighting.
func ParsePopulation(s string) (Population, error) {
	var p Population
	src := strings.Join(strings.Fields(s), "")
	if src == "" {
		return p, errors.New("population: empty")
	}
	if at := strings.LastIndexByte(src, '@'); at >= 0 {
		b, err := parseBasis(src[at+1:])
		if err != nil {
			return p, fmt.Errorf("population %q: fraction %w", s, err)
		}
		p.FractionBasis = b
		src = src[:at]
	}
	parts := strings.Split(src, "+")
	for i, part := range parts {
		c, hasFrac, err := parseComponent(part)
		if err != nil {
			return Population{}, fmt.Errorf("population %q: component %d: %w", s, i+1, err)
		}
		if len(parts) > 1 && !hasFrac {
			return Population{}, fmt.Errorf("population %q: component %d: a mixture needs a percentage before each component", s, i+1)
		}
		if len(parts) == 1 && !hasFrac {
			c.Fraction = 1
		}
		p.Components = append(p.Components, c)
	}
	if len(parts) == 1 && p.FractionBasis == 0 {
		p.FractionBasis = ByIntensity
	}
	if err := p.Validate(); err != nil {
		return Population{}, fmt.Errorf("population %q: %w", s, err)
	}
	return p, nil
}

func parseComponent(s string) (c Component, hasFrac bool, err error) {
	if pc := strings.IndexByte(s, '%'); pc >= 0 {
		f, err := strconv.ParseFloat(s[:pc], 64)
		if err != nil || math.IsNaN(f) || math.IsInf(f, 0) {
			return c, false, fmt.Errorf("percentage %q is not a number", s[:pc])
		}
		c.Fraction = f / 100
		hasFrac = true
		s = s[pc+1:]
	}
	open := strings.IndexByte(s, '(')
	if open < 0 || !strings.HasSuffix(s, ")") {
		return c, hasFrac, fmt.Errorf("%q: want mono(size) or lognormal(size,width,weighting)", s)
	}
	name, args := strings.ToLower(s[:open]), strings.Split(s[open+1:len(s)-1], ",")
	switch name {
	case "mono":
		if len(args) != 1 {
			return c, hasFrac, fmt.Errorf("mono takes one argument (size), got %d", len(args))
		}
		c.Shape = Mono
	case "lognormal":
		if len(args) != 3 {
			return c, hasFrac, fmt.Errorf("lognormal takes three arguments (size, width, weighting), got %d", len(args))
		}
		c.Shape = Lognormal
		w, err := strconv.ParseFloat(args[1], 64)
		if err != nil {
			return c, hasFrac, fmt.Errorf("lognormal width %q is not a number", args[1])
		}
		c.Width = w
		if c.Basis, err = parseBasis(args[2]); err != nil {
			return c, hasFrac, err
		}
	default:
		return c, hasFrac, fmt.Errorf("unknown shape %q: want mono or lognormal", name)
	}
	c.MedianM, err = parseSize(args[0])
	return c, hasFrac, err
}

func parseSize(s string) (float64, error) {
	scale := 1e-9
	num := s
	switch {
	case strings.HasSuffix(strings.ToLower(s), "nm"):
		num = s[:len(s)-2]
	case strings.HasSuffix(strings.ToLower(s), "um"):
		num, scale = s[:len(s)-2], 1e-6
	}
	v, err := strconv.ParseFloat(num, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("size %q is not a number with unit nm or um", s)
	}
	return v * scale, nil
}
