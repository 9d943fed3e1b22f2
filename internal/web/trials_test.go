package web

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"log/slog"
	"strings"
	"sync"
	"testing"

	"kinword/internal/trial"
)

// fakeKeeper keeps trials in memory; a proposal titled "fail" fails inside.
type fakeKeeper struct {
	mu     sync.Mutex
	saved  []*trial.Report
	groups []string
	noSet  bool
}

func (k *fakeKeeper) Run(_ context.Context, p trial.Proposal, groups []string, actor string) (*trial.Report, error) {
	k.mu.Lock()
	defer k.mu.Unlock()
	switch {
	case k.noSet:
		return nil, ErrNoJudgedSet
	case p.Title == "fail":
		return nil, fmt.Errorf("database on fire")
	case len(p.Remove) > 0 && p.Remove[0] == "r9":
		return nil, fmt.Errorf("%w: rule %q is not in force", trial.ErrInvalid, "r9")
	}
	k.groups = groups
	r := &trial.Report{ID: fmt.Sprintf("t%012d", len(k.saved)+1), Actor: actor, Proposal: p, Collection: "tiny", Topics: 3, Samples: []trial.Sample{}}
	k.saved = append(k.saved, r)
	return r, nil
}

func (k *fakeKeeper) List(context.Context) ([]TrialSummary, error) {
	k.mu.Lock()
	defer k.mu.Unlock()
	var out []TrialSummary
	for i := len(k.saved) - 1; i >= 0; i-- {
		out = append(out, TrialSummary{ID: k.saved[i].ID, Title: k.saved[i].Proposal.Title, Actor: k.saved[i].Actor})
	}
	return out, nil
}

func (k *fakeKeeper) Get(_ context.Context, id string) (*trial.Report, error) {
	k.mu.Lock()
	defer k.mu.Unlock()
	for _, r := range k.saved {
		if r.ID == id {
			return r, nil
		}
	}
	return nil, ErrTrialNotFound
}

func trialServer(t testing.TB, k TrialKeeper) (*Server, map[string]string) {
	t.Helper()
	adm, sum, err := NewToken()
	if err != nil {
		t.Fatal(err)
	}
	s, err := New(nil, Options{Tokens: []Token{{Name: "ops", Role: RoleAdmin, SHA256: sum}}, Trials: k,
		Log: slog.New(slog.NewTextHandler(io.Discard, nil))})
	if err != nil {
		t.Fatal(err)
	}
	return s, bearerHdr(adm)
}

func TestTrialRoutes(t *testing.T) {
	k := &fakeKeeper{}
	s, adm := trialServer(t, k)
	const ok = `{"title":"burst pipe means main break","add":[{"kind":"use","query":"burst pipe","term":"main break"}]}`
	tests := []struct {
		name, method, path, body string
		status                   int
		code                     string // error code expected, "" on success
	}{
		{"run", "POST", "/api/v1/trials", ok, 201, ""},
		{"no title", "POST", "/api/v1/trials", `{"title":" ","remove":["r1"]}`, 400, "invalid_trial"},
		{"changes nothing", "POST", "/api/v1/trials", `{"title":"x"}`, 400, "invalid_trial"},
		{"unknown field", "POST", "/api/v1/trials", `{"title":"x","rules":[]}`, 400, ""},
		{"malformed", "POST", "/api/v1/trials", `{"title":`, 400, ""},
		{"not in force", "POST", "/api/v1/trials", `{"title":"x","remove":["r9"]}`, 400, "invalid_trial"},
		{"internal", "POST", "/api/v1/trials", `{"title":"fail","remove":["r1"]}`, 500, "internal"},
		{"list", "GET", "/api/v1/trials", "", 200, ""},
		{"get", "GET", "/api/v1/trials/t000000000001", "", 200, ""},
		{"get markdown", "GET", "/api/v1/trials/t000000000001?format=markdown", "", 200, ""},
		{"get csv", "GET", "/api/v1/trials/t000000000001?format=csv", "", 200, ""},
		{"bad format", "GET", "/api/v1/trials/t000000000001?format=pdf", "", 400, "bad_format"},
		{"unknown", "GET", "/api/v1/trials/tnope", "", 404, "not_found"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			rec := call(t, s, tc.method, tc.path, tc.body, adm)
			if rec.Code != tc.status {
				t.Fatalf("%d %s, want %d", rec.Code, rec.Body, tc.status)
			}
			if tc.code != "" && !strings.Contains(rec.Body.String(), `"code":"`+tc.code+`"`) {
				t.Errorf("body %s, want code %s", rec.Body, tc.code)
			}
		})
	}
	rec := call(t, s, "GET", "/api/v1/trials", "", adm)
	var list struct{ Trials []TrialSummary }
	if err := json.Unmarshal(rec.Body.Bytes(), &list); err != nil || len(list.Trials) != 1 || list.Trials[0].Actor != "ops" {
		t.Errorf("list %s (%v): want the one stored trial by ops", rec.Body, err)
	}
	if md := call(t, s, "GET", "/api/v1/trials/t000000000001?format=markdown", "", adm); !strings.HasPrefix(md.Body.String(), "# Trial: burst pipe means main break") ||
		!strings.HasPrefix(md.Header().Get("Content-Type"), "text/markdown") {
		t.Errorf("markdown %q (%s)", md.Body, md.Header().Get("Content-Type"))
	}
	// Anonymous and searcher callers are refused (the role table test covers
	// every route; this is the trial's own check).
	if rec := call(t, s, "POST", "/api/v1/trials", ok, nil); rec.Code != 401 {
		t.Errorf("anonymous run: %d, want 401", rec.Code)
	}
}

func TestTrialRoutesWithoutKeeperOrJudgedSet(t *testing.T) {
	s, adm := trialServer(t, nil)
	if rec := call(t, s, "GET", "/api/v1/trials", "", adm); rec.Code != 503 || !strings.Contains(rec.Body.String(), "review.judged_dir") {
		t.Errorf("no keeper: %d %s, want 503 naming review.judged_dir", rec.Code, rec.Body)
	}
	s, adm = trialServer(t, &fakeKeeper{noSet: true})
	if rec := call(t, s, "POST", "/api/v1/trials", `{"title":"x","remove":["r1"]}`, adm); rec.Code != 503 || !strings.Contains(rec.Body.String(), "no_trials") {
		t.Errorf("no judged set: %d %s, want 503 no_trials", rec.Code, rec.Body)
	}
}

// FuzzTrialProposal: any body posted to /api/v1/trials answers 201 with a
// report or a 4xx in the API's one error shape, never a 5xx (the fake's
// "fail" title aside), and a stored trial is exactly what was posted.
func FuzzTrialProposal(f *testing.F) {
	for _, s := range []string{
		`{"title":"burst pipe means main break","add":[{"kind":"use","query":"burst pipe","term":"main break"}]}`,
		`{"title":"x","remove":["r1"],"auto_expand":true}`,
		`{"title":"x"}`, `{"title":""}`, `{"title":"x","add":[{"kind":"pin"}]}`, `{"title":"x","remove":["r9"]}`,
		`{"title":"x","add":{}}`, `[]`, `{"title":"x","auto_expand":"yes"}`, `{"title":"\u0000"}`, "{\"title\":\"\xff\"}",
	} {
		f.Add(s)
	}
	k := &fakeKeeper{}
	s, adm := trialServer(f, k)
	f.Fuzz(func(t *testing.T, body string) {
		rec := call(t, s, "POST", "/api/v1/trials", body, adm)
		code := checkErrorShape(t, rec)
		switch {
		case rec.Code == 201:
			var r struct {
				Proposal struct{ Title string } `json:"proposal"`
			}
			if err := json.Unmarshal(rec.Body.Bytes(), &r); err != nil || strings.TrimSpace(r.Proposal.Title) == "" {
				t.Fatalf("201 without the proposal's title: %s (%v)", rec.Body, err)
			}
		case rec.Code >= 500 && !strings.Contains(body, `"fail"`):
			t.Fatalf("%d %s for %q", rec.Code, code, body)
		case rec.Code >= 300 && rec.Code < 500 && code == "":
			t.Fatalf("%d without an error code", rec.Code)
		}
	})
}
