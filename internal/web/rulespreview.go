package web

import (
	"net/http"
	"slices"
	"strings"
	"time"

	"github.com/gin-gonic/gin"

	"kinword/internal/curate"
)

// Preview bounds.
const (
	// previewWindow is how far back the preview looks at impressions.
	previewWindow = 30 * 24 * time.Hour
	// previewSamples is the most changed impressions a preview lists.
	previewSamples = 10
)

// previewSample is one impression a draft rule would change.
type previewSample struct {
	Department string   `json:"department"`
	Query      string   `json:"query"`
	Before     []string `json:"before"`
	After      []string `json:"after"`
}

// previewRule answers POST /api/v1/rules/preview: what a draft rule would
// have done to the suggestions shown in the last 30 days. The draft is
// checked on its own (400 or 409 with the problems) and compiled into a set
// of that one rule; each impression's query gets the set's effect for its
// department (at now, or at the draft's start when that is later), applied
// to the shown list by curate.Preview. Nothing is stored.
func (s *Server) previewRule(c *gin.Context) {
	b := s.book(c)
	if b == nil {
		return
	}
	in, ok := bindRule(c)
	if !ok || !s.checkRule(c, nil, "", in.Rule) {
		return
	}
	set, err := curate.Compile([]curate.Rule{in.Rule}, s.opts.Pipeline)
	if err != nil {
		apiError(c, http.StatusBadRequest, "invalid_rule", err.Error())
		return
	}
	now := time.Now().UTC()
	at := now
	if in.Start.After(now) {
		at = in.Start
	}
	considered, changed := 0, 0
	viewer := s.viewer(c)
	samples := []previewSample{}
	err = b.Impressions(c.Request.Context(), now.Add(-previewWindow), func(im Impression) error {
		considered++
		stems := strings.Fields(im.Query)
		eff := withoutQueryKeys(set.For(im.Department, stems, at), im.Query, stems)
		after := curate.Preview(im.Shown, eff)
		if slices.Equal(after, im.Shown) {
			return nil
		}
		changed++
		if len(samples) < previewSamples {
			// Samples show only what the caller may read, as words.
			q, before, visible := s.scopeTerms(viewer, im.Query, im.Shown)
			if !visible {
				return nil
			}
			_, afterShown, _ := s.scopeTerms(viewer, im.Query, after)
			samples = append(samples, previewSample{Department: im.Department, Query: q,
				Before: nonNil(before), After: nonNil(afterShown)})
		}
		return nil
	})
	if s.ruleError(c, err) {
		return
	}
	c.JSON(http.StatusOK, gin.H{"impressions": considered, "changed": changed, "samples": samples})
}

// withoutQueryKeys drops offers of terms the query already holds, as the
// finder does (a suggestion never repeats the query).
func withoutQueryKeys(eff curate.Effect, query string, stems []string) curate.Effect {
	drop := func(list []curate.Offer) []curate.Offer {
		var out []curate.Offer
		for _, o := range list {
			if o.Key != query && !slices.Contains(stems, o.Key) {
				out = append(out, o)
			}
		}
		return out
	}
	eff.Pins, eff.Relates, eff.Refinements = drop(eff.Pins), drop(eff.Relates), drop(eff.Refinements)
	return eff
}

// nonNil makes a nil list encode as [].
func nonNil(s []string) []string {
	if s == nil {
		return []string{}
	}
	return s
}
