package ingest

import (
	"errors"
	"reflect"
	"strings"
	"testing"
	"time"
)

func TestParseJSONLine(t *testing.T) {
	cases := []struct {
		name, in    string
		title, body string
		meta        Meta
		err         error
	}{
		{name: "all fields",
			in:    `{"id":"kb-7","title":"Meter Reading","text":"Read meters monthly.\n\nLog in the app.","url":"https://intranet.invalid/kb/7","department":"Customer-Service","groups":["Staff","billing"],"language":"es","modified":"2024-01-02T03:04:05Z","extra":1}`,
			title: "Meter Reading", body: "Read meters monthly.\n\nLog in the app.",
			meta: Meta{ID: "kb-7", Title: "Meter Reading", URL: "https://intranet.invalid/kb/7", Department: "customer-service",
				Groups: []string{"billing", "staff"}, Language: "es", Modified: time.Date(2024, 1, 2, 3, 4, 5, 0, time.UTC)}},
		// JSON numbers keep their text (RFC 8259, section 6).
		{name: "numeric id", in: `{"id": 12345678901234567890, "text": "x"}`, body: "x", meta: Meta{ID: "12345678901234567890"}},
		{name: "comma groups", in: `{"id":"a","text":"x","groups":"hr, HR ,payroll"}`, body: "x", meta: Meta{ID: "a", Groups: []string{"hr", "payroll"}}},
		// \u escapes incl. a surrogate pair for U+1F4A7 (RFC 8259, section 7).
		{name: "unicode escapes", in: `{"id":"u","text":"caf\u00e9 \ud83d\udca7"}`, body: "café \U0001F4A7", meta: Meta{ID: "u"}},
		{name: "missing id", in: `{"text":"x"}`, err: ErrMalformedLine},
		{name: "empty id", in: `{"id":"","text":"x"}`, err: ErrMalformedLine},
		{name: "missing text", in: `{"id":"a"}`, err: ErrMalformedLine},
		{name: "text not a string", in: `{"id":"a","text":5}`, err: ErrMalformedLine},
		{name: "groups object", in: `{"id":"a","text":"x","groups":{"a":1}}`, err: ErrMalformedLine},
		{name: "not an object", in: `["id","text"]`, err: ErrMalformedLine},
		{name: "null", in: `null`, err: ErrMalformedLine},
		{name: "trailing data", in: `{"id":"a","text":"x"} {"id":"b"}`, err: ErrMalformedLine},
		{name: "truncated", in: `{"id":"a","text":"x`, err: ErrMalformedLine},
		// JSON Lines requires UTF-8 (jsonlines.org, "UTF-8 Encoding").
		{name: "invalid UTF-8", in: "{\"id\":\"a\",\"text\":\"\xff\"}", err: ErrInvalidUTF8},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			title, body, meta, err := ParseJSONLine([]byte(c.in))
			if c.err != nil {
				if !errors.Is(err, c.err) {
					t.Fatalf("err = %v, want %v", err, c.err)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if title != c.title || body != c.body || !reflect.DeepEqual(meta, c.meta) {
				t.Errorf("got %q %q %+v\nwant %q %q %+v", title, body, meta, c.title, c.body, c.meta)
			}
		})
	}
}

func TestJSONLFile(t *testing.T) {
	long := `{"id":"long","text":"` + strings.Repeat("x", 300) + `"}`
	cases := []struct {
		name    string
		content string
		want    []string // "path-suffix=id" for documents, "path-suffix!label" for skips
	}{
		{name: "blank lines counted, CRLF tolerated", content: "{\"id\":\"a\",\"text\":\"A\"}\r\n\r\n\n{\"id\":\"b\",\"text\":\"B\"}",
			want: []string{"#L1=a", "#L4=b"}},
		{name: "line over the limit", content: long + "\n" + `{"id":"ok","text":"fine"}` + "\n", want: []string{"#L1!too large", "#L2=ok"}},
		{name: "empty text and malformed", content: "{\"id\":\"e\",\"text\":\"  \"}\nnot json\n", want: []string{"#L1!empty", "#L2!malformed line"}},
		{name: "empty file", content: "\n\n", want: []string{"x.jsonl!empty"}},
		{name: "binary file", content: "\x00\x00\x00", want: []string{"x.jsonl!binary"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			writeFiles(t, dir, map[string]string{"x.jsonl": c.content})
			var got []string
			for _, it := range walkAll(t, []string{dir}, Options{MaxBytes: 200}) {
				suffix := it.Path[strings.LastIndex(it.Path, "x.jsonl")+len("x.jsonl"):]
				if suffix == "" {
					suffix = "x.jsonl"
				}
				if it.Skip != nil {
					got = append(got, suffix+"!"+Label(it.Skip.Kind()))
				} else {
					got = append(got, suffix+"="+it.Doc.ID)
					if !strings.HasSuffix(it.Doc.Source, "x.jsonl"+suffix) || it.Doc.URL != "" {
						t.Errorf("source %q url %q", it.Doc.Source, it.Doc.URL)
					}
				}
			}
			if !reflect.DeepEqual(got, c.want) {
				t.Errorf("got %v, want %v", got, c.want)
			}
		})
	}
}
