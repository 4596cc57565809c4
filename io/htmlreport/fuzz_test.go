package htmlreport

import (
	"bytes"
	"strings"
	"testing"

	"dlsbatch/dls"
)

// asText is what a user string becomes on the page: invalid UTF-8 and
// the control characters XML forbids turn into U+FFFD (cleanText), and
// XML reads a carriage return as a newline.
func asText(s string) string {
	var b bytes.Buffer
	b.WriteString(s)
	cleanText(&b)
	return strings.Join(strings.Fields(b.String()), " ")
}

// Whatever the sample name, lot, file name and message (any bytes), the
// pages stay well-formed, add no element, and show the strings as text.
func FuzzSampleStrings(f *testing.F) {
	f.Add(hostileName, hostileLot, hostileFile, hostileMessage)
	f.Add("a", "", "x.csv", "")
	f.Add(`]]><![CDATA[`, "&amp;", "<!--", `'"`)
	f.Add("</style><script>x</script>", "{{.}}", "javascript:alert(1)", "\u2028\u00a0")
	f.Add("\x00\x01", "\xff", "a\rb", "\x7f\ufffe")
	f.Fuzz(func(t *testing.T, name, lot, file, msg string) {
		r := &Report{
			Results: []*dls.Result{{Identity: dls.Identity{File: file, Sample: name, Run: lot, Status: dls.StatusWarn, Message: msg},
				Params: []dls.Param{{Key: name, Value: msg, Origin: dls.OriginFile, Where: file}}}},
			Samples: []*dls.Sample{{Name: name, Lot: lot, Product: msg, Role: dls.Role(file), Runs: []int{0}, Used: []int{0},
				Flags:   []dls.Flag{{Code: dls.FlagCode(lot), Message: msg}},
				Verdict: &dls.Verdict{Outcome: dls.VerdictFail, Reason: msg, Checks: []dls.Check{{Quantity: name, Limit: lot, Value: 1}}}}},
		}
		r, err := prepare(r)
		if err != nil {
			t.Fatal(err)
		}
		page, _, err := renderSample(&writer{}, r, 0)
		if err != nil {
			t.Fatal(err)
		}
		doc := parsePage(t, page)
		if got, want := doc.one(t, "h1", elem("h1")).text(), asText(name); got != want {
			t.Errorf("h1 %q, want %q", got, want)
		}
		for _, el := range []string{"script", "img", "iframe", "object"} {
			if len(doc.all(elem(el))) != 0 {
				t.Errorf("a <%s> element appeared", el)
			}
		}
		var b bytes.Buffer
		if err := renderIndex(&b, r, timeRange{}); err != nil {
			t.Fatal(err)
		}
		idx := parsePage(t, b.Bytes())
		if a := idx.one(t, "sample link", elemClass("td", "name")).one(t, "a", elem("a")); a.Attr["href"] != "sample-0001.html" {
			t.Errorf("link %q", a.Attr["href"])
		}
	})
}
