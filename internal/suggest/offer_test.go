package suggest

import (
	"fmt"
	"math"
	"testing"

	"kinword/internal/access"
)

// TestOfferWeightFormula checks offerWeight against Robertson's offer
// weight, r·log[(r+0.5)(N−n−R+r+0.5) / ((n−r+0.5)(R−r+0.5))] (S. E.
// Robertson 1990, "On term selection for query expansion", J.
// Documentation 46(4); the log factor is the relevance weight of
// Robertson & Sparck Jones 1976 with the 0.5 correction). The expected
// values are worked by hand from that formula, natural logarithm.
func TestOfferWeightFormula(t *testing.T) {
	cases := []struct {
		name       string
		r, R, n, N float64
		want       float64
	}{
		// 5·ln(5.5·945.5 / (45.5·5.5)) = 5·ln(20.78022) = 5·3.034001.
		{"half the feedback documents, 5% of the collection", 5, 10, 50, 1000, 15.170008},
		// 10·ln(10.5·990.5 / (0.5·0.5)) = 10·ln(41601) = 10·10.635879.
		{"every feedback document and no other", 10, 10, 10, 1000, 106.358795},
		// 1·ln(1.5·691.5 / (299.5·9.5)) = ln(0.364555): rarer in the
		// feedback documents (10%) than in the collection (30%).
		{"commoner outside the feedback documents", 1, 10, 300, 1000, -1.009078},
		{"in no feedback document", 0, 10, 50, 1000, 0},
		{"non-positive argument", 2, 10, 10, 10, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := offerWeight(c.r, c.R, c.n, c.N); math.Abs(got-c.want) > 1e-6 {
				t.Errorf("offerWeight(%g, %g, %g, %g) = %.6f, want %.6f", c.r, c.R, c.n, c.N, got, c.want)
			}
		})
	}
}

// offerCorpus has 80 open documents: ten with "pump" (the feedback
// documents of a search on it), six of which also have "impeller" and
// "gasket"; "gasket" is in three more documents, "impeller" in none, and
// four other pump documents have "motor".
func offerCorpus() *fakeCorpus {
	f := newFakeCorpus()
	for i := range 10 {
		switch {
		case i < 6:
			f.add(nil, "pump impeller gasket")
		default:
			f.add(nil, "pump motor")
		}
	}
	for i := range 70 {
		w := fmt.Sprintf("reservoir level%c%c", 'a'+i%26, 'a'+i/26)
		if i < 3 {
			w += " gasket"
		}
		f.add(nil, w)
	}
	return f
}

// TestOfferPart checks that the offer part ranks a candidate found in the
// same feedback documents but also elsewhere below one found only there,
// with the ratio of their offer weights, worked by hand from Robertson's
// formula (see TestOfferWeightFormula): impeller r=6 of R=10, n=6 of N=80:
// 6·ln(6.5·70.5/(0.5·4.5)) = 31.898908; gasket n=9: 6·ln(6.5·67.5/(3.5·4.5))
// = 19.962536; motor r=n=4: 18.324140.
func TestOfferPart(t *testing.T) {
	f := offerCorpus()
	view := f.view(access.Anonymous)
	req := Request{Query: []QueryTerm{{Key: "pump", Weight: 1}}, Viewer: access.Anonymous, Feedback: view.rank("pump", 10)}
	cases := []struct {
		name string
		opt  Options
	}{
		{"offer part only", Options{FeedbackWeight: -1, AssocWeight: -1}},
		{"defaults", Options{}},
	}
	want := map[string]float64{"impel": 1, "gasket": 19.962536 / 31.898908, "motor": 18.324140 / 31.898908}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			e, err := New(nil, c.opt)
			if err != nil {
				t.Fatal(err)
			}
			got := e.Suggest(view, req)
			if len(got) < 3 {
				t.Fatalf("got %d suggestions, want 3: %+v", len(got), got)
			}
			if got[0].Term != key("impeller") {
				t.Errorf("first suggestion %q, want %q", got[0].Term, key("impeller"))
			}
			for _, s := range got {
				w, ok := want[s.Term]
				if !ok {
					continue
				}
				if p := s.Evidence.Parts["offer"]; math.Abs(p-w) > 1e-6 {
					t.Errorf("%s: offer part %.6f, want %.6f", s.Term, p, w)
				}
				delete(want, s.Term)
			}
			if c.name == "offer part only" && len(want) > 0 {
				t.Errorf("not suggested: %v", want)
			}
		})
	}
}
