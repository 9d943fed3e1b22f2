// Package progress reports the progress of long commands: a bar with rate
// and ETA on a terminal, plain periodic lines otherwise (logs, CI). It must
// not import bleve, gin or database drivers.
package progress

import (
	"fmt"
	"io"
	"os"
	"sync"
	"time"

	"github.com/mattn/go-isatty"
	"github.com/schollz/progressbar/v3"
)

// Bar reports progress of one phase of work. It is safe for concurrent use.
// A nil *Bar does nothing, so callers need not check.
type Bar struct {
	mu      sync.Mutex
	w       io.Writer
	label   string
	unit    string
	total   int
	done    int
	start   time.Time
	last    time.Time
	every   time.Duration
	tty     *progressbar.ProgressBar
	quiet   bool
	phase   string
	lastOut int
}

// Options configure New.
type Options struct {
	// Unit names what is counted ("docs"); default "items".
	Unit string
	// Every is the interval between plain lines when not on a terminal;
	// default 5 s.
	Every time.Duration
	// Quiet suppresses all output (for --json runs).
	Quiet bool
}

// New starts a bar for total items (0 = unknown) written to w (os.Stderr
// when nil). On a terminal it draws a bar; elsewhere it prints a line at
// most every Options.Every.
func New(w io.Writer, label string, total int, o Options) *Bar {
	if w == nil {
		w = os.Stderr
	}
	if o.Unit == "" {
		o.Unit = "items"
	}
	if o.Every <= 0 {
		o.Every = 5 * time.Second
	}
	b := &Bar{w: w, label: label, unit: o.Unit, total: total, start: time.Now(), every: o.Every, quiet: o.Quiet}
	b.last = b.start
	if f, ok := w.(*os.File); ok && !o.Quiet && isatty.IsTerminal(f.Fd()) {
		max := int64(total)
		if max <= 0 {
			max = -1
		}
		b.tty = progressbar.NewOptions64(max,
			progressbar.OptionSetWriter(w),
			progressbar.OptionSetDescription(label),
			progressbar.OptionShowCount(),
			progressbar.OptionShowIts(),
			progressbar.OptionSetItsString(o.Unit),
			progressbar.OptionSetPredictTime(true),
			progressbar.OptionThrottle(100*time.Millisecond),
			progressbar.OptionClearOnFinish(),
		)
	}
	return b
}

// Add counts n more items done.
func (b *Bar) Add(n int) {
	if b == nil {
		return
	}
	b.Set(b.Done() + n)
}

// Done returns the items done so far.
func (b *Bar) Done() int {
	if b == nil {
		return 0
	}
	b.mu.Lock()
	defer b.mu.Unlock()
	return b.done
}

// Set records done items and a new total (0 keeps the old total).
func (b *Bar) Set(done int) {
	if b == nil {
		return
	}
	b.mu.Lock()
	defer b.mu.Unlock()
	b.done = done
	if b.quiet {
		return
	}
	if b.tty != nil {
		_ = b.tty.Set(done)
		return
	}
	now := time.Now()
	if now.Sub(b.last) >= b.every && done != b.lastOut {
		b.last = now
		b.lastOut = done
		fmt.Fprintln(b.w, b.line(now))
	}
}

// Phase changes the label (for multi-phase work) and resets the count.
func (b *Bar) Phase(label string, total int) {
	if b == nil {
		return
	}
	b.mu.Lock()
	b.label, b.total, b.done, b.start = label, total, 0, time.Now()
	if b.tty != nil {
		b.tty.Describe(label)
		b.tty.ChangeMax(total)
		b.tty.Reset()
	}
	b.mu.Unlock()
}

func (b *Bar) line(now time.Time) string {
	el := now.Sub(b.start).Seconds()
	rate := 0.0
	if el > 0 {
		rate = float64(b.done) / el
	}
	s := fmt.Sprintf("%s: %d", b.label, b.done)
	if b.total > 0 {
		s += fmt.Sprintf("/%d (%.0f%%)", b.total, 100*float64(b.done)/float64(b.total))
	}
	s += fmt.Sprintf(", %.0f %s/s", rate, b.unit)
	if b.total > 0 && rate > 0 && b.done < b.total {
		eta := time.Duration(float64(b.total-b.done) / rate * float64(time.Second))
		s += ", ETA " + eta.Round(time.Second).String()
	}
	return s
}

// Finish ends the bar and, off a terminal, prints a final line.
func (b *Bar) Finish() {
	if b == nil {
		return
	}
	b.mu.Lock()
	defer b.mu.Unlock()
	if b.quiet {
		return
	}
	if b.tty != nil {
		_ = b.tty.Finish()
		return
	}
	fmt.Fprintln(b.w, b.line(time.Now())+", done in "+time.Since(b.start).Round(time.Millisecond).String())
}
