package main

import (
	"fmt"
	"strings"

	"dlsbatch/dls"
	"dlsbatch/io/csvdata"
)

// enumFlag is a string flag restricted to a fixed set of values; Set names
// the allowed ones in its error.
type enumFlag struct {
	value   string
	allowed []string
}

func newEnum(def string, allowed ...string) *enumFlag { return &enumFlag{value: def, allowed: allowed} }

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

// paramsFlag collects repeated key=value metadata settings, each checked
// as it is parsed (a bad value is a usage error).
type paramsFlag struct {
	flag   string // flag name, for provenance
	origin dls.Origin
	params []dls.Param
}

func (f *paramsFlag) String() string { return strings.Join(dls.Assignments(f.params), ",") }

func (f *paramsFlag) Type() string { return "key=value" }

func (f *paramsFlag) Set(s string) error {
	p, err := csvdata.ParseAssignment(s, f.origin, "--"+f.flag+" "+s)
	if err == nil {
		f.params = append(f.params, p)
	}
	return err
}
