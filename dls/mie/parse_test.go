package mie

import (
	"errors"
	"strconv"
	"strings"
	"testing"
)

func TestParseComplexIndex(t *testing.T) {
	tests := []struct {
		in      string
		want    complex128
		wantErr string
	}{
		{"1.59+0.0i", 1.59, ""},
		{"1.59", 1.59, ""},
		{"0.2+3.1i", 0.2 + 3.1i, ""},
		{" 1.33 + 0.001i ", 1.33 + 0.001i, ""},
		{"(1.5+0.1i)", 1.5 + 0.1i, ""},
		{"1.5-0i", 1.5, ""},
		{"1.59-0.01i", 0, "n + ik"},
		{"", 0, "empty"},
		{"abc", 0, "invalid syntax"},
		{"1.5+0.1j", 0, "invalid syntax"},
		{"3.1i", 0, "real part"},
		{"-1.5", 0, "real part"},
		{"NaN", 0, "not finite"},
		{"1.5+Infi", 0, "not finite"},
		{"1e400", 0, "out of range"},
	}
	for _, tc := range tests {
		got, err := ParseComplexIndex(tc.in)
		if tc.wantErr != "" {
			if err == nil || !strings.Contains(err.Error(), tc.wantErr) {
				t.Errorf("%q: error %v, want one mentioning %q", tc.in, err, tc.wantErr)
			}
			continue
		}
		if err != nil {
			t.Errorf("%q: %v", tc.in, err)
			continue
		}
		// Exact: decimal literals parse to the same nearest double.
		if got != tc.want {
			t.Errorf("%q = %v, want %v", tc.in, got, tc.want)
		}
	}
	_, err := ParseComplexIndex("1.5-0.1i")
	if !errors.Is(err, ErrInvalidArgument) || !strings.Contains(err.Error(), "1.5+0.1i") {
		t.Errorf("negative k: %v, want ErrInvalidArgument suggesting 1.5+0.1i", err)
	}
	var ne *strconv.NumError
	if _, err := ParseComplexIndex("1.5+x"); !errors.As(err, &ne) {
		t.Errorf("syntax error %v does not wrap *strconv.NumError", err)
	}
}

func TestFormatComplexIndex(t *testing.T) {
	for m, want := range map[complex128]string{1.59: "1.59+0i", 0.1838 + 3.4313i: "0.1838+3.4313i", 1.5 - 0.1i: "1.5-0.1i"} {
		if got := FormatComplexIndex(m); got != want {
			t.Errorf("%v: %q, want %q", m, got, want)
		}
	}
}
