package store

import (
	"context"
	"database/sql"
	"encoding/json"
	"fmt"
	"strings"
)

// txWriter writes batches inside one group transaction. Each batch costs
// a handful of statements whatever its size (multi-row INSERTs), since on
// PostgreSQL the round trips, not the commit, dominate.
type txWriter struct {
	s   *Store
	ctx context.Context
	tx  *sql.Tx
}

// rowsPerStatement bounds multi-row INSERTs: 500 rows of 14 columns stay
// far below SQLite's default 32766 host parameters and PostgreSQL's 65535.
const rowsPerStatement = 500

var eventCols = "id, impression, kind, at_ns, session_id, department, groups_hash, query_key, term, pos, doc, doc_rank, terms, sources"

// writeBatch inserts one validated batch. An id already stored (or twice
// in the batch) gives ErrReplay; an event whose impression is neither
// stored nor in the batch gives ErrUnknownImpression. Errors name the
// first offending event's index. The caller rolls the batch back on
// either.
func (w *txWriter) writeBatch(batch []Event) error {
	if err := duplicates(batch); err != nil {
		return err
	}
	defined := map[string]bool{}
	for i := range batch {
		if batch[i].Kind == KindImpression {
			defined[batch[i].Impression] = true
		}
	}
	var need []string
	seen := map[string]bool{}
	for i := range batch {
		if id := batch[i].Impression; !defined[id] && !seen[id] {
			seen[id] = true
			need = append(need, id)
		}
	}
	if len(need) > 0 {
		found, err := w.existing(need)
		if err != nil {
			return err
		}
		for i := range batch {
			if id := batch[i].Impression; !defined[id] && !found[id] {
				return fmt.Errorf("%w: event %d (id %q): impression %q", ErrUnknownImpression, i, batch[i].ID, id)
			}
		}
	}
	rows := make([][]any, len(batch))
	var imps, terms [][]any
	for i := range batch {
		e := &batch[i]
		rows[i] = []any{e.ID, e.Impression, e.Kind, e.Time.UnixNano(), e.Session, e.Department, e.GroupsHash,
			e.Query, e.Term, e.Position, e.Doc, e.Rank, encodeList(e.Terms), encodeList(e.Sources)}
		if e.Kind != KindImpression {
			continue
		}
		imps = append(imps, []any{e.Impression, e.ID, e.Time.UnixNano()})
		for j, t := range e.Terms {
			src := ""
			if len(e.Sources) > 0 {
				src = e.Sources[j]
			}
			terms = append(terms, []any{e.Impression, j, t, src})
		}
	}
	inserted, err := w.insert("events ("+eventCols+")", rows, "ON CONFLICT (id) DO NOTHING RETURNING id")
	if err != nil {
		return err
	}
	for i := range batch {
		if !inserted[batch[i].ID] {
			return fmt.Errorf("%w: event %d: id %q already stored", ErrReplay, i, batch[i].ID)
		}
	}
	if len(imps) == 0 {
		return nil
	}
	inserted, err = w.insert("impressions (id, event_id, at_ns)", imps, "ON CONFLICT (id) DO NOTHING RETURNING id")
	if err != nil {
		return err
	}
	for i := range batch {
		if batch[i].Kind == KindImpression && !inserted[batch[i].Impression] {
			return fmt.Errorf("%w: event %d: impression %q already recorded", ErrReplay, i, batch[i].Impression)
		}
	}
	_, err = w.insert("impression_terms (impression, pos, term, sources)", terms, "")
	return err
}

// duplicates rejects an event id, or an impression id of an impression
// event, that appears twice in one batch.
func duplicates(batch []Event) error {
	ids, imps := map[string]bool{}, map[string]bool{}
	for i := range batch {
		e := &batch[i]
		if ids[e.ID] {
			return fmt.Errorf("%w: event %d: id %q repeated in batch", ErrReplay, i, e.ID)
		}
		ids[e.ID] = true
		if e.Kind == KindImpression {
			if imps[e.Impression] {
				return fmt.Errorf("%w: event %d: impression %q repeated in batch", ErrReplay, i, e.Impression)
			}
			imps[e.Impression] = true
		}
	}
	return nil
}

// existing returns which of ids are stored impressions.
func (w *txWriter) existing(ids []string) (map[string]bool, error) {
	found := map[string]bool{}
	for start := 0; start < len(ids); start += rowsPerStatement {
		chunk := ids[start:min(start+rowsPerStatement, len(ids))]
		args := make([]any, len(chunk))
		for i, id := range chunk {
			args[i] = id
		}
		q := "SELECT id FROM impressions WHERE id IN (" + strings.TrimSuffix(strings.Repeat("?, ", len(chunk)), ", ") + ")"
		if err := w.collect(q, args, found); err != nil {
			return nil, err
		}
	}
	return found, nil
}

// insert runs "INSERT INTO table VALUES (...), (...) suffix" in chunks. If
// suffix has a RETURNING clause, it returns the set of returned values.
func (w *txWriter) insert(table string, rows [][]any, suffix string) (map[string]bool, error) {
	out := map[string]bool{}
	if len(rows) == 0 {
		return out, nil
	}
	tuple := "(" + strings.TrimSuffix(strings.Repeat("?, ", len(rows[0])), ", ") + ")"
	for start := 0; start < len(rows); start += rowsPerStatement {
		chunk := rows[start:min(start+rowsPerStatement, len(rows))]
		var b strings.Builder
		b.WriteString("INSERT INTO " + table + " VALUES ")
		args := make([]any, 0, len(chunk)*len(rows[0]))
		for i, r := range chunk {
			if i > 0 {
				b.WriteString(", ")
			}
			b.WriteString(tuple)
			args = append(args, r...)
		}
		b.WriteString(" " + suffix)
		if !strings.Contains(suffix, "RETURNING") {
			if _, err := w.tx.ExecContext(w.ctx, w.s.d.q(b.String()), args...); err != nil {
				return nil, err
			}
			continue
		}
		if err := w.collect(b.String(), args, out); err != nil {
			return nil, err
		}
	}
	return out, nil
}

// collect runs a query returning one text column and adds its values to set.
func (w *txWriter) collect(q string, args []any, set map[string]bool) error {
	rows, err := w.tx.QueryContext(w.ctx, w.s.d.q(q), args...)
	if err != nil {
		return err
	}
	defer rows.Close()
	for rows.Next() {
		var v string
		if err := rows.Scan(&v); err != nil {
			return err
		}
		set[v] = true
	}
	return rows.Err()
}

// encodeList stores a string list as a JSON array ("[]" when empty).
// Marshalling a []string of valid UTF-8 cannot fail.
func encodeList(v []string) string {
	if len(v) == 0 {
		return "[]"
	}
	b, _ := json.Marshal(v)
	return string(b)
}

func decodeList(s string) ([]string, error) {
	if s == "" || s == "[]" {
		return nil, nil
	}
	var v []string
	if err := json.Unmarshal([]byte(s), &v); err != nil {
		return nil, fmt.Errorf("store: decode list: %w", err)
	}
	return v, nil
}
