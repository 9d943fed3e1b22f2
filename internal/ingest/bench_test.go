package ingest

import (
	"fmt"
	"strings"
	"testing"
)

// benchWords are invented filler words for benchmark documents.
var benchWords = strings.Fields("reservoir pump valve mains pressure flushing hydrant meter leak crew " +
	"district basin chlorine dosing outage survey gauge spillway turbine feeder")

// benchDoc returns about n words in paragraphs of 50, rendered by wrap.
func benchDoc(n int, wrap func(i int, para string) string) string {
	var b strings.Builder
	for p := 0; p*50 < n; p++ {
		var words []string
		for i := range 50 {
			words = append(words, benchWords[(p*50+i*7)%len(benchWords)])
		}
		b.WriteString(wrap(p, strings.Join(words, " ")))
	}
	return b.String()
}

func BenchmarkParseHTML(b *testing.B) {
	page := "<html><head><title>Bench</title><script>var x=1;</script></head><body><nav><a href=/>Home</a></nav><main>" +
		benchDoc(1000, func(i int, p string) string {
			return fmt.Sprintf("<h2>Section %d</h2><p>%s <b>bold</b> &amp; <a href='#%d'>link</a></p>", i, p, i)
		}) + "</main><footer>foot</footer></body></html>"
	data := []byte(page)
	b.SetBytes(int64(len(data)))
	b.ReportAllocs()
	for b.Loop() {
		if _, _, _, err := ParseHTML(data); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkParseMarkdown(b *testing.B) {
	md := "---\ntitle: Bench\ngroups: [staff]\n---\n# Bench\n\n" + benchDoc(1000, func(i int, p string) string {
		return fmt.Sprintf("## Section %d\n\n%s *emphasis* and `code`.\n\n- item %d\n- item\n\n", i, p, i)
	})
	data := []byte(md)
	b.SetBytes(int64(len(data)))
	b.ReportAllocs()
	for b.Loop() {
		if _, _, _, err := ParseMarkdown(data); err != nil {
			b.Fatal(err)
		}
	}
}
