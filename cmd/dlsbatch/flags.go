package main

import (
	"fmt"
	"strings"

	"dlsbatch/dls"
)

// enumFlag is a string flag restricted to a fixed set of values; Set names
// the allowed ones in its error.
type enumFlag struct {
	value   string
	allowed []string
}

func newEnum(def string, allowed ...string) *enumFlag {
	return &enumFlag{value: def, allowed: allowed}
}

func (f *enumFlag) String() string { return f.value }
func (f *enumFlag) Type() string   { return strings.Join(f.allowed, "|") }
func (f *enumFlag) Set(s string) error {
	for _, a := range f.allowed {
		if s == a {
			f.value = s
			return nil
		}
	}
	return fmt.Errorf("%q is not one of %s", s, strings.Join(f.allowed, ", "))
}

// paramsFlag collects repeated key=value metadata settings.
type paramsFlag struct {
	flag   string // flag name, for provenance
	origin dls.Origin
	params []dls.Param
}

func (f *paramsFlag) String() string {
	s := make([]string, len(f.params))
	for i, p := range f.params {
		s[i] = p.Key + "=" + p.Value
	}
	return strings.Join(s, ",")
}

func (f *paramsFlag) Type() string { return "key=value" }

func (f *paramsFlag) Set(s string) error {
	k, v, ok := strings.Cut(s, "=")
	k = strings.TrimSpace(k)
	if !ok || k == "" {
		return fmt.Errorf("%q: want key=value, e.g. temperature_c=25", s)
	}
	if !dls.IsMetadataKey(k) {
		return fmt.Errorf("%q: unknown key %q; known keys: %s", s, k, strings.Join(dls.MetadataKeys(), ", "))
	}
	f.params = append(f.params, dls.Param{Key: k, Value: strings.TrimSpace(v), Origin: f.origin, Where: "--" + f.flag + " " + s})
	return nil
}
