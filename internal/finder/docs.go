package finder

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"strings"
	"time"

	"kinword/internal/access"
	"kinword/internal/doc"
	"kinword/internal/index"
	"kinword/internal/ingest"
)

// MaxPushBatch is the most documents one PutDocuments call takes.
const MaxPushBatch = 100

// PushSource is doc.Document.Source for pushed documents. It is not a
// path, so an ingest of folders never removes them as vanished files.
const PushSource = "api:documents"

// ErrInvalidDocument wraps every problem with pushed documents; nothing of
// a batch that has one is written.
var ErrInvalidDocument = errors.New("finder: invalid document")

// DocumentIn is one pushed document, as the document API receives it.
type DocumentIn struct {
	// ID is the stable identifier; a known ID is replaced. Required.
	ID string `json:"id"`
	// Title defaults to the ID.
	Title string `json:"title"`
	// URL is where a searcher opens the document.
	URL string `json:"url"`
	// Department owns the document (lower-cased).
	Department string `json:"department"`
	// Groups restrict who may read it; none means open to everyone.
	Groups []string `json:"groups"`
	// Body is the text, paragraphs separated by blank lines. Required.
	Body string `json:"body"`
	// Lang is a Snowball language name; empty means the default.
	Lang string `json:"lang"`
	// Updated is the last change, RFC 3339 or YYYY-MM-DD (UTC when no
	// zone is given); empty means the time of the push.
	Updated string `json:"updated"`
}

// PushResult counts what a push or a delete changed.
type PushResult struct {
	// Added counts IDs that were new.
	Added int `json:"added"`
	// Replaced counts IDs that existed and were overwritten.
	Replaced int `json:"replaced"`
	// Deleted counts IDs removed (unknown IDs are not counted).
	Deleted int `json:"deleted"`
	// Documents is the number of documents searchable after the commit.
	Documents int `json:"documents"`
}

// PutDocuments adds or replaces documents by ID, commits, and makes them
// searchable before it returns. Each document is checked by the same rules
// as a JSON line at ingest (ingest.ParseJSONLine: id required, text
// required, UTF-8, groups and department lower-cased), and analysed by the
// index's one text pipeline. Where ingest would fall back and warn (a date
// it cannot read, an unknown language) a push is refused instead: the
// caller can fix its request, and there is no file to take a time from.
// Every problem of the batch is reported at once, wrapping
// ErrInvalidDocument, and then nothing is written.
func (f *Finder) PutDocuments(ctx context.Context, in []DocumentIn) (PushResult, error) {
	s, err := f.acquire()
	if err != nil {
		return PushResult{}, err
	}
	defer s.release()
	ix := s.h.ix
	if len(in) == 0 || len(in) > MaxPushBatch {
		return PushResult{}, fmt.Errorf("%w: send 1 to %d documents, not %d", ErrInvalidDocument, MaxPushBatch, len(in))
	}
	now := time.Now().UTC()
	docs := make([]doc.Document, 0, len(in))
	var problems []string
	seen := map[string]int{}
	for i, d := range in {
		out, err := pushedDocument(d, f.p.DefaultLanguage(), now)
		if err == nil {
			if j, dup := seen[out.ID]; dup {
				err = fmt.Errorf("id %q is also document %d", out.ID, j)
			}
			seen[out.ID] = i
		}
		if err != nil {
			problems = append(problems, fmt.Sprintf("document %d: %v", i, err))
			continue
		}
		docs = append(docs, out)
	}
	if len(problems) > 0 {
		return PushResult{}, fmt.Errorf("%w: %s", ErrInvalidDocument, strings.Join(problems, "; "))
	}
	f.wmu.Lock()
	defer f.wmu.Unlock()
	var res PushResult
	all := everything(ix)
	for _, d := range docs {
		if _, ok := all.DocNum(d.ID); ok {
			res.Replaced++
		} else {
			res.Added++
		}
	}
	// Once checked, a batch is written and committed whole: a client that
	// goes away mid-request does not leave it uncommitted.
	wctx := context.WithoutCancel(ctx)
	if err := ix.Put(wctx, docs); err != nil {
		return PushResult{}, fmt.Errorf("finder: push: %w", err)
	}
	if err := f.commit(wctx, ix); err != nil {
		return PushResult{}, err
	}
	res.Documents = ix.Len()
	return res, nil
}

// DeleteDocuments removes documents by ID, commits, and returns how many
// existed. Unknown IDs are not an error.
func (f *Finder) DeleteDocuments(ctx context.Context, ids []string) (PushResult, error) {
	s, err := f.acquire()
	if err != nil {
		return PushResult{}, err
	}
	defer s.release()
	ix := s.h.ix
	var clean []string
	for _, id := range ids {
		if id = strings.TrimSpace(id); id != "" {
			clean = append(clean, id)
		}
	}
	if len(clean) == 0 || len(clean) > MaxPushBatch {
		return PushResult{}, fmt.Errorf("%w: name 1 to %d document IDs", ErrInvalidDocument, MaxPushBatch)
	}
	f.wmu.Lock()
	defer f.wmu.Unlock()
	var res PushResult
	all := everything(ix)
	var known []string
	for _, id := range clean {
		if _, ok := all.DocNum(id); ok {
			known = append(known, id)
		}
	}
	if len(known) > 0 {
		wctx := context.WithoutCancel(ctx)
		if err := ix.Delete(wctx, known); err != nil {
			return PushResult{}, fmt.Errorf("finder: delete: %w", err)
		}
		if err := f.commit(wctx, ix); err != nil {
			return PushResult{}, err
		}
	}
	res.Deleted = len(known)
	res.Documents = ix.Len()
	return res, nil
}

// commit makes written documents durable and searchable: the index swaps
// in its new snapshot, which is warmed here rather than by the next
// search, and cached suggestion lists are dropped. Writes go to the index
// published when the request started; after a Swap they are not served.
func (f *Finder) commit(ctx context.Context, ix *index.Index) error {
	if err := ix.Commit(ctx); err != nil {
		return fmt.Errorf("finder: commit: %w", err)
	}
	ix.Warm()
	f.cache.Flush()
	return nil
}

// everything is a view that may read every document (for existence
// checks only; nothing from it reaches a viewer).
func everything(ix *index.Index) *index.View {
	return ix.View(access.Viewer{Groups: ix.Groups()})
}

// pushedDocument checks one pushed document through ingest's JSON line
// rules and builds it; defLang is the language when it names none, now
// its time when it gives none.
func pushedDocument(in DocumentIn, defLang string, now time.Time) (doc.Document, error) {
	line := map[string]any{"id": in.ID, "text": in.Body}
	for k, v := range map[string]string{"title": in.Title, "url": in.URL, "department": in.Department, "modified": in.Updated} {
		if v != "" {
			line[k] = v
		}
	}
	if in.Groups != nil {
		line["groups"] = in.Groups
	}
	raw, err := json.Marshal(line) // keys sorted: the hash is stable
	if err != nil {
		return doc.Document{}, err
	}
	title, body, meta, err := ingest.ParseJSONLine(raw)
	if err != nil {
		return doc.Document{}, err
	}
	if body == "" {
		return doc.Document{}, fmt.Errorf("id %q: %w", meta.ID, ingest.ErrEmpty)
	}
	if len(meta.Warnings) > 0 || (in.Updated != "" && meta.Modified.IsZero()) {
		return doc.Document{}, fmt.Errorf("id %q: updated %q is not a date (want RFC 3339 or YYYY-MM-DD)", meta.ID, in.Updated)
	}
	d := doc.Document{ID: meta.ID, Title: title, Body: body, URL: meta.URL, Department: meta.Department,
		Modified: meta.Modified, Source: PushSource, Hash: doc.HashBytes(raw), Language: defLang}
	if d.Title == "" {
		d.Title = d.ID
	}
	if len(meta.Groups) > 0 {
		d.Groups = meta.Groups
	}
	if d.Modified.IsZero() {
		d.Modified = now
	}
	if in.Lang != "" {
		l, ok := ingest.NormalizeLanguage(in.Lang)
		if !ok {
			return doc.Document{}, fmt.Errorf("id %q: unknown language %q", d.ID, in.Lang)
		}
		d.Language = l
	}
	return d, nil
}
