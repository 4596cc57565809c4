// Package progress shows how a run advances, phase by phase (analysing,
// report, hashing): as a bar on an interactive terminal, as a line every
// 10 % or 10 s for a log file or a batch system's output, or not at all.
package progress

import (
	"fmt"
	"io"
	"sync"
	"time"

	"github.com/schollz/progressbar/v3"
)

// Modes of Reporter.
const (
	Auto  = "auto"  // bar on a terminal, lines otherwise
	Bar   = "bar"   // a bar (schollz/progressbar)
	Lines = "lines" // a line every 10 % or 10 s
	None  = "none"
)

// Modes lists the modes, for a flag.
func Modes() []string { return []string{Auto, Bar, Lines, None} }

// Reporter reports progress to w; safe for concurrent use.
type Reporter struct {
	mu       sync.Mutex
	w        io.Writer
	mode     string
	prefix   string
	now      func() time.Time
	phase    string
	start    time.Time
	lastLine time.Time
	lastPct  int
	bar      *progressbar.ProgressBar
}

// New returns a reporter in mode (Auto resolves by terminal); prefix
// starts every line (e.g. "dlsbatch run: ").
func New(w io.Writer, mode string, terminal bool, prefix string) *Reporter {
	if mode == Auto {
		mode = Lines
		if terminal {
			mode = Bar
		}
	}
	return &Reporter{w: w, mode: mode, prefix: prefix, now: time.Now}
}

// Update says that done of total items of phase are finished.
func (r *Reporter) Update(phase string, done, total int) {
	if r == nil || r.mode == None || total <= 0 {
		return
	}
	r.mu.Lock()
	defer r.mu.Unlock()
	t := r.now()
	if phase != r.phase {
		r.finishBar()
		r.phase, r.start, r.lastLine, r.lastPct = phase, t, t, -1
		if r.mode == Bar {
			r.bar = progressbar.NewOptions(total, progressbar.OptionSetWriter(r.w), progressbar.OptionSetDescription(phase),
				progressbar.OptionShowCount(), progressbar.OptionSetPredictTime(true), progressbar.OptionClearOnFinish())
		}
	}
	if r.mode == Bar {
		r.bar.Set(done)
		return
	}
	pct := 100 * done / total
	if done < total && pct/10 == r.lastPct/10 && t.Sub(r.lastLine) < 10*time.Second {
		return
	}
	r.lastPct, r.lastLine = pct, t
	el := t.Sub(r.start)
	left := ""
	if done > 0 && done < total {
		rest := time.Duration(float64(el) * float64(total-done) / float64(done))
		left = ", about " + rest.Round(time.Second).String() + " left"
	}
	fmt.Fprintf(r.w, "%s%s %d/%d (%d %%), %s%s\n", r.prefix, phase, done, total, pct, el.Round(time.Second), left)
}

// Done ends the last phase (clears the bar).
func (r *Reporter) Done() {
	if r == nil {
		return
	}
	r.mu.Lock()
	defer r.mu.Unlock()
	r.finishBar()
}

func (r *Reporter) finishBar() {
	if r.bar != nil {
		r.bar.Finish()
		r.bar = nil
	}
}
