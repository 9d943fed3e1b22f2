package finder

import (
	"context"
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
	"time"

	"kinword/internal/access"
	"kinword/internal/doc"
	"kinword/internal/ingest"
	"kinword/internal/text"
)

// openTestFinder indexes two open documents and opens a finder on them.
func openTestFinder(t *testing.T) (*Finder, string) {
	t.Helper()
	dir := writeDataDir(t, []doc.Document{
		{ID: "a", Title: "Main break response", Body: "Crews isolate the valve after a main break."},
		{ID: "b", Title: "Burst pipe advice", Body: "A burst pipe in the street is a main break."},
	})
	p, err := text.NewPipeline("")
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	f, err := Open(ctx, dir, p, Options{})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { f.Close() })
	return f, dir
}

// ingestLine ingests one JSON line through ingest.Walk, the path `kinword
// ingest` takes for a .jsonl file.
func ingestLine(t *testing.T, line map[string]any) ingest.Item {
	t.Helper()
	b, err := json.Marshal(line)
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, "push.jsonl"), append(b, '\n'), 0o644); err != nil {
		t.Fatal(err)
	}
	var items []ingest.Item
	if err := ingest.Walk(context.Background(), []string{dir}, ingest.Options{Workers: 1}, func(it ingest.Item) error {
		items = append(items, it)
		return nil
	}); err != nil {
		t.Fatal(err)
	}
	if len(items) != 1 {
		t.Fatalf("%d items from one line", len(items))
	}
	return items[0]
}

// TestDocumentPushMatchesIngest: a pushed document is the document that
// ingesting the same fields as a JSON line gives (ingest is the reference:
// title, text paragraphs, department and groups normalisation, language
// codes, dates), and a document ingest skips is refused for the same
// reason.
func TestDocumentPushMatchesIngest(t *testing.T) {
	f, _ := openTestFinder(t)
	now := time.Date(2025, 1, 2, 3, 4, 5, 0, time.UTC)
	cases := []struct {
		name string
		in   DocumentIn
		line map[string]any // the same document as a JSON line
		skip error          // the reason ingest skips it, nil = indexed
	}{
		{"full", DocumentIn{ID: "ops/rota", Title: "  Standby   rota ", URL: "https://intranet.example/rota", Department: "Field-Operations",
			Groups: []string{"Ops", "staff", "ops"}, Body: "Line one\r\nline two\r\n\r\nSecond paragraph.", Lang: "fr", Updated: "2024-05-06"},
			map[string]any{"id": "ops/rota", "title": "  Standby   rota ", "url": "https://intranet.example/rota", "department": "Field-Operations",
				"groups": []string{"Ops", "staff", "ops"}, "text": "Line one\r\nline two\r\n\r\nSecond paragraph.", "language": "fr", "modified": "2024-05-06"}, nil},
		{"minimal: title from the id", DocumentIn{ID: " 42 ", Body: "Numbers are ids too.", Updated: "2024-05-06T10:00:00+02:00"},
			map[string]any{"id": " 42 ", "text": "Numbers are ids too.", "modified": "2024-05-06T10:00:00+02:00"}, nil},
		{"missing id", DocumentIn{Body: "text"}, map[string]any{"text": "text"}, ingest.ErrMalformedLine},
		{"blank text", DocumentIn{ID: "x", Body: " \n "}, map[string]any{"id": "x", "text": " \n "}, ingest.ErrEmpty},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			ref := ingestLine(t, c.line)
			got, err := pushedDocument(c.in, f.Pipeline().DefaultLanguage(), now)
			if c.skip != nil {
				if ref.Skip == nil || !errors.Is(ref.Skip.Reason, c.skip) {
					t.Fatalf("reference: ingest did not skip for %v: %+v", c.skip, ref)
				}
				if !errors.Is(err, c.skip) {
					t.Fatalf("push error %v, want %v", err, c.skip)
				}
				return
			}
			if err != nil || ref.Doc == nil {
				t.Fatalf("push error %v, ingest skip %+v", err, ref.Skip)
			}
			want := *ref.Doc
			want.Source, want.Hash = PushSource, got.Hash
			if !reflect.DeepEqual(got, want) {
				t.Errorf("pushed\n%+v\ningested\n%+v", got, want)
			}
		})
	}
}

// TestDocumentPushAndDelete: PutDocuments and DeleteDocuments commit, the
// next Search sees the change, and the counts say what changed; an invalid
// document refuses the whole batch.
func TestDocumentPushAndDelete(t *testing.T) {
	f, _ := openTestFinder(t)
	ctx := context.Background()
	total := func(q string) int {
		t.Helper()
		r, err := f.Search(ctx, Request{Query: q, Viewer: access.Anonymous, WithResults: true})
		if err != nil {
			t.Fatal(err)
		}
		return r.Total
	}
	steps := []struct {
		name  string
		do    func() (PushResult, error)
		want  PushResult
		bad   bool
		query string
		hits  int
	}{
		{"add two", func() (PushResult, error) {
			return f.PutDocuments(ctx, []DocumentIn{{ID: "c", Body: "Hydrant flushing in spring."}, {ID: "d", Body: "Hydrant survey."}})
		}, PushResult{Added: 2, Documents: 4}, false, "hydrant", 2},
		{"replace one", func() (PushResult, error) {
			return f.PutDocuments(ctx, []DocumentIn{{ID: "d", Body: "Reservoir survey."}})
		}, PushResult{Replaced: 1, Documents: 4}, false, "hydrant", 1},
		{"invalid batch", func() (PushResult, error) {
			return f.PutDocuments(ctx, []DocumentIn{{ID: "e", Body: "Hydrant map."}, {ID: "f"}})
		}, PushResult{}, true, "hydrant", 1},
		{"too many", func() (PushResult, error) {
			return f.PutDocuments(ctx, make([]DocumentIn, MaxPushBatch+1))
		}, PushResult{}, true, "hydrant", 1},
		{"delete known and unknown", func() (PushResult, error) {
			return f.DeleteDocuments(ctx, []string{"c", "nope"})
		}, PushResult{Deleted: 1, Documents: 3}, false, "hydrant", 0},
	}
	for _, st := range steps {
		t.Run(st.name, func(t *testing.T) {
			got, err := st.do()
			if st.bad != errors.Is(err, ErrInvalidDocument) || (!st.bad && err != nil) {
				t.Fatalf("err %v, want invalid=%v", err, st.bad)
			}
			if got != st.want {
				t.Errorf("counts %+v, want %+v", got, st.want)
			}
			if n := total(st.query); n != st.hits {
				t.Errorf("%q: %d hits, want %d", st.query, n, st.hits)
			}
		})
	}
	if st := f.Status(); st.Documents != 3 {
		t.Errorf("status documents %d, want 3", st.Documents)
	}
	if strings.TrimSpace(PushSource) == "" || filepath.IsAbs(PushSource) {
		t.Errorf("PushSource %q must not look like a path, or ingest would remove pushed documents", PushSource)
	}
}

// FuzzPushedDocument: any pushed fields either are refused with an error
// or give a document with an ID, a body, a known language, a lower-case
// department and normalised groups, the push source, and a stable hash.
func FuzzPushedDocument(f *testing.F) {
	f.Add("ops/rota", "Standby rota", "Field-Operations", "Ops,staff", "Line one\r\n\r\nline two", "fr", "2024-05-06")
	f.Add("", "", "", "", "text", "", "")
	f.Add(" 7 ", "t", "D", ",,", "\f", "xx", "yesterday")
	f.Fuzz(func(t *testing.T, id, title, dept, groups, body, lang, updated string) {
		in := DocumentIn{ID: id, Title: title, Department: dept, Body: body, Lang: lang, Updated: updated}
		if groups != "" {
			in.Groups = strings.Split(groups, ",")
		}
		now := time.Date(2025, 1, 1, 0, 0, 0, 0, time.UTC)
		d, err := pushedDocument(in, "english", now)
		if err != nil {
			return
		}
		if d.ID == "" || strings.TrimSpace(d.Body) == "" || d.Title == "" || d.Source != PushSource || d.Department != strings.ToLower(d.Department) {
			t.Fatalf("accepted a malformed document: %+v", d)
		}
		if !text.ValidLanguage(d.Language) {
			t.Fatalf("language %q", d.Language)
		}
		for _, g := range d.Groups {
			if g == "" || g != strings.ToLower(strings.TrimSpace(g)) {
				t.Fatalf("group %q not normalised", g)
			}
		}
		if again, _ := pushedDocument(in, "english", now); again.Hash != d.Hash {
			t.Fatalf("hash not stable")
		}
	})
}
