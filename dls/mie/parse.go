package mie

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// ParseComplexIndex parses a complex refractive index written as
// "1.59+0.0i", "1.59", "0.2+3.1i" or "(1.5+0.1i)"; spaces are ignored.
// The convention is Bohren & Huffman's m = n + ik with k ≥ 0 for an
// absorbing material: a negative imaginary part is an error (data from the
// other common convention, n − ik, must be entered with the sign of k
// flipped). The real part must be positive and both parts finite.
func ParseComplexIndex(s string) (complex128, error) {
	t := strings.Map(func(r rune) rune {
		if r == ' ' || r == '\t' {
			return -1
		}
		return r
	}, s)
	if t == "" {
		return 0, fmt.Errorf("mie: empty refractive index: %w", ErrInvalidArgument)
	}
	m, err := strconv.ParseComplex(t, 128)
	if err != nil {
		return 0, fmt.Errorf("mie: refractive index %q (want a form like 1.59+0.01i): %w", s, err)
	}
	n, k := real(m), imag(m)
	switch {
	case math.IsNaN(n) || math.IsInf(n, 0) || math.IsNaN(k) || math.IsInf(k, 0):
		return 0, fmt.Errorf("mie: refractive index %q is not finite: %w", s, ErrInvalidArgument)
	case n <= 0:
		return 0, fmt.Errorf("mie: refractive index %q: real part must be positive: %w", s, ErrInvalidArgument)
	case k < 0:
		return 0, fmt.Errorf("mie: refractive index %q has a negative imaginary part: the convention here is m = n + ik "+
			"with k ≥ 0 for absorption (Bohren & Huffman); write n − ik data with +k, e.g. %s: %w",
			s, FormatComplexIndex(complex(n, -k)), ErrInvalidArgument)
	}
	return complex(n, k+0), nil // +0 turns −0 into 0
}

// FormatComplexIndex writes m as ParseComplexIndex reads it, e.g.
// "1.59+0i" or "0.1838+3.4313i", with the shortest digits that round-trip.
func FormatComplexIndex(m complex128) string {
	sign := "+"
	if math.Signbit(imag(m)) {
		sign = "-"
	}
	return strconv.FormatFloat(real(m), 'g', -1, 64) + sign + strconv.FormatFloat(math.Abs(imag(m)), 'g', -1, 64) + "i"
}
