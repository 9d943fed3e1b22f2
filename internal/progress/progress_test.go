package progress

import (
	"bytes"
	"strings"
	"testing"
	"time"
)

// TestPlainLines: off a terminal the bar prints periodic lines with count,
// percentage, rate and ETA, and a final line; a nil bar and a quiet bar
// print nothing.
func TestPlainLines(t *testing.T) {
	var b bytes.Buffer
	bar := New(&b, "ingest", 100, Options{Unit: "docs", Every: time.Nanosecond})
	time.Sleep(time.Millisecond)
	bar.Set(50)
	bar.Finish()
	out := b.String()
	for _, want := range []string{"ingest: 50/100 (50%)", "docs/s", "ETA", "done in"} {
		if !strings.Contains(out, want) {
			t.Errorf("output %q lacks %q", out, want)
		}
	}
	var nilBar *Bar
	nilBar.Add(1)
	nilBar.Finish()
	var q bytes.Buffer
	qb := New(&q, "x", 10, Options{Quiet: true, Every: time.Nanosecond})
	qb.Set(5)
	qb.Finish()
	if q.Len() != 0 {
		t.Errorf("quiet bar printed %q", q.String())
	}
}
