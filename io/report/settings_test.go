package report

import (
	"reflect"
	"sort"
	"strings"
	"testing"
)

// TestSettingsKeysSorted: the settings record keeps its fields in the
// sorted order of their JSON keys (what results.json and manifest.json
// have always shown), and every field has a snake_case key, so a new
// setting cannot be added out of place or unnamed.
func TestSettingsKeysSorted(t *testing.T) {
	ty := reflect.TypeFor[Settings]()
	var keys []string
	for f := range ty.Fields() {
		k, _, _ := strings.Cut(f.Tag.Get("json"), ",")
		if k == "" || k != strings.ToLower(k) || strings.ContainsAny(k, " -") {
			t.Errorf("field %s has JSON key %q, want snake_case", f.Name, k)
		}
		keys = append(keys, k)
	}
	if !sort.StringsAreSorted(keys) {
		t.Errorf("JSON keys not sorted: %v", keys)
	}
	if len(keys) < 30 {
		t.Errorf("only %d settings recorded", len(keys))
	}
}
