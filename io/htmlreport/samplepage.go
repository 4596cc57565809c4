package htmlreport

import (
	"strconv"
	"unicode/utf8"
)

// Sample pages are written here rather than by html/template: a batch has
// one per sample, and their runs' plots and tables are most of the
// report's work, of which html/template's per-value escaping and
// reflection took more than everything else. The index (one page) keeps
// its template. Every user string goes through text, which escapes it for
// element text and double-quoted attribute values (the only two places a
// sample page puts one) and replaces what neither HTML nor XML text may
// hold, as cleanText does for the index; the tests and the fuzz target
// parse the pages as XML and compare the text.

// text appends s escaped: & < > " ' as character references; invalid
// UTF-8, C0 controls other than tab, newline and carriage return, DEL and
// the non-characters U+FFFE and U+FFFF as U+FFFD.
func (w *writer) text(s string) {
	last := 0
	for i := 0; i < len(s); {
		c := s[i]
		var esc string
		switch {
		case c == '&':
			esc = "&amp;"
		case c == '<':
			esc = "&lt;"
		case c == '>':
			esc = "&gt;"
		case c == '"':
			esc = "&#34;"
		case c == '\'':
			esc = "&#39;"
		case c >= 0x20 && c < 0x7f, c == '\t', c == '\n', c == '\r':
			i++
			continue
		case c < 0x80: // other C0 controls, DEL
			esc = "\uFFFD"
		default:
			r, n := utf8.DecodeRuneInString(s[i:])
			if !(r == utf8.RuneError && n <= 1) && r != 0xFFFE && r != 0xFFFF {
				i += n
				continue
			}
			w.b = append(w.b, s[last:i]...)
			w.str("\uFFFD")
			i += n
			last = i
			continue
		}
		w.b = append(w.b, s[last:i]...)
		w.str(esc)
		i++
		last = i
	}
	w.b = append(w.b, s[last:]...)
}

// tag appends <name class="class">, escaped text, </name>.
func (w *writer) tag(name, class, s string) {
	w.b = append(w.b, '<')
	w.str(name)
	if class != "" {
		w.str(` class="`)
		w.str(class)
		w.b = append(w.b, '"')
	}
	w.b = append(w.b, '>')
	w.text(s)
	w.str("</")
	w.str(name)
	w.b = append(w.b, '>')
}

// mark appends an outcome mark, as the "mark" template draws it.
func (w *writer) mark(m mark) {
	w.str(`<span class="mark `)
	w.str(m.Class)
	w.str(`">`)
	w.str(string(m.Shape()))
	w.b = append(w.b, ' ')
	w.text(m.Word)
	w.str(`</span>`)
}

func (w *writer) int(n int) { w.b = strconv.AppendInt(w.b, int64(n), 10) }

// head appends the document head and the caution, as the index's "head"
// and "caution" templates write them.
func (w *writer) head(p *page, bodyClass string) {
	w.str("<!DOCTYPE html>\n<html lang=\"en\" xmlns=\"http://www.w3.org/1999/xhtml\">\n<head>\n<meta charset=\"utf-8\"/>\n<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\"/>\n<meta name=\"generator\" content=\"")
	w.text(p.Tool)
	w.b = append(w.b, ' ')
	w.text(p.Version)
	w.str("\"/>\n")
	w.tag("title", "", p.Title)
	w.str("\n<style>\n")
	w.str(string(p.CSS))
	w.str("\n</style>\n</head>\n<body class=\"")
	w.str(bodyClass)
	w.str("\">\n")
}

func (w *writer) caution(s string) {
	w.str(`<p class="caution" role="note"><strong>Caution.</strong> `)
	w.text(s)
	w.str(`</p>`)
}

func (w *writer) footer(p *page) {
	w.str("\n<footer>\n")
	w.tag("p", "", p.Caution)
	w.str("\n<p class=\"made\">Made by ")
	if p.Tool != "" {
		w.text(p.Tool)
	} else {
		w.str("dlsbatch")
	}
	if p.Version != "" {
		w.b = append(w.b, ' ')
		w.text(p.Version)
	}
	w.str(". The pages work offline: nothing is loaded from elsewhere.</p>\n</footer>\n</body>\n</html>\n")
}

// checks appends the table of a verdict's checks.
func (w *writer) checks(rows []checkRow) {
	w.str("<table class=\"checks\">\n<thead><tr><th scope=\"col\">quantity</th><th scope=\"col\">limit</th><th scope=\"col\" class=\"num\">value</th><th scope=\"col\">result</th></tr></thead>\n<tbody>")
	for _, c := range rows {
		w.str("\n<tr><td>")
		if c.Label != "" {
			w.text(c.Label)
			w.b = append(w.b, ' ')
		}
		w.tag("code", "", c.Quantity)
		w.str("</td>")
		w.tag("td", "", c.Limit)
		w.tag("td", "num", c.Value)
		w.str("<td>")
		if c.Pass {
			w.mark(mark{"pass", "pass"})
		} else {
			w.mark(mark{"fail", "fail"})
		}
		w.str("</td></tr>")
	}
	w.str("\n</tbody>\n</table>")
}

// samplePage appends the page of one sample; sections are its run
// sections (see section).
func (w *writer) samplePage(p *samplePage, sections []byte) {
	w.head(&p.page, "sample")
	w.str("<nav class=\"pager\" aria-label=\"pages\">\n<a href=\"index.html\">all samples</a>")
	if p.Prev != "" {
		w.str(` · <a href="` + p.Prev + `" rel="prev">previous</a>`)
	}
	if p.Next != "" {
		w.str(` · <a href="` + p.Next + `" rel="next">next</a>`)
	}
	w.str("\n<span class=\"pos\">sample ")
	w.int(p.Number)
	w.str(" of ")
	w.int(p.Of)
	w.str("</span>\n</nav>\n<header>\n")
	w.tag("p", "kicker", p.Title)
	w.str("\n")
	w.tag("h1", "", p.Name)
	w.str("\n<p class=\"sub\">")
	if p.Lot != "" {
		w.str("lot ")
		w.text(p.Lot)
		w.str(" · ")
	}
	if p.Product != "" {
		w.str("product ")
		w.text(p.Product)
		w.str(" · ")
	}
	if p.Role != "" {
		w.str("role ")
		w.text(p.Role)
	}
	if p.Group != "" {
		w.str(" · group ")
		w.text(p.Group)
	}
	w.str("</p>\n</header>\n")
	w.caution(p.Caution)

	w.str("\n<main>\n<section class=\"verdict " + p.Verdict.Class + "\" aria-labelledby=\"verdict-h\">\n<h2 id=\"verdict-h\">Verdict</h2>\n<p class=\"big\">")
	w.mark(p.Verdict)
	if p.Reason != "" {
		w.str(` <span class="reason">— `)
		w.text(p.Reason)
		w.str(`</span>`)
	}
	w.str("</p>\n")
	switch {
	case len(p.Checks) > 0:
		w.checks(p.Checks)
	case p.HasVerdict:
		w.str("<p>No limit was evaluated.</p>")
	default:
		w.str("<p>No specification applies to this sample, so no limit was checked.</p>")
	}
	w.str("\n</section>\n\n<section aria-labelledby=\"summary-h\">\n<h2 id=\"summary-h\">Summary over the runs used</h2>\n<table class=\"kv summary\">\n<tbody>")
	for _, kv := range p.Summary {
		w.str("\n<tr><th scope=\"row\">")
		w.text(kv.Key)
		w.str("</th>")
		w.tag("td", "num", kv.Value)
		w.str("</tr>")
	}
	w.str("\n</tbody>\n</table>\n</section>\n\n<section aria-labelledby=\"flags-h\">\n<h2 id=\"flags-h\">Quality flags</h2>")
	if len(p.Flags) > 0 {
		w.str("\n<ul class=\"flaglist\">")
		for _, f := range p.Flags {
			w.str("\n<li>")
			w.tag("code", "flag", string(f.Code))
			w.b = append(w.b, ' ')
			w.text(f.Message)
			w.str("</li>")
		}
		w.str("\n</ul>")
	} else {
		w.str("\n<p>No quality flag was raised.</p>")
	}
	w.str("\n</section>\n\n<section aria-labelledby=\"runs-h\">\n<h2 id=\"runs-h\">Runs</h2>\n<table class=\"runs\">\n" +
		`<thead><tr><th scope="col" class="num">#</th><th scope="col">file</th><th scope="col">run</th><th scope="col">status</th><th scope="col">used</th><th scope="col" class="num">T (°C)</th><th scope="col" class="num">z-average (nm) ± SE</th><th scope="col" class="num">PDI</th><th scope="col">intensity peaks</th><th scope="col">message</th></tr></thead>` +
		"\n<tbody>")
	for _, r := range p.Runs {
		w.str("\n<tr")
		if r.Outlier != "" {
			w.str(` class="outlier"`)
		}
		w.str(`><td class="num"><a href="#` + r.Anchor + `">`)
		w.int(r.No)
		w.str("</a></td>")
		w.tag("td", "file", r.File)
		w.tag("td", "", r.Run)
		w.str("<td>")
		w.mark(r.Status)
		w.str("</td><td>")
		if r.Used {
			w.str("yes")
		} else {
			w.str("no")
		}
		if r.Outlier != "" {
			w.str(` <span class="outmark">▲ `)
			w.text(r.Outlier)
			w.str(`</span>`)
		}
		w.str("</td>")
		w.tag("td", "num", r.Temperature)
		w.tag("td", "num", r.ZAvg)
		w.tag("td", "num", r.PDI)
		w.tag("td", "", r.Peaks)
		w.tag("td", "msg", r.Message)
		w.str("</tr>")
	}
	if len(p.Runs) == 0 {
		w.str("\n<tr><td colspan=\"10\">No runs.</td></tr>")
	}
	w.str("\n</tbody>\n</table>\n<p class=\"note\"># is the row of the measurement in results.csv. Outliers are marked ▲ and were ")
	if p.Excluded {
		w.str("left out of")
	} else {
		w.str("kept in")
	}
	w.str(" the statistics.")
	if p.Plotted < len(p.Runs) {
		w.str(" Plots are shown for the first ")
		w.int(p.Plotted)
		w.str(" of ")
		w.int(len(p.Runs))
		w.str(" runs; every run is in the table above and below.")
	}
	w.str(" " + ResolutionLimit)
	w.str("</p>\n</section>\n")
	w.b = append(w.b, sections...)
	w.str("\n</main>")
	w.footer(&p.page)
}
