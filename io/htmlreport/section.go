package htmlreport

import "strconv"

// The run sections of a sample page: its runs' plots and tables, the
// bulk of its bytes (see samplepage.go for how pages are written).

// section appends the section of one run: heading, message, plots (when
// plot is set), conditions, warnings, assumptions and parameters.
func (w *writer) section(d *runDetail, plots [3]func() bool, plot bool) {
	no := strconv.Itoa(d.No)
	w.str("\n<section class=\"run\" id=\"m" + no + "\" aria-labelledby=\"m" + no + "-h\">\n<h3 id=\"m" + no + "-h\">Measurement " + no + " ")
	w.tag("span", "file", d.File)
	if d.Run != "" {
		w.str(` <span class="runlabel">run `)
		w.text(d.Run)
		w.str(`</span>`)
	}
	w.b = append(w.b, ' ')
	w.mark(d.Status)
	if d.Outlier != "" {
		w.str(` <span class="outmark">▲ `)
		w.text(d.Outlier)
		w.str(`</span>`)
	}
	w.str("</h3>")
	if d.Message != "" {
		w.str("\n")
		w.tag("p", "msg", d.Message)
	}
	if plot {
		w.str("\n<div class=\"plots\">")
		for k, f := range plots {
			w.str("\n<figure>")
			if !f() {
				w.str(noPlot[k])
			}
			w.str("\n<figcaption>")
			w.str(captions[k])
			w.str("</figcaption></figure>")
		}
		w.str("\n</div>")
	}
	w.str("\n<div class=\"cols\">\n<div>\n<h4>Conditions and fit</h4>")
	if len(d.Conditions) > 0 {
		w.str("\n<table class=\"kv\">\n<tbody>")
		for _, kv := range d.Conditions {
			w.str("\n<tr>")
			w.str(`<th scope="row">`)
			w.text(kv.Key)
			w.str(`</th>`)
			w.tag("td", "", kv.Value)
			w.str("</tr>")
		}
		w.str("\n</tbody>\n</table>")
	} else {
		w.str("\n<p>Not analysed.</p>")
	}
	w.list("Warnings", "warnings", d.Warnings)
	w.list("Assumptions", "assumptions", d.Assumptions)
	w.str("\n</div>\n<div>\n<h4>Parameters and their origin</h4>")
	if len(d.Params) > 0 {
		w.str("\n<table class=\"params\">\n<thead><tr><th scope=\"col\">key</th><th scope=\"col\">value</th><th scope=\"col\">origin</th><th scope=\"col\">where</th></tr></thead>\n<tbody>")
		for _, p := range d.Params {
			w.str("\n<tr><td><code>")
			w.text(p.Key)
			w.str("</code></td><td")
			if p.Raw != "" {
				w.str(` title="as given: `)
				w.text(p.Raw)
				w.b = append(w.b, '"')
			}
			w.b = append(w.b, '>')
			w.text(p.Value)
			w.str("</td>")
			w.tag("td", "", p.Origin)
			w.tag("td", "file", p.Where)
			w.str("</tr>")
		}
		w.str("\n</tbody>\n</table>")
	} else {
		w.str("\n<p>No parameter recorded.</p>")
	}
	w.str("\n</div>\n</div>\n</section>")
}

// list appends a heading and a list of texts, or nothing for none.
func (w *writer) list(title, class string, items []string) {
	if len(items) == 0 {
		return
	}
	w.str("\n<h4>" + title + "</h4>\n<ul class=\"" + class + "\">")
	for _, s := range items {
		w.str("\n")
		w.tag("li", "", s)
	}
	w.str("\n</ul>")
}

var noPlot = [3]string{
	`<p class="noplot">no correlation data</p>`,
	`<p class="noplot">no residuals</p>`,
	`<p class="noplot">no size distribution</p>`,
}

var captions = [3]string{
	`Correlation data <span class="key pts"></span> and cumulant fit <span class="key fit"></span>; dashed lines bound the fitted lags.`,
	`Residuals, data − fit.`,
	`Size distribution: intensity <span class="key int"></span>, volume <span class="key vol"></span>, number <span class="key num"></span>.`,
}
