package store

import (
	"errors"
	"fmt"
	"reflect"
	"slices"
	"strings"
	"testing"
	"time"
	"unicode/utf8"
)

var fuzzKinds = []string{KindImpression, KindAccept, KindDismiss, KindClick, KindMarkUseful}

// splitList turns a fuzzed string into a list: "" is no list, otherwise
// the parts between "|".
func splitList(s string) []string {
	if s == "" {
		return nil
	}
	return strings.Split(s, "|")
}

// FuzzValidateBatch builds a batch around one event made from fuzzed fields
// (every Event field, the time from fuzzed seconds and nanoseconds, optionally
// in another zone or zero) placed among valid events, and checks:
//   - validation never panics and never changes the batch;
//   - every rejection wraps ErrInvalid and names the fuzzed event's index
//     (the others are valid);
//   - an accepted event obeys the rules the Event and limit docs state
//     (store.go, validate.go): known kind, required fields present, every
//     string valid UTF-8 without NUL and at most MaxFieldBytes, time
//     surviving Unix nanoseconds, Terms only on impressions and clicks,
//     Sources only on impressions and one per term;
//   - its Terms and Sources survive the stored JSON list encoding
//     (encodeList, then decodeList);
//   - batches of MaxBatch are accepted and one more is rejected.
func FuzzValidateBatch(f *testing.F) {
	type seed struct {
		sel                                             uint8
		kind, id, imp, sess, dept, gh, query, term, doc string
		pos, rank                                       int
		terms, sources                                  string
		secs                                            int64
		nanos                                           int64
		flags                                           uint8
	}
	for _, s := range []seed{
		{0, "", "e1", "i1", "20260302.ab", "field-operations", "0a1b", "main break", "", "", 0, 0, "valv|hydrant", "rm3|assoc,rm3", t0.Unix(), 0, 0},
		{1, "", "e2", "i1", "", "", "", "q", "valv", "", 3, 0, "", "", t0.Unix(), 5, 1},
		{3, "", "e3", "i1", "", "", "", "", "", "d9", 0, 2, "valv", "", t0.Unix(), 0, 2},
		{4, "", "e4", "i1", "", "", "", "", "", "", 0, 0, "", "", t0.Unix(), 0, 3},
		{7, "unknown", "e5", "i1", "", "", "", "", "t", "d", 0, 0, "", "", t0.Unix(), 0, 0},
		{0, "", "e6", "i1", "", "", "", "", "", "", 0, 0, "a|\x00|\xff", "x", t0.Unix(), 0, 0},
		{0, "", "e7", "i1", "", "", "", "", "", "", -1, -1, "", "", 1 << 40, 0, 0x40},
		{2, "", "", "", strings.Repeat("s", 513), "", "", "", "t", "", 0, 0, "", "", -1 << 40, 1 << 62, 0x20},
		{0, "", "e8", "i1", "", "", "", "", "", "", 0, 0, strings.Repeat("t|", 300), "", t0.Unix(), 0, 0x80},
	} {
		f.Add(s.sel, s.kind, s.id, s.imp, s.sess, s.dept, s.gh, s.query, s.term, s.doc, s.pos, s.rank, s.terms, s.sources, s.secs, s.nanos, s.flags)
	}
	f.Fuzz(func(t *testing.T, sel uint8, kind, id, imp, sess, dept, gh, query, term, doc string,
		pos, rank int, terms, sources string, secs, nanos int64, flags uint8) {
		if int(sel)%8 < len(fuzzKinds) {
			kind = fuzzKinds[int(sel)%8]
		}
		e := Event{ID: id, Impression: imp, Kind: kind, Time: time.Unix(secs, nanos), Session: sess, Department: dept,
			GroupsHash: gh, Query: query, Term: term, Position: pos, Doc: doc, Rank: rank,
			Terms: splitList(terms), Sources: splitList(sources)}
		switch {
		case flags&0x40 != 0:
			e.Time = time.Time{}
		case flags&0x20 != 0:
			e.Time = e.Time.In(time.FixedZone("east", 14*3600))
		default:
			e.Time = e.Time.UTC()
		}
		valid := Event{ID: "ok", Impression: "i0", Kind: KindAccept, Time: t0, Term: "valv"}
		n := int(flags&3) + 1
		k := int(sel/8) % n
		batch := slices.Repeat([]Event{valid}, n)
		batch[k] = e
		before := cloneEvents(batch)

		err := validateBatch(batch)
		if !reflect.DeepEqual(batch, before) {
			t.Fatalf("validation changed the batch")
		}
		if err != nil {
			if !errors.Is(err, ErrInvalid) {
				t.Fatalf("error %v does not wrap ErrInvalid", err)
			}
			if want := fmt.Sprintf("event %d:", k); !strings.Contains(err.Error(), want) {
				t.Fatalf("error %q does not name %q", err, want)
			}
		} else {
			checkAccepted(t, e)
		}

		if flags&0x80 != 0 {
			full := slices.Repeat([]Event{valid}, MaxBatch)
			if err := validateBatch(full); err != nil {
				t.Fatalf("batch of MaxBatch valid events rejected: %v", err)
			}
			if err := validateBatch(append(full, valid)); !errors.Is(err, ErrInvalid) {
				t.Fatalf("batch of MaxBatch+1 events: err = %v, want ErrInvalid", err)
			}
		}
	})
}

func cloneEvents(in []Event) []Event {
	out := make([]Event, len(in))
	for i, e := range in {
		e.Terms = slices.Clone(e.Terms)
		e.Sources = slices.Clone(e.Sources)
		out[i] = e
	}
	return out
}

// checkAccepted restates the documented rules for a stored event.
func checkAccepted(t *testing.T, e Event) {
	t.Helper()
	if !slices.Contains(fuzzKinds, e.Kind) {
		t.Fatalf("accepted unknown kind %q", e.Kind)
	}
	all := append([]string{e.ID, e.Impression, e.Kind, e.Session, e.Department, e.GroupsHash, e.Query, e.Term, e.Doc}, e.Terms...)
	for _, v := range append(all, e.Sources...) {
		if !utf8.ValidString(v) || len(v) > MaxFieldBytes || strings.IndexByte(v, 0) >= 0 {
			t.Fatalf("accepted bad field %q", v)
		}
	}
	switch {
	case e.ID == "" || e.Impression == "":
		t.Fatalf("accepted an event without id or impression: %+v", e)
	case (e.Kind == KindAccept || e.Kind == KindDismiss) && e.Term == "":
		t.Fatalf("accepted %s without term", e.Kind)
	case (e.Kind == KindClick || e.Kind == KindMarkUseful) && e.Doc == "":
		t.Fatalf("accepted %s without doc", e.Kind)
	case e.Position < 0 || e.Rank < 0:
		t.Fatalf("accepted negative position %d or rank %d", e.Position, e.Rank)
	case e.Time.IsZero() || !time.Unix(0, e.Time.UnixNano()).Equal(e.Time):
		t.Fatalf("accepted time %v that Unix nanoseconds cannot hold", e.Time)
	case e.Kind == KindImpression && e.Term != "":
		t.Fatalf("accepted an impression with a single term %q", e.Term)
	case len(e.Terms) > MaxTerms:
		t.Fatalf("accepted %d terms", len(e.Terms))
	case len(e.Terms) > 0 && e.Kind != KindImpression && e.Kind != KindClick:
		t.Fatalf("accepted terms on %s", e.Kind)
	case slices.Contains(e.Terms, ""):
		t.Fatalf("accepted an empty term in %q", e.Terms)
	case len(e.Sources) > 0 && (e.Kind != KindImpression || len(e.Sources) != len(e.Terms)):
		t.Fatalf("accepted %d sources for %d terms on %s", len(e.Sources), len(e.Terms), e.Kind)
	}
	for _, list := range [][]string{e.Terms, e.Sources} {
		back, err := decodeList(encodeList(list))
		if err != nil || len(back) != len(list) || (len(list) > 0 && !reflect.DeepEqual(back, list)) {
			t.Fatalf("list %q stored and read back as %q, %v", list, back, err)
		}
	}
}
