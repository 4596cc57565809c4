package dls

import (
	"errors"
	"math"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// TestStrconvAcceptsMore records what strconv.ParseFloat (Go 1.26) reads
// that ParseNumber must not: it is why ParseNumber exists. Each row is the
// standard library's documented behaviour (the strconv package
// documentation: underscores "as defined by the Go syntax", hexadecimal
// floating point, "inf"/"infinity"/"nan"; a value too small rounds to 0
// without an error).
func TestStrconvAcceptsMore(t *testing.T) {
	tests := []struct {
		in   string
		want float64
	}{
		{"1_0", 10}, // underscores need a base prefix in Go literals, but ParseFloat accepts this one
		{"0x1p0", 1},
		{"0X1P-2", 0.25},
		{"0x1.ep0", 1.875}, // testdata/bad/hex_value.csv
		{"1e-400", 0},
		{"infinity", math.Inf(1)},
	}
	for _, tc := range tests {
		got, err := strconv.ParseFloat(tc.in, 64)
		if err != nil || got != tc.want {
			t.Errorf("strconv.ParseFloat(%q) = %g, %v; this test expects %g, nil", tc.in, got, err, tc.want)
		}
		if _, err := ParseNumber(tc.in); err == nil {
			t.Errorf("ParseNumber(%q) accepted it", tc.in)
		}
	}
	if v, err := strconv.ParseFloat("nan", 64); err != nil || !math.IsNaN(v) {
		t.Errorf(`strconv.ParseFloat("nan") = %g, %v; want NaN, nil`, v, err)
	}
}

// TestParseNumber: each accepted and each rejected form of the grammar.
// The accepted values are exact decimal arithmetic (the float64 nearest
// the text, IEEE 754-2019 round to nearest), so they compare with ==.
func TestParseNumber(t *testing.T) {
	ok := []struct {
		in   string
		want float64
	}{
		{"25", 25},
		{"-1.5e-3", -0.0015},
		{".5", 0.5},
		{"5.", 5},
		{"+1", 1}, // a leading '+' is allowed: common in instrument exports
		{"+1.0E+00", 1},
		{"007", 7},
		{"1e5", 1e5},
		{"1E-5", 1e-5},
		{"-0", math.Copysign(0, -1)},
		{"0e-400", 0},        // zero mantissa: 0 is the exact value, not an underflow
		{"1e-310", 1e-310},   // subnormal, kept
		{"4.9e-324", 5e-324}, // the smallest subnormal
		{"1.7976931348623157e308", math.MaxFloat64},
		{"0.000001", 1e-6},
	}
	for _, tc := range ok {
		got, err := ParseNumber(tc.in)
		if err != nil || got != tc.want || math.Signbit(got) != math.Signbit(tc.want) {
			t.Errorf("ParseNumber(%q) = %g, %v; want %g", tc.in, got, err, tc.want)
		}
	}
	bad := []struct {
		in       string
		sentinel error
		says     string
	}{
		{"", ErrNotANumber, "empty"},
		{".", ErrNotANumber, ""},
		{"-", ErrNotANumber, ""},
		{"+", ErrNotANumber, ""},
		{"e5", ErrNotANumber, ""},
		{".e5", ErrNotANumber, ""},
		{"1e", ErrNotANumber, "exponent"},
		{"1e+", ErrNotANumber, "exponent"},
		{"1.5.", ErrNotANumber, ""},
		{"--1", ErrNotANumber, ""},
		{"+-1", ErrNotANumber, ""},
		{"1_0", ErrNotANumber, "'_'"},
		{"1_000.5", ErrNotANumber, "'_'"},
		{"0x1p0", ErrNotANumber, "hexadecimal"},
		{"-0x10", ErrNotANumber, "hexadecimal"},
		{"0X1P-2", ErrNotANumber, "hexadecimal"},
		{"inf", ErrNonFinite, "not finite"},
		{"+Inf", ErrNonFinite, "not finite"},
		{"-infinity", ErrNonFinite, "not finite"},
		{"NaN", ErrNonFinite, "not finite"},
		{"1 000", ErrNotANumber, "space"},
		{" 1", ErrNotANumber, "space"},
		{"1\t", ErrNotANumber, "space"},
		{"1,5", ErrNotANumber, "','"},
		{"1.9x2", ErrNotANumber, ""},
		{"1e999", ErrNonFinite, "overflows"},
		{"-1e999", ErrNonFinite, "overflows"},
		{"1e-400", ErrOutOfRange, "underflows"},
		{"-2.4e-324", ErrOutOfRange, "underflows"}, // below half the smallest subnormal
		{"0.0000000000000000000000000000000000000000000000000000000000001e-300", ErrOutOfRange, "underflows"},
		{"٣", ErrNotANumber, ""}, // an Arabic-Indic digit is not an ASCII digit
	}
	for _, tc := range bad {
		v, err := ParseNumber(tc.in)
		var ne *NumberError
		if !errors.As(err, &ne) || !errors.Is(err, tc.sentinel) || ne.Text != tc.in || v != 0 {
			t.Errorf("ParseNumber(%q) = %g, %v; want a *NumberError wrapping %v", tc.in, v, err, tc.sentinel)
			continue
		}
		if !strings.Contains(err.Error(), tc.says) || !strings.Contains(err.Error(), Excerpt(tc.in)) {
			t.Errorf("ParseNumber(%q): message %q does not quote the text (an excerpt) and say %q", tc.in, err, tc.says)
		}
		if n := strings.Count(err.Error(), tc.sentinel.Error()); n != 1 {
			t.Errorf("ParseNumber(%q): message %q says %q %d times, want once", tc.in, err, tc.sentinel, n)
		}
	}
}

// TestParseComplexNumber: the forms of strconv.ParseComplex with parts in
// ParseNumber's syntax.
func TestParseComplexNumber(t *testing.T) {
	ok := []struct {
		in   string
		want complex128
	}{
		{"1.59", 1.59},
		{"1.59+0.0i", 1.59},
		{"0.1838+3.4313i", complex(0.1838, 3.4313)},
		{"1.5-0.1i", complex(1.5, -0.1)},
		{"(1.5+0.1i)", complex(1.5, 0.1)},
		{"2i", complex(0, 2)},
		{"-2i", complex(0, -2)},
		{"1e-3+1e+2i", complex(1e-3, 1e2)},
		{"+1.5E+0-1E-1i", complex(1.5, -0.1)},
	}
	for _, tc := range ok {
		got, err := ParseComplexNumber(tc.in)
		if err != nil || got != tc.want {
			t.Errorf("ParseComplexNumber(%q) = %v, %v; want %v", tc.in, got, err, tc.want)
		}
		// strconv.ParseComplex reads the same texts to the same values.
		if ref, err := strconv.ParseComplex(tc.in, 128); err != nil || ref != got {
			t.Errorf("strconv.ParseComplex(%q) = %v, %v; ParseComplexNumber gave %v", tc.in, ref, err, got)
		}
	}
	bad := []struct {
		in       string
		sentinel error
	}{
		{"", ErrNotANumber},
		{"i", ErrNotANumber},
		{"1.59+i", ErrNotANumber},
		{"1.59+i0.01", ErrNotANumber},
		{"1.59 + 0.01i", ErrNotANumber},
		{"0x1p0+1i", ErrNotANumber},
		{"1+0x1p0i", ErrNotANumber},
		{"1_0+1i", ErrNotANumber},
		{"inf+1i", ErrNonFinite},
		{"1+nani", ErrNonFinite},
		{"1e-400+1i", ErrOutOfRange},
		{"(1+2i", ErrNotANumber},
		{"polystyrene", ErrNotANumber},
	}
	for _, tc := range bad {
		_, err := ParseComplexNumber(tc.in)
		var ne *NumberError
		if !errors.As(err, &ne) || !errors.Is(err, tc.sentinel) {
			t.Errorf("ParseComplexNumber(%q): %v; want a *NumberError wrapping %v", tc.in, err, tc.sentinel)
		}
	}
}

// grammar is ParseNumber's syntax written independently as a regular
// expression, for the fuzz target.
var grammar = regexp.MustCompile(`^[+-]?([0-9]+(\.[0-9]*)?|\.[0-9]+)([eE][+-]?[0-9]+)?$`)

// FuzzParseNumber checks ParseNumber against two outside references: the
// grammar as a regular expression and strconv.ParseFloat (correctly
// rounded, Go's standard library). A text is accepted exactly when it
// matches the grammar and ParseFloat gives a finite value that is not an
// underflow to zero; the value is ParseFloat's; and it round-trips through
// strconv.FormatFloat 'g' -1 within one ulp (the shortest form that
// reads back exactly, so in fact to the bit).
func FuzzParseNumber(f *testing.F) {
	for _, s := range []string{"25", "-1.5e-3", ".5", "5.", "+1", "1_0", "0x1p0", "1e-400", "1e999", "inf", "nan",
		"1 0", "1,5", "4.9e-324", "2.4e-324", "1.7976931348623157e308", "1.7976931348623159e308", "0e-999", "-0"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		v, err := ParseNumber(s)
		ref, refErr := strconv.ParseFloat(s, 64)
		want := grammar.MatchString(s) && refErr == nil && !math.IsInf(ref, 0) &&
			!(ref == 0 && strings.ContainsAny(strings.SplitN(strings.ToLower(s), "e", 2)[0], "123456789"))
		if (err == nil) != want {
			t.Fatalf("ParseNumber(%q) = %g, %v; accepted should be %v (strconv: %g, %v)", s, v, err, want, ref, refErr)
		}
		if err != nil {
			var ne *NumberError
			if !errors.As(err, &ne) || ne.Text != s || !(errors.Is(err, ErrNotANumber) || errors.Is(err, ErrNonFinite) || errors.Is(err, ErrOutOfRange)) {
				t.Fatalf("ParseNumber(%q): error %v is not a *NumberError with a sentinel", s, err)
			}
			return
		}
		if math.IsNaN(v) || math.IsInf(v, 0) || math.Float64bits(v) != math.Float64bits(ref) {
			t.Fatalf("ParseNumber(%q) = %g, strconv.ParseFloat gives %g", s, v, ref)
		}
		text := strconv.FormatFloat(v, 'g', -1, 64)
		back, err := ParseNumber(text)
		if err != nil {
			t.Fatalf("ParseNumber(FormatFloat(%g) = %q): %v", v, text, err)
		}
		if d := math.Abs(back - v); d > ulp(v) {
			t.Fatalf("%q → %g → %q → %g: off by %g, more than 1 ulp", s, v, text, back, d)
		}
	})
}

// FuzzParseComplexNumber: whatever parses has finite parts, agrees with
// strconv.ParseComplex, and round-trips through strconv.FormatComplex.
func FuzzParseComplexNumber(f *testing.F) {
	for _, s := range []string{"1.59+0.0i", "(1.5-0.1i)", "2i", "1e-3+1e+2i", "0x1p0+1i", "1+nani", "1.59 + 0.01i"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		c, err := ParseComplexNumber(s)
		if err != nil {
			var ne *NumberError
			if !errors.As(err, &ne) {
				t.Fatalf("ParseComplexNumber(%q): error %v wraps no *NumberError", s, err)
			}
			return
		}
		if math.IsNaN(real(c)) || math.IsInf(real(c), 0) || math.IsNaN(imag(c)) || math.IsInf(imag(c), 0) {
			t.Fatalf("ParseComplexNumber(%q) = %v", s, c)
		}
		if ref, err := strconv.ParseComplex(s, 128); err != nil || ref != c {
			t.Fatalf("ParseComplexNumber(%q) = %v, strconv.ParseComplex gives %v, %v", s, c, ref, err)
		}
		text := strconv.FormatComplex(c, 'g', -1, 128)
		back, err := ParseComplexNumber(text)
		if err != nil || back != c {
			t.Fatalf("%q → %v → %q → %v, %v", s, c, text, back, err)
		}
	})
}

// ulp is the spacing of float64 values at v.
func ulp(v float64) float64 {
	v = math.Abs(v)
	return math.Nextafter(v, math.Inf(1)) - v
}
