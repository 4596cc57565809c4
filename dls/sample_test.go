package dls

import (
	"encoding/json"
	"errors"
	"strings"
	"testing"
)

// TestParseRole: the three roles of the input contract in any letter
// case, and an error that lists them for anything else.
func TestParseRole(t *testing.T) {
	cases := []struct {
		in   string
		want Role
		ok   bool
	}{
		{"sample", RoleSample, true},
		{"Reference", RoleReference, true},
		{"BLANK", RoleBlank, true},
		{"standard", "", false},
		{"", "", false},
		{" reference", "", false}, // tables trim cells before parsing
		{"ſample", "", false},     // U+017F folds to 's' under EqualFold, but is no ASCII letter
	}
	for _, c := range cases {
		t.Run(c.in, func(t *testing.T) {
			got, err := ParseRole(c.in)
			if c.ok {
				if err != nil || got != c.want {
					t.Errorf("ParseRole(%q) = %q, %v; want %q", c.in, got, err, c.want)
				}
				return
			}
			if err == nil || !errors.Is(err, ErrBadMetadata) || !strings.Contains(err.Error(), "sample, reference, blank") {
				t.Errorf("ParseRole(%q) error %v: want one listing the roles and wrapping ErrBadMetadata", c.in, err)
			}
		})
	}
}

// TestRolesIsACopy: a caller changing the returned slice changes no later
// result.
func TestRolesIsACopy(t *testing.T) {
	r := Roles()
	r[0] = "changed"
	if Roles()[0] != RoleSample {
		t.Errorf("Roles() shares its backing array: %v", Roles())
	}
}

// TestTypedFieldsKeepJSON: the named string types encode as the plain
// strings they replaced (JSON strings, RFC 8259).
func TestTypedFieldsKeepJSON(t *testing.T) {
	s := Sample{Role: RoleReference, Flags: []Flag{{Code: "HIGH-PDI", Message: "m"}}, Verdict: &Verdict{Outcome: VerdictInvalid}}
	b, err := json.Marshal(s)
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{`"role":"reference"`, `"flags":[{"code":"HIGH-PDI","message":"m"}]`, `"outcome":"invalid"`} {
		if !strings.Contains(string(b), want) {
			t.Errorf("JSON %s lacks %s", b, want)
		}
	}
}

// TestMetadataKeysIsACopy: changing the returned slice changes neither a
// later result nor IsMetadataKey.
func TestMetadataKeysIsACopy(t *testing.T) {
	k := MetadataKeys()
	if len(k) == 0 || k[0] != KeySample {
		t.Fatalf("MetadataKeys() = %v", k)
	}
	k[0] = "changed"
	if MetadataKeys()[0] != KeySample || IsMetadataKey("changed") || !IsMetadataKey(KeySample) {
		t.Errorf("MetadataKeys() shares its backing array")
	}
}

// TestParseMeasuredAt: ISO 8601 extended format date and time (ISO
// 8601-1:2019), with or without seconds, fraction and UTC offset; the
// instants are checked against Unix times computed by hand.
func TestParseMeasuredAt(t *testing.T) {
	cases := []struct {
		in     string
		unix   int64 // seconds since 1970-01-01T00:00Z, the text read as UTC where it has no offset
		offset bool
		ok     bool
	}{
		{"2024-05-02T21:14:05Z", 1714684445, true, true},
		{"2024-05-02T23:14:05+02:00", 1714684445, true, true},
		{"2024-05-02T21:14Z", 1714684440, true, true},
		{"2024-05-02T21:14:05", 1714684445, false, true},
		{"2024-05-02 21:14:05.25", 1714684445, false, true},
		{" 2024-05-02T21:14 ", 1714684440, false, true},
		{"2024-05-02", 0, false, false},
		{"02.05.2024 21:14", 0, false, false},
		{"2024-13-02T21:14", 0, false, false},
	}
	for _, c := range cases {
		tm, off, err := ParseMeasuredAt(c.in)
		if (err == nil) != c.ok {
			t.Errorf("%q: error %v, want ok %v", c.in, err, c.ok)
			continue
		}
		if c.ok && (tm.Unix() != c.unix || off != c.offset) {
			t.Errorf("%q: %d offset %v, want %d offset %v", c.in, tm.Unix(), off, c.unix, c.offset)
		}
		if !c.ok && !errors.Is(err, ErrBadMetadata) {
			t.Errorf("%q: %v does not wrap ErrBadMetadata", c.in, err)
		}
	}
}
