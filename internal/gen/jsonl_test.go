package gen

import (
	"bufio"
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"reflect"
	"slices"
	"testing"
	"unicode/utf8"

	"kinword/internal/doc"
)

// The JSON lines must decode with encoding/json (the reference decoder)
// into exactly the documents Generate yields, with exactly the ingest keys.
func TestJSONLMatchesGenerate(t *testing.T) {
	opts := Options{
		Docs:        400,
		Departments: []string{"field-operations", `odd "dept"\slug`, "café/ünïcode"},
		CanaryTerms: map[string]string{"executive": "zz9canary"},
	}
	want := collect(t, opts)
	sc := bufio.NewScanner(bytes.NewReader(jsonl(t, opts)))
	sc.Buffer(make([]byte, 1<<20), 1<<24)
	keys := []string{"department", "groups", "id", "language", "modified", "text", "title", "url"}
	i := 0
	for ; sc.Scan(); i++ {
		var got doc.Document
		if err := json.Unmarshal(sc.Bytes(), &got); err != nil {
			t.Fatalf("line %d: %v", i+1, err)
		}
		var raw map[string]json.RawMessage
		if err := json.Unmarshal(sc.Bytes(), &raw); err != nil {
			t.Fatalf("line %d: %v", i+1, err)
		}
		var have []string
		for k := range raw {
			have = append(have, k)
		}
		slices.Sort(have)
		if !slices.Equal(have, keys) {
			t.Fatalf("line %d keys %v, want %v", i+1, have, keys)
		}
		if len(got.Groups) == 0 {
			got.Groups = nil // "groups":[] for open documents
		}
		if !reflect.DeepEqual(got, want[i]) {
			t.Fatalf("line %d:\n got %+v\nwant %+v", i+1, got, want[i])
		}
	}
	if err := sc.Err(); err != nil || i != len(want) {
		t.Fatalf("read %d lines of %d (%v)", i, len(want), err)
	}
}

func TestJSONLProgress(t *testing.T) {
	cases := []struct {
		name string
		docs int
		want []int
	}{
		{"under one step", 300, []int{300}},
		{"exact steps", 2000, []int{1000, 2000}},
		{"remainder", 2500, []int{1000, 2000, 2500}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var got []int
			err := WriteJSONL(context.Background(), Options{Docs: c.docs, MeanWords: 30}, &bytes.Buffer{},
				func(done int) { got = append(got, done) })
			if err != nil || !slices.Equal(got, c.want) {
				t.Errorf("progress %v (%v), want %v", got, err, c.want)
			}
		})
	}
}

type failWriter struct{ err error }

func (f failWriter) Write([]byte) (int, error) { return 0, f.err }

func TestJSONLWriteError(t *testing.T) {
	boom := errors.New("disk full")
	err := WriteJSONL(context.Background(), Options{Docs: 10}, failWriter{boom}, nil)
	if !errors.Is(err, boom) {
		t.Errorf("err = %v, want wrapping %v", err, boom)
	}
}

// FuzzAppendJSONString checks the string encoder against encoding/json:
// both must decode to the same string (invalid UTF-8 becomes U+FFFD in
// both), and the result must be valid JSON.
func FuzzAppendJSONString(f *testing.F) {
	for _, s := range []string{"", "plain", "quote\" back\\slash", "tab\tnl\ncr\r\x00\x1f", "é✓\U0001F600", "\xff\xfe bad", "<&>\u2028"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		enc := appendJSONString([]byte("x"), s)[1:]
		if !json.Valid(enc) {
			t.Fatalf("invalid JSON %q for %q", enc, s)
		}
		var got, want string
		if err := json.Unmarshal(enc, &got); err != nil {
			t.Fatal(err)
		}
		ref, _ := json.Marshal(s)
		if err := json.Unmarshal(ref, &want); err != nil {
			t.Fatal(err)
		}
		if got != want {
			t.Fatalf("decoded %q, encoding/json gives %q", got, want)
		}
		if utf8.ValidString(s) && got != s {
			t.Fatalf("valid UTF-8 %q did not round-trip: %q", s, got)
		}
		if b := appendJSONString(nil, []byte(s)); !bytes.Equal(b, enc) {
			t.Fatalf("[]byte and string encodings differ: %q vs %q", b, enc)
		}
	})
}
