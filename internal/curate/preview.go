package curate

// PreviewLen is how many terms Preview keeps when nothing was shown.
const PreviewLen = 5

// Preview applies eff to a list of suggestion keys as it was shown (stem
// keys, text.Pipeline.Key) and returns the list the rules would have shown
// instead, in the order the finder puts rule offers (kinword/internal/finder,
// applyRules): pins first, then related terms, then broader and narrower
// refinements, then the shown terms; blocked keys, repeated keys and empty
// keys are dropped, and the list is cut to len(shown), or PreviewLen when
// nothing was shown. shown is not modified.
//
// It is an estimate: the finder would also refill a list shortened by a
// block from deeper candidates, and offers a rule's term only when the
// viewer can read a document holding it; Preview knows neither.
func Preview(shown []string, eff Effect) []string {
	k := len(shown)
	if k == 0 {
		k = PreviewLen
	}
	out := make([]string, 0, k)
	seen := make(map[string]bool, k)
	add := func(key string) {
		if len(out) < k && key != "" && !seen[key] && !eff.Blocks(key) {
			seen[key] = true
			out = append(out, key)
		}
	}
	for _, group := range [][]Offer{eff.Pins, eff.Relates, eff.Refinements} {
		for _, o := range group {
			add(o.Key)
		}
	}
	for _, key := range shown {
		add(key)
	}
	return out
}
