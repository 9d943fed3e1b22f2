package suggest

import (
	"fmt"
	"math/rand/v2"
	"strings"
)

// Words planted in the test collection, each with the filter it must meet.
const (
	canary   = "zephyrine"         // restricted group ops-security only
	generic  = "presented"         // once in 1/6 of the documents: Poisson-like
	genPhr   = "results presented" // the same documents: a phrase of generic words
	bursty   = "hydrants"          // four times in 1/6 of the valve documents
	everyDoc = "tarnwick"          // every document: too common
	rareWord = "zircon"            // one document
	number   = "2025"              // bare number, bursty
	short    = "ok"                // two letters, bursty
	stopStem = "also"              // a stopword whose stem is itself
	stopDisp = "however"           // a stopword whose stem ("howev") is not
	fewDocs  = "switchgear"
)

// background returns n neutral filler words ("wdab") drawn uniformly from
// 400, so each is spread like Poisson noise.
func background(r *rand.Rand, n int) []string {
	out := make([]string, n)
	for i := range out {
		k := r.IntN(400)
		out[i] = fmt.Sprintf("wd%c%c", 'a'+k/26, 'a'+k%26)
	}
	return out
}

// utilityCorpus is an invented water utility's intranet: 120 open
// documents on six topics (20 each: valves, leaks, billing, pumps, safety,
// people), eight documents of the restricted group ops-security about
// valves and the canary, and the planted filter words. Fixed seed.
func utilityCorpus() *fakeCorpus {
	r := rand.New(rand.NewPCG(11, 12))
	f := newFakeCorpus()
	topics := [][]string{
		{"isolation valves", "isolation valve", "valve", "chamber", "flushing", "valve key", "gate valve"},
		{"leak", "leakage", "main break", "main break", "night flow", "logger", "burst"},
		{"invoice", "tariff", "meter reading", "refund", "invoice", "direct debit"},
		{"pump station", "pumps", "impeller", "booster", "sump"},
		{"confined space", "permit", "gas monitor", "rescue", "harness"},
		{"annual leave", "payroll", "pension", "expenses", "timesheet"},
	}
	for i := range 120 {
		topic := i % 6
		var parts []string
		parts = append(parts, background(r, 30)...)
		for range 8 {
			parts = append(parts, topics[topic][r.IntN(len(topics[topic]))])
		}
		parts = append(parts, everyDoc)
		if i%7 == 0 {
			parts = append(parts, genPhr) // 18 documents
		}
		if topic == 0 && (i/6)%2 == 0 {
			parts = append(parts, bursty, bursty, bursty, bursty) // 10 documents
		}
		if topic == 0 && (i/6)%2 == 1 {
			parts = append(parts, number, number, short, short, stopStem, stopStem, stopDisp, stopDisp)
		}
		if topic == 0 && i < 30 {
			parts = append(parts, fewDocs) // 5 documents
		}
		if i == 6 {
			parts = append(parts, rareWord)
		}
		r.Shuffle(len(parts), func(a, b int) { parts[a], parts[b] = parts[b], parts[a] })
		f.add(nil, strings.Join(parts, " "))
	}
	for range 8 {
		parts := append(background(r, 20), "valve", "valve", canary, canary, canary, "telemetry", "telemetry")
		r.Shuffle(len(parts), func(a, b int) { parts[a], parts[b] = parts[b], parts[a] })
		f.add([]string{"ops-security"}, strings.Join(parts, " "))
	}
	return f
}
