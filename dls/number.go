package dls

import (
	"fmt"
	"strconv"
	"strings"
)

// ParseNumber is the one reader of numbers in user text: the cells and
// metadata values of correlogram files, sample sheets, specifications,
// solvent files, simulation plans and command-line metadata all go through
// it. It reads plain decimal notation and nothing else:
//
//	number   = [sign] mantissa [exponent]
//	sign     = "+" | "-"
//	mantissa = digits ["." [digits]] | "." digits
//	exponent = ("e" | "E") [sign] digits
//	digits   = one or more of 0 … 9
//
// so 25, -1.5e-3, .5, 5., 007 and +1.0E+00 are numbers (a leading '+' is
// common in instrument exports). Not read, unlike strconv.ParseFloat: Go's
// digit separators ("1_0", which ParseFloat takes for 10), hexadecimal
// ("0x1p0"), "inf", "infinity" and "nan" in any case, and any space inside
// (callers trim surrounding space). A decimal comma is not read here; the
// correlogram reader turns one into a point first where its format allows
// it.
//
// The value is the correctly rounded float64 of the text (it is
// strconv.ParseFloat's on the texts accepted). A value beyond float64's
// largest (1e999) is an error wrapping ErrNonFinite, and so are the
// spellings of infinity and NaN; a non-zero mantissa whose value rounds to
// zero (1e-400) is an error wrapping ErrOutOfRange. Subnormal values
// (1e-310) are kept. Every error is a *NumberError.
func ParseNumber(s string) (float64, error) {
	if reason, sentinel, ok := numberSyntax(s); !ok {
		return 0, &NumberError{Text: strings.Clone(s), Reason: reason, Err: sentinel}
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil { // the syntax is checked: only a range error is left
		return 0, &NumberError{Text: strings.Clone(s), Reason: "overflows float64", Err: ErrNonFinite}
	}
	if v == 0 && nonZeroMantissa(s) {
		return 0, &NumberError{Text: strings.Clone(s), Reason: "underflows float64 (a value this small rounds to 0)", Err: ErrOutOfRange}
	}
	return v, nil
}

// NumberError is a text that ParseNumber does not read. Err is the
// sentinel: ErrNotANumber (syntax), ErrNonFinite (infinity, NaN, or too
// large for float64) or ErrOutOfRange (too small: it would round to 0).
type NumberError struct {
	Text   string // the text as given
	Reason string // what is wrong, e.g. "is hexadecimal"; "" for plain bad syntax
	Err    error
}

func (e *NumberError) Error() string {
	if e.Reason == "" {
		return fmt.Sprintf("%s: %v", Excerpt(e.Text), e.Err)
	}
	return fmt.Sprintf("%s %s: %v", Excerpt(e.Text), e.Reason, e.Err)
}

func (e *NumberError) Unwrap() error { return e.Err }

// numberSyntax checks s against the grammar of ParseNumber. When it does
// not match, it says why and which sentinel applies.
func numberSyntax(s string) (reason string, sentinel error, ok bool) {
	i := 0
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		i++
	}
	digits := func() int {
		j := i
		for i < len(s) && s[i] >= '0' && s[i] <= '9' {
			i++
		}
		return i - j
	}
	n := digits()
	if i < len(s) && s[i] == '.' {
		i++
		n += digits()
	}
	if n > 0 && i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		i++
		if i < len(s) && (s[i] == '+' || s[i] == '-') {
			i++
		}
		if digits() == 0 {
			return "has an exponent without digits", ErrNotANumber, false
		}
	}
	if n > 0 && i == len(s) {
		return "", nil, true
	}
	return syntaxReason(s)
}

// syntaxReason names what is wrong with a text that is not a number.
func syntaxReason(s string) (string, error, bool) {
	body := strings.TrimLeft(s, "+-")
	switch lower := strings.ToLower(body); {
	case s == "":
		return "is empty", ErrNotANumber, false
	case lower == "inf" || lower == "infinity" || lower == "nan":
		return "", ErrNonFinite, false // the sentinel says it: "NaN": not finite
	case strings.HasPrefix(lower, "0x"):
		return "is hexadecimal (write decimal digits)", ErrNotANumber, false
	case strings.ContainsAny(s, " \t\u00a0"):
		return "holds a space", ErrNotANumber, false
	case strings.Contains(s, "_"):
		return "holds '_' (write the digits without separators)", ErrNotANumber, false
	case strings.Contains(s, ","):
		return "holds ',' (write the decimal mark as a point)", ErrNotANumber, false
	}
	return "", ErrNotANumber, false
}

// nonZeroMantissa reports whether a text of ParseNumber's grammar has a
// digit other than 0 before its exponent.
func nonZeroMantissa(s string) bool {
	for i := 0; i < len(s); i++ {
		switch c := s[i]; {
		case c == 'e' || c == 'E':
			return false
		case c >= '1' && c <= '9':
			return true
		}
	}
	return false
}

// ParseComplexNumber reads a complex number whose parts are written as
// ParseNumber reads them: "a", "a+bi", "a-bi" or "bi", optionally in
// parentheses, with no spaces (the forms of strconv.ParseComplex, without
// its hexadecimal, digit separators, infinities and NaN). An error names
// the part at fault and wraps its *NumberError.
func ParseComplexNumber(s string) (complex128, error) {
	t := s
	if strings.HasPrefix(t, "(") && strings.HasSuffix(t, ")") && len(t) >= 2 {
		t = t[1 : len(t)-1]
	}
	if !strings.HasSuffix(t, "i") {
		re, err := ParseNumber(t)
		if err != nil {
			return 0, fmt.Errorf("%s is not a complex number such as 1.59+0.01i: %w", Excerpt(s), err)
		}
		return complex(re, 0), nil
	}
	t = t[:len(t)-1]
	// The imaginary part starts at the last sign that neither opens the
	// text nor follows an exponent mark.
	k := -1
	for j := len(t) - 1; j > 0; j-- {
		if (t[j] == '+' || t[j] == '-') && t[j-1] != 'e' && t[j-1] != 'E' {
			k = j
			break
		}
	}
	reText, imText := "", t
	if k > 0 {
		reText, imText = t[:k], t[k:]
	}
	var re float64
	if reText != "" {
		var err error
		if re, err = ParseNumber(reText); err != nil {
			return 0, fmt.Errorf("%s: real part: %w", Excerpt(s), err)
		}
	}
	im, err := ParseNumber(imText)
	if err != nil {
		return 0, fmt.Errorf("%s: imaginary part: %w", Excerpt(s), err)
	}
	return complex(re, im), nil
}
