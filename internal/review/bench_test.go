package review

import "testing"

// BenchmarkBuild100k reviews 100,000 synthetic events (about 4 departments,
// 500 queries, 2,000 terms, 8 terms per impression).
func BenchmarkBuild100k(b *testing.B) {
	events := synth(100_000, 42)
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		if r := Build(events, Options{}); len(r.Terms) == 0 {
			b.Fatal("empty report")
		}
	}
}
