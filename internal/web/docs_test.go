package web

import (
	"encoding/json"
	"fmt"
	"net/http"
	"net/url"
	"strings"
	"testing"
)

// lookupIDs returns the result IDs and the total of a lookup.
func lookupIDs(t *testing.T, s *Server, q string, hdr map[string]string) ([]string, int) {
	t.Helper()
	rec := call(t, s, http.MethodGet, "/api/v1/lookup?q="+url.QueryEscape(q), "", hdr)
	if rec.Code != http.StatusOK {
		t.Fatalf("lookup %q: %d %s", q, rec.Code, rec.Body)
	}
	var r struct {
		Total   int `json:"total"`
		Results []struct {
			ID    string `json:"id"`
			Title string `json:"title"`
		} `json:"results"`
	}
	if err := json.Unmarshal(rec.Body.Bytes(), &r); err != nil {
		t.Fatal(err)
	}
	var ids []string
	for _, x := range r.Results {
		ids = append(ids, x.ID+"="+x.Title)
	}
	return ids, r.Total
}

type pushCounts struct {
	Added, Replaced, Deleted, Documents int
}

func decodeCounts(t *testing.T, body []byte) pushCounts {
	t.Helper()
	var c pushCounts
	if err := json.Unmarshal(body, &c); err != nil {
		t.Fatalf("%v: %s", err, body)
	}
	return c
}

// TestDocumentPushAddReplaceDelete: a pushed document is found by the next
// search, a push with the same ID replaces it (old words gone, new words
// found), a restricted one reaches only its group, and a delete removes it;
// the counts say what changed. The invented words ("quillbrook",
// "marshfen", "tallowmere") occur nowhere else.
func TestDocumentPushAddReplaceDelete(t *testing.T) {
	s, tt, _ := tokenServer(t, false)
	admin := bearerHdr(tt.admin)
	insider := map[string]string{"X-Kinword-Groups": "executive", "X-Kinword-Proxy-Secret": "s3cret"}
	push := func(body string) pushCounts {
		t.Helper()
		rec := call(t, s, http.MethodPost, "/api/v1/documents", body, admin)
		if rec.Code != http.StatusOK {
			t.Fatalf("push: %d %s", rec.Code, rec.Body)
		}
		return decodeCounts(t, rec.Body.Bytes())
	}
	steps := []struct {
		name   string
		do     func() pushCounts
		counts pushCounts
		query  string
		viewer map[string]string
		want   string // an id=title the results must hold, "" = none
		total  int
	}{
		{"add", func() pushCounts {
			return push(`{"documents":[{"id":"ops/quillbrook.md","title":"Quillbrook reservoir","body":"The quillbrook reservoir feeds the east zone.","department":"field-operations","updated":"2024-03-01"}]}`)
		}, pushCounts{Added: 1, Documents: 5}, "quillbrook", nil, "ops/quillbrook.md=Quillbrook reservoir", 1},
		{"replace: new words found", func() pushCounts {
			return push(`{"documents":[{"id":"ops/quillbrook.md","title":"Marshfen intake","body":"The marshfen intake replaced the old reservoir.","lang":"en"}]}`)
		}, pushCounts{Replaced: 1, Documents: 5}, "marshfen", nil, "ops/quillbrook.md=Marshfen intake", 1},
		{"replace: old words gone", nil, pushCounts{}, "quillbrook", nil, "", 0},
		{"restricted: outsider", func() pushCounts {
			return push(`{"documents":[{"id":"tallowmere","body":"Tallowmere tender figures.","groups":["Executive"]}]}`)
		}, pushCounts{Added: 1, Documents: 6}, "tallowmere", nil, "", 0},
		{"restricted: insider", nil, pushCounts{}, "tallowmere", insider, "tallowmere=tallowmere", 1},
		{"delete (ID with a slash, percent-encoded)", func() pushCounts {
			rec := call(t, s, http.MethodDelete, "/api/v1/documents/ops%2Fquillbrook.md", "", admin)
			if rec.Code != http.StatusOK {
				t.Fatalf("delete: %d %s", rec.Code, rec.Body)
			}
			return decodeCounts(t, rec.Body.Bytes())
		}, pushCounts{Deleted: 1, Documents: 5}, "marshfen", nil, "", 0},
		{"delete unknown ID", func() pushCounts {
			rec := call(t, s, http.MethodDelete, "/api/v1/documents/ops/quillbrook.md", "", admin)
			if rec.Code != http.StatusOK {
				t.Fatalf("delete: %d %s", rec.Code, rec.Body)
			}
			return decodeCounts(t, rec.Body.Bytes())
		}, pushCounts{Documents: 5}, "marshfen", nil, "", 0},
		{"delete restricted", func() pushCounts {
			rec := call(t, s, http.MethodDelete, "/api/v1/documents/tallowmere", "", admin)
			return decodeCounts(t, rec.Body.Bytes())
		}, pushCounts{Deleted: 1, Documents: 4}, "tallowmere", insider, "", 0},
	}
	for _, st := range steps {
		t.Run(st.name, func(t *testing.T) {
			if st.do != nil {
				if got := st.do(); got != st.counts {
					t.Errorf("counts %+v, want %+v", got, st.counts)
				}
			}
			ids, total := lookupIDs(t, s, st.query, st.viewer)
			if total != st.total {
				t.Errorf("%q: total %d, want %d (%v)", st.query, total, st.total, ids)
			}
			if st.want != "" && (len(ids) == 0 || ids[0] != st.want) {
				t.Errorf("%q: results %v, want %s first", st.query, ids, st.want)
			}
		})
	}
}

// TestDocumentPushValidation: bad batches are refused whole with a clear
// error, by the rules of a JSON line at ingest (id and text required, text
// valid UTF-8) plus the API's limits (1 MiB, 100 documents, known fields);
// nothing of a refused batch becomes searchable.
func TestDocumentPushValidation(t *testing.T) {
	s, tt, _ := tokenServer(t, false)
	admin := bearerHdr(tt.admin)
	ok := `{"id":"brackwater","body":"Brackwater pumping station."}`
	many := make([]string, 101)
	for i := range many {
		many[i] = fmt.Sprintf(`{"id":"d%d","body":"brackwater %d"}`, i, i)
	}
	cases := []struct {
		name, ctype, body string
		status            int
		code              string
	}{
		{"missing id", "application/json", `{"documents":[` + ok + `,{"body":"no id here"}]}`, 400, "invalid_document"},
		{"blank id", "application/json", `{"documents":[` + ok + `,{"id":"  ","body":"blank"}]}`, 400, "invalid_document"},
		{"empty body", "application/json", `{"documents":[` + ok + `,{"id":"e","body":"  "}]}`, 400, "invalid_document"},
		{"duplicate id", "application/json", `{"documents":[` + ok + `,` + ok + `]}`, 400, "invalid_document"},
		{"bad date", "application/json", `{"documents":[` + ok + `,{"id":"x","body":"text","updated":"last Tuesday"}]}`, 400, "invalid_document"},
		{"unknown language", "application/json", `{"documents":[` + ok + `,{"id":"x","body":"text","lang":"klingon"}]}`, 400, "invalid_document"},
		{"unknown field", "application/json", `{"documents":[{"id":"x","body":"t","text":"t"}]}`, 400, "malformed_json"},
		{"groups not a list", "application/json", `{"documents":[{"id":"x","body":"t","groups":"a,b"}]}`, 400, "malformed_json"},
		{"trailing data", "application/json", `{"documents":[` + ok + `]} {}`, 400, "malformed_json"},
		{"no documents", "application/json", `{"documents":[]}`, 400, "batch_size"},
		{"101 documents", "application/json", `{"documents":[` + strings.Join(many, ",") + `]}`, 400, "batch_size"},
		{"over 1 MiB", "application/json", `{"documents":[{"id":"big","body":"` + strings.Repeat("brackwater ", 100000) + `"}]}`, 413, "too_large"},
		{"invalid UTF-8", "application/json", `{"documents":[{"id":"u","body":"brackwater ` + "\xff" + `"}]}`, 400, "invalid_utf8"},
		{"not JSON", "text/plain", ok, 415, "content_type"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			hdr := map[string]string{"Authorization": admin["Authorization"], "Content-Type": c.ctype}
			rec := call(t, s, http.MethodPost, "/api/v1/documents", c.body, hdr)
			if rec.Code != c.status || !strings.Contains(rec.Body.String(), `"code":"`+c.code+`"`) {
				t.Fatalf("%d %s, want %d %s", rec.Code, rec.Body, c.status, c.code)
			}
			if _, total := lookupIDs(t, s, "brackwater", nil); total != 0 {
				t.Errorf("a refused batch was partly applied: %d results", total)
			}
		})
	}
	rec := call(t, s, http.MethodDelete, "/api/v1/documents/", "", admin)
	if rec.Code != http.StatusBadRequest {
		t.Errorf("DELETE without an id: %d %s", rec.Code, rec.Body)
	}
}
