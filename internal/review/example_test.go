package review_test

import (
	"fmt"
	"os"
	"time"

	"kinword/internal/review"
)

// A zero-hit search for "sludge" is rescued by accepting "dewatering";
// the review lists the rescue with a draft pin rule and reports the term's
// acceptance.
func Example() {
	t0 := time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)
	events := []review.Event{
		{Kind: review.KindImpression, Impression: "imp-1", Time: t0, Session: "s-7f", Department: "operations",
			Query: "sludge", Hits: 0, Terms: []string{"digester", "dewatering"}},
		{Kind: review.KindAccept, Impression: "imp-1", Time: t0.Add(8 * time.Second), Term: "dewatering", Position: 1},
		{Kind: review.KindImpression, Impression: "imp-2", Time: t0.Add(9 * time.Second), Session: "s-7f",
			Department: "operations", Query: "sludge", Hits: 12, Terms: []string{"centrifuge"}},
		{Kind: review.KindClick, Impression: "imp-2", Time: t0.Add(20 * time.Second), Session: "s-7f",
			Query: "sludge", Doc: "ops-114", Terms: []string{"dewatering"}},
	}
	r := review.Build(events, review.Options{Department: "operations"})
	for _, x := range r.Terms {
		if x.Department == "" {
			fmt.Printf("%-10s shown %d accepted %d corrected %.3f success %.0f%%\n",
				x.Term, x.Impressions, x.Accepts, x.Corrected, 100*x.SuccessRate)
		}
	}
	_ = r.WriteCSV(os.Stdout, review.TableRescued)
	// Output:
	// centrifuge shown 1 accepted 0 corrected 0.000 success 0%
	// dewatering shown 1 accepted 1 corrected 1.625 success 100%
	// digester   shown 1 accepted 0 corrected 0.000 success 0%
	// department,query,term,impressions,count,rate,high,draft_kind,draft_query,draft_term,draft_department
	// ,sludge,dewatering,1,1,1,0,pin,sludge,dewatering,
	// operations,sludge,dewatering,1,1,1,0,pin,sludge,dewatering,operations
}
