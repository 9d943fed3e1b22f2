package curate

import (
	"errors"
	"strings"
	"testing"
	"time"
)

func TestImportCSVReportsEveryLine(t *testing.T) {
	in := strings.Join([]string{
		"kind,query,term,department,start,expiry,reason,lang",
		`pin,burst pipes,emergency repairs,ops,,,"winter`,
		`plan",`,
		"promote,burst,leak,,,,,",
		"block,,leak,,2026-13-01,,,",
		"relate,boil notice,water quality,,,,,,",
		`pin,"burst" pipes,leak,,,,,`,
		"block,,leak,marketing,,,,",
		"relate,boil notice,flushing,,,,,",
		"",
	}, "\n")
	rules, rep, err := ImportCSV(strings.NewReader(in), Options{Departments: NewDepartmentSet("ops")})
	if !errors.Is(err, ErrImport) || rules != nil || rep.Rules != 0 {
		t.Fatalf("want ErrImport and no rules, got %v, %d rules", err, len(rules))
	}
	want := []struct {
		line int
		item string
	}{{2, "reason"}, {4, "kind"}, {5, "start"}, {6, "line"}, {7, "line"}, {8, "department"}}
	if len(rep.Rejected) != len(want) {
		t.Fatalf("rejections %+v", rep.Rejected)
	}
	for i, w := range want {
		if got := rep.Rejected[i]; got.Line != w.line || got.Item != w.item {
			t.Errorf("rejection %d: %+v, want line %d item %q", i, got, w.line, w.item)
		}
	}
	if !strings.Contains(err.Error(), "curate: import csv: 6 rejected, first line 2") {
		t.Errorf("error %q", err)
	}
}

func TestImportCSV(t *testing.T) {
	cases := []struct {
		name, input string
		want        []Rule
		rejectLine  int // 0 = accepted
	}{
		{"byte order mark, CRLF and a plain date",
			"\ufeffkind,query,term,department,start,expiry,reason,lang\r\nblock,,leak,ops,2026-02-01,2026-03-01T12:00:00+02:00,,\r\n",
			[]Rule{{Kind: Block, Term: "leak", Department: "ops", Start: feb, Expiry: mar.Add(10 * time.Hour)}}, 0},
		{"quoted comma", "kind,query,term,department,start,expiry,reason,lang\nrelate,boil notice,\"flushing, mains\",,,,,en\n",
			[]Rule{{Kind: Relate, Query: "boil notice", Term: "flushing, mains", Lang: "en"}}, 0},
		{"header only", "kind,query,term,department,start,expiry,reason,lang\n", nil, 0},
		{"empty file", "", nil, 1},
		{"wrong header", "kind,query,term\npin,a,b\n", nil, 1},
		{"header in another order", "query,kind,term,department,start,expiry,reason,lang\n", nil, 1},
		{"duplicate lines", "kind,query,term,department,start,expiry,reason,lang\npin,burst,leak,,,,,\npin,burst,leaks,,,,,\n", nil, 3},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got, rep, err := ImportCSV(strings.NewReader(c.input), Options{})
			if c.rejectLine > 0 {
				if !errors.Is(err, ErrImport) || len(rep.Rejected) == 0 || rep.Rejected[0].Line != c.rejectLine {
					t.Fatalf("want rejection at line %d, got %v %+v", c.rejectLine, err, rep.Rejected)
				}
				return
			}
			if err != nil {
				t.Fatalf("%v %+v", err, rep.Rejected)
			}
			if len(got) != len(c.want) {
				t.Fatalf("got %+v, want %+v", got, c.want)
			}
			for i, w := range c.want {
				w.ID = ContentID(w)
				g := got[i]
				if g.ID != w.ID || !g.Start.Equal(w.Start) || !g.Expiry.Equal(w.Expiry) || g.Term != w.Term || g.Query != w.Query {
					t.Errorf("rule %d: %+v, want %+v", i, g, w)
				}
			}
		})
	}
}

// RFC 4180 (Shafranovich, 2005) section 2, rules 6 and 7: a field holding a
// comma or a double quote is enclosed in double quotes, and a double quote
// inside is doubled (from memory). Lines end in LF here, not the RFC's CRLF;
// ImportCSV reads both.
func TestExportCSVQuoting(t *testing.T) {
	var b strings.Builder
	rules := []Rule{{Kind: Relate, Query: "boil notice", Term: "flushing, mains", Reason: `say "boil" first`, Lang: "en"}}
	if err := ExportCSV(&b, rules, Options{}); err != nil {
		t.Fatal(err)
	}
	want := "kind,query,term,department,start,expiry,reason,lang\n" +
		`relate,boil notice,"flushing, mains",,,,"say ""boil"" first",en` + "\n"
	if b.String() != want {
		t.Errorf("got\n%s\nwant\n%s", b.String(), want)
	}
	crlf := strings.ReplaceAll(want, "\n", "\r\n")
	got, _, err := ImportCSV(strings.NewReader(crlf), Options{})
	if err != nil || len(got) != 1 || got[0].Term != "flushing, mains" || got[0].Reason != `say "boil" first` {
		t.Errorf("CRLF import: %v %+v", err, got)
	}
}

func TestImportCSVLimit(t *testing.T) {
	in := "kind,query,term,department,start,expiry,reason,lang\n" + strings.Repeat("pin,burst,leak,,,,,\n", 100)
	_, rep, err := ImportCSV(strings.NewReader(in), Options{MaxBytes: 256})
	if !errors.Is(err, ErrImport) || len(rep.Rejected) != 1 || !strings.Contains(rep.Rejected[0].Reason, "larger than 256 bytes") {
		t.Errorf("got %v %+v", err, rep.Rejected)
	}
}
