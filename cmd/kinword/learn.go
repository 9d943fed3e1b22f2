package main

import (
	"context"
	"log/slog"
	"strings"
	"time"

	"kinword/internal/finder"
	"kinword/internal/prefs"
	"kinword/internal/store"
)

// toPrefs converts stored events into learning events. Result clicks are
// not acceptances of a suggestion, so only impressions, accepts and
// dismissals take part.
func toPrefs(e store.Event) (prefs.Event, bool) {
	switch e.Kind {
	case store.KindImpression, store.KindAccept, store.KindDismiss:
	default:
		return prefs.Event{}, false
	}
	return prefs.Event{Kind: e.Kind, Time: e.Time, Session: e.Session, Department: e.Department,
		Query: e.Query, Term: e.Term, Position: e.Position, Shown: e.Terms}, true
}

// snippetCache keeps the snippet stems of clicked results between
// refreshes (a snippet depends only on the document, the query and the
// accepted terms), bounded: past maxSnippets entries it starts again.
type snippetCache map[string][]string

const maxSnippets = 200_000

// stems returns the snippet stems of a click event, computing them once.
func (c *snippetCache) stems(ctx context.Context, f *finder.Finder, e store.Event) ([]string, error) {
	key := e.Doc + "\x00" + e.Query + "\x00" + strings.Join(e.Terms, "|")
	if s, ok := (*c)[key]; ok {
		return s, nil
	}
	s, err := f.SnippetStems(ctx, e.Doc, e.Query, e.Terms)
	if err != nil {
		return nil, err
	}
	if len(*c) >= maxSnippets {
		*c = snippetCache{}
	}
	(*c)[key] = s
	return s, nil
}

// learnOnce rebuilds the learned model from the store's events of the
// retention window and publishes it to the finder. Result clicks add the
// stems of the snippet the searcher saw (implicit feedback from the text
// shown, position-corrected in the model).
func learnOnce(ctx context.Context, st *store.Store, f *finder.Finder, retention time.Duration, opts prefs.Options, snips *snippetCache) (int, error) {
	now := time.Now().UTC()
	b := prefs.NewBuilder(opts)
	n := 0
	err := st.Events(ctx, now.Add(-retention), func(e store.Event) error {
		if pe, ok := toPrefs(e); ok {
			b.Add(pe)
			n++
		}
		if e.Kind == store.KindClick && e.Doc != "" && snips != nil {
			stems, err := snips.stems(ctx, f, e)
			if err != nil {
				return err
			}
			b.AddSnippet(prefs.SnippetClick{Time: e.Time, Session: e.Session, Department: e.Department,
				Query: e.Query, Doc: e.Doc, Rank: e.Rank, Stems: stems})
			n++
		}
		return nil
	})
	if err != nil {
		return 0, err
	}
	f.SetModel(b.Snapshot(now))
	return n, nil
}

// learnDuty bounds the share of one core the learning refresh may take:
// a rebuild that took d waits at least d/learnDuty before the next, so a
// store holding many events (a rebuild reads the whole retention window)
// slows learning down instead of starving searches. With the default 30 s
// interval the bound starts to bite once a rebuild takes 3 s.
const learnDuty = 0.10

// nextLearn is how long to wait after a rebuild that took took.
func nextLearn(every, took time.Duration) time.Duration {
	return max(every, time.Duration(float64(took)/learnDuty))
}

// learnLoop refreshes learning every interval (or less often, see
// learnDuty) until ctx ends; a store failure keeps the previous model
// serving. The librarian's rules are refreshed every interval.
func learnLoop(ctx context.Context, log *slog.Logger, st *store.Store, f *finder.Finder, rules *rulesRefresher, every, retention time.Duration) {
	t := time.NewTicker(every)
	defer t.Stop()
	snips := snippetCache{}
	var due time.Time
	for {
		if now := time.Now(); !now.Before(due) {
			n, err := learnOnce(ctx, st, f, retention, prefs.Options{}, &snips)
			took := time.Since(now)
			if err != nil && ctx.Err() == nil {
				log.Error("learning refresh failed; the previous model keeps serving", "err", err)
			}
			wait := nextLearn(every, took)
			if wait > every {
				log.Warn("learning refresh is slow; refreshing less often", "events", n, "took", took.Round(time.Millisecond), "next_in", wait.Round(time.Second))
			}
			due = now.Add(wait)
		}
		if rules != nil {
			if err := rules.refresh(ctx); err != nil && ctx.Err() == nil {
				log.Error("rules refresh failed; the previous rules keep serving", "err", err)
			}
		}
		select {
		case <-ctx.Done():
			return
		case <-t.C:
		}
	}
}

// pruneLoop drops raw events older than the retention window once an hour
// (the learned model keeps what it learned until its own window passes).
func pruneLoop(ctx context.Context, log *slog.Logger, st *store.Store, retention time.Duration) {
	t := time.NewTicker(time.Hour)
	defer t.Stop()
	for {
		if n, err := st.Prune(ctx, time.Now().UTC().Add(-retention)); err != nil && ctx.Err() == nil {
			log.Error("event retention prune failed", "err", err)
		} else if n > 0 {
			log.Warn("pruned raw events past retention", "events", n)
		}
		select {
		case <-ctx.Done():
			return
		case <-t.C:
		}
	}
}
