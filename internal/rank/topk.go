package rank

import "container/heap"

// Scored is a document number with its score.
type Scored struct {
	Doc   uint32
	Score float64
}

// Better orders results: higher score first, then lower document number, so
// rankings are deterministic under ties.
func Better(a, b Scored) bool {
	if a.Score != b.Score {
		return a.Score > b.Score
	}
	return a.Doc < b.Doc
}

// TopK keeps the k best results seen. The zero value is unusable; use NewTopK.
type TopK struct {
	k int
	h minHeap
}

// NewTopK returns a collector of the k best results (k >= 1).
func NewTopK(k int) *TopK {
	if k < 1 {
		k = 1
	}
	return &TopK{k: k, h: make(minHeap, 0, k)}
}

// Push offers a result.
func (t *TopK) Push(s Scored) {
	if len(t.h) < t.k {
		heap.Push(&t.h, s)
		return
	}
	if Better(s, t.h[0]) {
		t.h[0] = s
		heap.Fix(&t.h, 0)
	}
}

// Min returns the worst kept score, or -Inf semantics via ok=false when
// fewer than k results are held.
func (t *TopK) Min() (Scored, bool) {
	if len(t.h) < t.k {
		return Scored{}, false
	}
	return t.h[0], true
}

// Sorted returns the kept results best first and empties the collector.
func (t *TopK) Sorted() []Scored {
	out := make([]Scored, len(t.h))
	for i := len(out) - 1; i >= 0; i-- {
		out[i] = heap.Pop(&t.h).(Scored)
	}
	return out
}

// minHeap keeps the worst result at the root.
type minHeap []Scored

func (h minHeap) Len() int           { return len(h) }
func (h minHeap) Less(i, j int) bool { return Better(h[j], h[i]) }
func (h minHeap) Swap(i, j int)      { h[i], h[j] = h[j], h[i] }
func (h *minHeap) Push(x any)        { *h = append(*h, x.(Scored)) }
func (h *minHeap) Pop() any {
	old := *h
	n := len(old)
	x := old[n-1]
	*h = old[:n-1]
	return x
}
