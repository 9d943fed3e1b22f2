package prefs

import (
	"slices"
	"strings"
	"time"
)

// Strings are interned to int32 ids and id pairs packed into uint64 map
// keys (the runtime's fast path), which keeps Build on large logs cheap.
func pack(a, b int32) uint64 { return uint64(uint32(a))<<32 | uint64(uint32(b)) }

// unit is one capped unit of evidence: a session counts at most once per
// (query, term) per UTC day for examinations and once for accepts. The
// surviving event of a unit is the latest one (ties: the lowest position),
// so the result does not depend on input order.
type unit struct {
	day    int64
	accept bool
	at     int64 // Unix nanoseconds
	pos    int
}

// pairRec holds the units of one (department+session, query+term) pair.
type pairRec struct {
	ds, qt int32 // indexes into Builder.dsKeys and Builder.qtKeys
	units  []unit
}

// Builder accumulates events for streaming use; Snapshot turns them into an
// immutable Model. A Builder is not safe for concurrent use.
type Builder struct {
	opts   Options
	names  map[string]int32
	dsIdx  map[uint64]int32 // pack(dept, session) → index
	dsKeys []uint64
	qtIdx  map[uint64]int32 // pack(query, term) → index
	qtKeys []uint64
	pairs  map[uint64]int32 // pack(ds, qt) → index into recs
	recs   []pairRec

	snippets []SnippetClick // result clicks with their snippets' stems
}

// NewBuilder returns an empty Builder; opts are completed with defaults.
func NewBuilder(opts Options) *Builder {
	return &Builder{opts: opts.withDefaults(), names: make(map[string]int32),
		dsIdx: make(map[uint64]int32), qtIdx: make(map[uint64]int32),
		pairs: make(map[uint64]int32)}
}

// Add records one event. Impressions and dismissals are examinations; accepts
// and clicks are acceptances and also examinations (a logged accept implies
// the term was seen, so E ≥ accepts). Unknown kinds and events without a
// query or term are ignored.
func (b *Builder) Add(ev Event) {
	if ev.Query == "" {
		return
	}
	switch ev.Kind {
	case KindImpression, KindDismiss, KindAccept, KindClick:
	default:
		return
	}
	day := ev.Time.UTC().Unix()
	if day < 0 {
		day -= 86399 // floor division for times before 1970
	}
	c := eventCtx{
		ds:    index(b.dsIdx, &b.dsKeys, pack(b.intern(ev.Department), b.intern(ev.Session))),
		query: b.intern(ev.Query),
		day:   day / 86400,
		at:    ev.Time.UnixNano(),
	}
	switch ev.Kind {
	case KindImpression:
		if len(ev.Shown) == 0 {
			b.put(c, ev.Term, ev.Position, false)
			return
		}
		for i, t := range ev.Shown {
			b.put(c, t, i, false)
		}
	case KindDismiss:
		b.put(c, ev.Term, ev.Position, false)
	case KindAccept, KindClick:
		b.put(c, ev.Term, ev.Position, false)
		b.put(c, ev.Term, ev.Position, true)
	}
}

// eventCtx is what the units of one event share.
type eventCtx struct {
	ds, query int32
	day, at   int64
}

func (b *Builder) intern(s string) int32 {
	id, ok := b.names[s]
	if !ok {
		id = int32(len(b.names))
		b.names[s] = id
	}
	return id
}

// index returns the index of key in idx, appending it to keys if new.
func index(idx map[uint64]int32, keys *[]uint64, key uint64) int32 {
	i, ok := idx[key]
	if !ok {
		i = int32(len(*keys))
		idx[key] = i
		*keys = append(*keys, key)
	}
	return i
}

func (b *Builder) put(c eventCtx, term string, pos int, accept bool) {
	if term == "" {
		return
	}
	ds, day, at := c.ds, c.day, c.at
	qt := index(b.qtIdx, &b.qtKeys, pack(c.query, b.intern(term)))
	pk := pack(ds, qt)
	r, ok := b.pairs[pk]
	if !ok {
		r = int32(len(b.recs))
		b.pairs[pk] = r
		b.recs = append(b.recs, pairRec{ds: ds, qt: qt})
	}
	rec := &b.recs[r]
	for i := range rec.units {
		u := &rec.units[i]
		if u.day == day && u.accept == accept {
			if at > u.at || (at == u.at && pos < u.pos) {
				u.at, u.pos = at, pos
			}
			return
		}
	}
	rec.units = append(rec.units, unit{day: day, accept: accept, at: at, pos: pos})
}

// Build is NewBuilder, Add for every event, then Snapshot(now).
func Build(events []Event, now time.Time, opts Options) *Model {
	b := NewBuilder(opts)
	for _, ev := range events {
		b.Add(ev)
	}
	return b.Snapshot(now)
}

// queryTerms splits a canonical query key into its distinct terms.
func queryTerms(query string, dst []string) []string {
	dst = append(dst, strings.Fields(query)...)
	slices.Sort(dst)
	return slices.Compact(dst)
}
