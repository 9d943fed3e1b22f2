package eval

import (
	"bytes"
	"errors"
	"fmt"
	"reflect"
	"slices"
	"strings"
	"testing"
	"unicode"
)

// Properties checked for every input: the readers never panic, every error
// matches ErrMalformed, and whatever is accepted survives a write/read
// round trip unchanged.

func FuzzReadTopics(f *testing.F) {
	for _, s := range []string{
		"1\tquery one\n2\tbilling\tquery two\n",
		"\ufeff7\t a \r\n\n",
		"1\ta\t\tb\n", "\t\n", "1\tx\n1\ty\n", "a b\tc",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, in string) {
		topics, err := ReadTopics(strings.NewReader(in))
		if err != nil {
			if !errors.Is(err, ErrMalformed) {
				t.Fatalf("error %v does not match ErrMalformed", err)
			}
			return
		}
		var b strings.Builder
		b.WriteString("\n") // keep a leading byte-order mark in an id intact
		seen := map[string]bool{}
		for _, tp := range topics {
			if tp.ID == "" || strings.ContainsFunc(tp.ID, unicode.IsSpace) || tp.Text == "" || seen[tp.ID] {
				t.Fatalf("accepted bad topic %+v", tp)
			}
			seen[tp.ID] = true
			if tp.Department != "" {
				fmt.Fprintf(&b, "%s\t%s\t%s\n", tp.ID, tp.Department, tp.Text)
			} else {
				fmt.Fprintf(&b, "%s\t%s\n", tp.ID, tp.Text)
			}
		}
		back, err := ReadTopics(strings.NewReader(b.String()))
		if err != nil || !reflect.DeepEqual(back, topics) {
			t.Fatalf("round trip: %+v, %v; want %+v", back, err, topics)
		}
	})
}

func FuzzReadQrels(f *testing.F) {
	for _, s := range []string{
		"1 0 12 2\n1 0 13 0\n", "2\t0\td9\t-1\r\n", "1 0 12\n", "1 0 12 x\n", "1 0 a 1\n1 0 a 2\n",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, in string) {
		q, err := ReadQrels(strings.NewReader(in))
		if err != nil {
			if !errors.Is(err, ErrMalformed) {
				t.Fatalf("error %v does not match ErrMalformed", err)
			}
			return
		}
		var b strings.Builder
		b.WriteString("\n")
		for _, qid := range q.Topics() {
			docs := make([]string, 0, len(q[qid]))
			for d := range q[qid] {
				docs = append(docs, d)
			}
			slices.Sort(docs)
			for _, d := range docs {
				fmt.Fprintf(&b, "%s 0 %s %d\n", qid, d, q[qid][d])
			}
		}
		back, err := ReadQrels(strings.NewReader(b.String()))
		if err != nil || !reflect.DeepEqual(back, q) {
			t.Fatalf("round trip: %v, %v; want %v", back, err, q)
		}
	})
}

func FuzzReadRun(f *testing.F) {
	for _, s := range []string{
		"1 Q0 d1 1 0.5 bm25\n1 Q0 d2 2 0.5 bm25\n10 Q0 d1 1 -3e2 bm25\n",
		"1 Q0 d1 1 NaN t\n", "1 Q0 d1 x 1 t\n", "1 Q0 d1 1 1 a\n1 Q0 d2 1 1 b\n", "1 Q0 d1 1 1 a\n1 Q0 d1 2 1 a\n",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, in string) {
		runs, tag, err := ReadRun(strings.NewReader(in))
		if err != nil {
			if !errors.Is(err, ErrMalformed) {
				t.Fatalf("error %v does not match ErrMalformed", err)
			}
			return
		}
		if len(runs) == 0 {
			return
		}
		var b bytes.Buffer
		if err := WriteRun(&b, tag, runs); err != nil {
			t.Fatalf("WriteRun rejected what ReadRun accepted: %v", err)
		}
		back, backTag, err := ReadRun(&b)
		if err != nil || backTag != tag || !reflect.DeepEqual(back, runs) {
			t.Fatalf("round trip: %v %q %v; want %v %q", back, backTag, err, runs, tag)
		}
	})
}
