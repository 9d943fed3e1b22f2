package web

import (
	"time"

	"kinword/internal/review"
)

// The JSON form of a review.Report, field by field (see its documentation
// for what each counts). Zero times are omitted; lists are never null.

type reportJSON struct {
	From           time.Time       `json:"from,omitzero"`
	To             time.Time       `json:"to,omitzero"`
	Department     string          `json:"department"`
	BucketSeconds  float64         `json:"bucket_seconds"`
	Origin         time.Time       `json:"origin,omitzero"`
	Impressions    int             `json:"impressions"`
	Unmatched      int             `json:"unmatched"`
	Terms          []termRowJSON   `json:"terms"`
	Pairs          []termRowJSON   `json:"pairs"`
	Trend          []pointJSON     `json:"trend"`
	RarelyAccepted []attentionJSON `json:"rarely_accepted"`
	OftenDismissed []attentionJSON `json:"often_dismissed"`
	NoResults      []attentionJSON `json:"no_results"`
	NoSuggestions  []attentionJSON `json:"no_suggestions"`
	Rescued        []attentionJSON `json:"rescued"`
}

type termRowJSON struct {
	Department  string      `json:"department"`
	Query       string      `json:"query,omitempty"`
	Term        string      `json:"term"`
	Impressions int         `json:"impressions"`
	Exposure    float64     `json:"exposure"`
	Accepts     int         `json:"accepts"`
	Dismissals  int         `json:"dismissals"`
	Successes   int         `json:"successes"`
	Rate        float64     `json:"rate"`
	Corrected   float64     `json:"corrected"`
	Low         float64     `json:"low"`
	High        float64     `json:"high"`
	DismissRate float64     `json:"dismiss_rate"`
	SuccessRate float64     `json:"success_rate"`
	MeanPos     float64     `json:"mean_position"`
	Trend       []pointJSON `json:"trend,omitempty"`
}

type pointJSON struct {
	Start       time.Time `json:"start"`
	Impressions int       `json:"impressions"`
	Shown       int       `json:"shown"`
	Exposure    float64   `json:"exposure"`
	Accepts     int       `json:"accepts"`
	Dismissals  int       `json:"dismissals"`
	Successes   int       `json:"successes"`
	ZeroHits    int       `json:"zero_hits"`
	Empty       int       `json:"empty"`
	Rate        float64   `json:"rate"`
	Corrected   float64   `json:"corrected"`
}

type attentionJSON struct {
	Department  string    `json:"department"`
	Query       string    `json:"query"`
	Term        string    `json:"term"`
	Impressions int       `json:"impressions"`
	Count       int       `json:"count"`
	Rate        float64   `json:"rate"`
	High        float64   `json:"high"`
	Draft       draftJSON `json:"draft"`
}

// draftJSON has the field names of a rule body, so a page can post it to
// POST /api/v1/rules after the librarian fills in what is missing.
type draftJSON struct {
	Kind       string `json:"kind"`
	Query      string `json:"query"`
	Term       string `json:"term"`
	Department string `json:"department,omitempty"`
}

func reviewJSON(r *review.Report) reportJSON {
	return reportJSON{From: r.From, To: r.To, Department: r.Department, BucketSeconds: r.Bucket.Seconds(),
		Origin: r.Origin, Impressions: r.Impressions, Unmatched: r.Unmatched,
		Terms: rowsJSON(r.Terms), Pairs: rowsJSON(r.Pairs), Trend: pointsJSON(r.Trend),
		RarelyAccepted: attentionsJSON(r.RarelyAccepted), OftenDismissed: attentionsJSON(r.OftenDismissed),
		NoResults: attentionsJSON(r.NoResults), NoSuggestions: attentionsJSON(r.NoSuggestions), Rescued: attentionsJSON(r.Rescued)}
}

func rowsJSON(rows []review.TermRow) []termRowJSON {
	out := make([]termRowJSON, len(rows))
	for i, x := range rows {
		out[i] = termRowJSON{Department: x.Department, Query: x.Query, Term: x.Term, Impressions: x.Impressions,
			Exposure: x.Exposure, Accepts: x.Accepts, Dismissals: x.Dismissals, Successes: x.Successes, Rate: x.Rate,
			Corrected: x.Corrected, Low: x.Low, High: x.High, DismissRate: x.DismissRate, SuccessRate: x.SuccessRate,
			MeanPos: x.MeanPos}
		if len(x.Trend) > 0 {
			out[i].Trend = pointsJSON(x.Trend)
		}
	}
	return out
}

func pointsJSON(ps []review.Point) []pointJSON {
	out := make([]pointJSON, len(ps))
	for i, p := range ps {
		out[i] = pointJSON(p)
	}
	return out
}

func attentionsJSON(as []review.Attention) []attentionJSON {
	out := make([]attentionJSON, len(as))
	for i, a := range as {
		out[i] = attentionJSON{Department: a.Department, Query: a.Query, Term: a.Term, Impressions: a.Impressions,
			Count: a.Count, Rate: a.Rate, High: a.High, Draft: draftJSON(a.Draft)}
	}
	return out
}
