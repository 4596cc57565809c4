package dls

import (
	"fmt"
	"strings"
)

// ParseAssignment reads a "key=value" metadata assignment (as given on the
// command line) into a Param of the given origin; where names the place
// it came from. The key must be one of the input contract's keys.
func ParseAssignment(s string, origin Origin, where string) (Param, error) {
	k, v, ok := strings.Cut(s, "=")
	k = strings.TrimSpace(k)
	if !ok || k == "" {
		return Param{}, fmt.Errorf("%q: want key=value, e.g. temperature_c=25", s)
	}
	if !IsMetadataKey(k) {
		return Param{}, fmt.Errorf("%q: unknown key %q; known keys: %s", s, k, strings.Join(MetadataKeys(), ", "))
	}
	return Param{Key: k, Value: strings.TrimSpace(v), Origin: origin, Where: where}, nil
}

// Assignments writes parameters back as "key=value" texts, in order.
func Assignments(ps []Param) []string {
	out := make([]string, len(ps))
	for i, p := range ps {
		out[i] = p.Key + "=" + p.Value
	}
	return out
}
