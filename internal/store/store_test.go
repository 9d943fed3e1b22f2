package store

import (
	"context"
	"errors"
	"reflect"
	"strings"
	"testing"
	"time"
)

func TestRoundTrip(t *testing.T) {
	for _, b := range backends() {
		t.Run(b.name, func(t *testing.T) {
			s := openTest(t, b)
			imp := impression("imp1", t0, "valve", "impeller", "seal")
			imp.Sources = []string{"rm3", "rm3,assoc", "rocchio"}
			batch := []Event{
				imp,
				accept("a1", "imp1", "impeller", 1, t0.Add(time.Second)),
				{ID: "d1", Impression: "imp1", Kind: KindDismiss, Time: t0.Add(2 * time.Second), Term: "seal", Position: 2},
				{ID: "c1", Impression: "imp1", Kind: KindClick, Time: t0.Add(3 * time.Second), Doc: "doc-17", Rank: 3, Terms: []string{"impeller"}},
				{ID: "u1", Impression: "imp1", Kind: KindMarkUseful, Time: t0.Add(4 * time.Second), Doc: "doc-17"},
			}
			if err := s.Append(context.Background(), batch); err != nil {
				t.Fatalf("append: %v", err)
			}
			got := allEvents(t, s)
			if len(got) != len(batch) {
				t.Fatalf("got %d events, want %d", len(got), len(batch))
			}
			for i := range batch {
				want := batch[i]
				if !got[i].Time.Equal(want.Time) {
					t.Errorf("event %d time %v, want %v", i, got[i].Time, want.Time)
				}
				got[i].Time, want.Time = time.Time{}, time.Time{}
				if !reflect.DeepEqual(got[i], want) {
					t.Errorf("event %d:\n got %+v\nwant %+v", i, got[i], want)
				}
			}
			var terms []string
			rows, err := s.db.Query(s.d.q("SELECT term, sources FROM impression_terms WHERE impression = ? ORDER BY pos"), "imp1")
			if err != nil {
				t.Fatal(err)
			}
			defer rows.Close()
			for rows.Next() {
				var term, src string
				if err := rows.Scan(&term, &src); err != nil {
					t.Fatal(err)
				}
				terms = append(terms, term+"|"+src)
			}
			if want := []string{"valve|rm3", "impeller|rm3,assoc", "seal|rocchio"}; !reflect.DeepEqual(terms, want) {
				t.Errorf("impression_terms %v, want %v", terms, want)
			}
		})
	}
}

func TestAppendRejects(t *testing.T) {
	long := strings.Repeat("x", MaxFieldBytes+1)
	cases := []struct {
		name  string
		batch []Event
		want  error
		index string // detail the error must name
	}{
		{"missing id", []Event{{Impression: "imp0", Kind: KindAccept, Time: t0, Term: "valve"}}, ErrInvalid, "event 0"},
		{"unknown kind", []Event{{ID: "x", Impression: "imp0", Kind: "hover", Time: t0}}, ErrInvalid, "event 0"},
		{"negative position", []Event{accept("ok", "imp0", "valve", 0, t0), accept("x", "imp0", "valve", -1, t0)}, ErrInvalid, "event 1"},
		{"negative rank", []Event{{ID: "x", Impression: "imp0", Kind: KindClick, Time: t0, Doc: "d", Rank: -2}}, ErrInvalid, "event 0"},
		{"over-long query", []Event{{ID: "x", Impression: "imp0", Kind: KindAccept, Time: t0, Term: "t", Query: long}}, ErrInvalid, "event 0"},
		{"over-long term in list", []Event{{ID: "x", Impression: "imp9", Kind: KindImpression, Time: t0, Terms: []string{"a", long}}}, ErrInvalid, "event 0"},
		// 0xFF never appears in UTF-8 (Yergeau 2003, RFC 3629, section 1).
		{"invalid utf-8", []Event{{ID: "x\xff", Impression: "imp0", Kind: KindAccept, Time: t0, Term: "t"}}, ErrInvalid, "event 0"},
		{"nul byte", []Event{{ID: "x", Impression: "imp0", Kind: KindAccept, Time: t0, Term: "a\x00b"}}, ErrInvalid, "event 0"},
		{"missing time", []Event{{ID: "x", Impression: "imp0", Kind: KindAccept, Term: "t"}}, ErrInvalid, "event 0"},
		{"accept without term", []Event{{ID: "x", Impression: "imp0", Kind: KindAccept, Time: t0}}, ErrInvalid, "event 0"},
		{"sources mismatch", []Event{{ID: "x", Impression: "imp9", Kind: KindImpression, Time: t0, Terms: []string{"a"}, Sources: []string{"r", "s"}}}, ErrInvalid, "event 0"},
		{"unknown impression", []Event{accept("ok", "imp0", "valve", 0, t0), accept("x", "nope", "valve", 0, t0)}, ErrUnknownImpression, "event 1"},
		{"replay of stored id", []Event{accept("new", "imp0", "valve", 0, t0), accept("seed-a", "imp0", "valve", 0, t0)}, ErrReplay, "event 1"},
		{"replay inside batch", []Event{accept("dup", "imp0", "valve", 0, t0), accept("dup", "imp0", "valve", 0, t0)}, ErrReplay, "event 1"},
		{"impression id reused", []Event{impression("imp0", t0, "x")}, ErrReplay, "event 0"},
	}
	for _, b := range backends() {
		t.Run(b.name, func(t *testing.T) {
			s := openTest(t, b)
			ctx := context.Background()
			seed := []Event{impression("imp0", t0, "valve"), accept("seed-a", "imp0", "valve", 0, t0)}
			if err := s.Append(ctx, seed); err != nil {
				t.Fatalf("seed: %v", err)
			}
			for _, c := range cases {
				t.Run(c.name, func(t *testing.T) {
					err := s.Append(ctx, c.batch)
					if !errors.Is(err, c.want) {
						t.Fatalf("err = %v, want %v", err, c.want)
					}
					if !strings.Contains(err.Error(), c.index) {
						t.Errorf("err %q does not name %q", err, c.index)
					}
					if n, err := s.Count(ctx); err != nil || n != len(seed) {
						t.Errorf("count = %d, %v; want %d (nothing of the batch written)", n, err, len(seed))
					}
				})
			}
		})
	}
}

func TestOrderingAndSince(t *testing.T) {
	for _, b := range backends() {
		t.Run(b.name, func(t *testing.T) {
			s := openTest(t, b)
			ctx := context.Background()
			// Event times deliberately out of order: Events follows commit
			// order, not event time.
			batches := [][]Event{
				{impression("i1", t0.Add(5*time.Minute), "a")},
				{accept("e2", "i1", "a", 0, t0.Add(1*time.Minute))},
				{accept("e3", "i1", "a", 0, t0.Add(9*time.Minute)), accept("e4", "i1", "a", 0, t0.Add(2*time.Minute))},
			}
			for _, bt := range batches {
				if err := s.Append(ctx, bt); err != nil {
					t.Fatal(err)
				}
			}
			var ids []string
			if err := s.Events(ctx, t0.Add(2*time.Minute), func(e Event) error { ids = append(ids, e.ID); return nil }); err != nil {
				t.Fatal(err)
			}
			if want := []string{"ev-i1", "e3", "e4"}; !reflect.DeepEqual(ids, want) {
				t.Errorf("since t0+2m: %v, want %v", ids, want)
			}
			stop := errors.New("stop")
			n := 0
			err := s.Events(ctx, time.Time{}, func(Event) error { n++; return stop })
			if !errors.Is(err, stop) || n != 1 {
				t.Errorf("fn error: got %v after %d calls, want stop after 1", err, n)
			}
		})
	}
}

func TestPrune(t *testing.T) {
	for _, b := range backends() {
		t.Run(b.name, func(t *testing.T) {
			s := openTest(t, b)
			ctx := context.Background()
			old, recent := t0, t0.Add(48*time.Hour)
			if err := s.Append(ctx, []Event{
				impression("old", old, "a", "b"), accept("o1", "old", "a", 0, old.Add(time.Minute)),
				impression("new", recent, "c"), accept("n1", "new", "c", 0, recent),
			}); err != nil {
				t.Fatal(err)
			}
			n, err := s.Prune(ctx, t0.Add(24*time.Hour))
			if err != nil || n != 2 {
				t.Fatalf("prune = %d, %v; want 2", n, err)
			}
			if c, _ := s.Count(ctx); c != 2 {
				t.Errorf("count after prune = %d, want 2", c)
			}
			var left int
			if err := s.db.QueryRow("SELECT COUNT(*) FROM impression_terms").Scan(&left); err != nil || left != 1 {
				t.Errorf("impression_terms left = %d, %v; want 1", left, err)
			}
			// The pruned impression is gone, so a late event for it is unknown.
			if err := s.Append(ctx, []Event{accept("late", "old", "b", 1, recent)}); !errors.Is(err, ErrUnknownImpression) {
				t.Errorf("late event for pruned impression: %v, want ErrUnknownImpression", err)
			}
		})
	}
}

func TestReopenKeepsDataAndMigrations(t *testing.T) {
	for _, b := range backends() {
		t.Run(b.name, func(t *testing.T) {
			dsn := b.dsn(t)
			ctx := context.Background()
			s, err := Open(ctx, dsn)
			if err != nil {
				t.Fatal(err)
			}
			if err := s.Append(ctx, []Event{impression("i", t0, "a")}); err != nil {
				t.Fatal(err)
			}
			s.Close()
			s, err = Open(ctx, dsn)
			if err != nil {
				t.Fatalf("reopen: %v", err)
			}
			defer s.Close()
			var versions int
			if err := s.db.QueryRow("SELECT COUNT(*) FROM schema_migrations").Scan(&versions); err != nil {
				t.Fatal(err)
			}
			ms, _ := loadMigrations()
			if versions != len(ms) {
				t.Errorf("schema_migrations has %d rows, want %d", versions, len(ms))
			}
			if n, _ := s.Count(ctx); n != 1 {
				t.Errorf("count after reopen = %d, want 1", n)
			}
		})
	}
}
