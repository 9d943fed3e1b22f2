package prefs

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
	"time"
)

var now = time.Date(2026, 6, 1, 12, 0, 0, 0, time.UTC)

// sessions logs n sessions of dept each shown `shown` for query at time at,
// the first `accepts` of them accepting shown[pos].
func sessions(dept, query string, at time.Time, n, accepts, pos int, shown ...string) []Event {
	var evs []Event
	for i := range n {
		acc := -1
		if i < accepts {
			acc = pos
		}
		evs = append(evs, SessionEvents(fmt.Sprintf("%s-%s-%d", dept, query, i), dept, query, at, shown, acc)...)
	}
	return evs
}

func concat(parts ...[]Event) []Event {
	var out []Event
	for _, p := range parts {
		out = append(out, p...)
	}
	return out
}

func TestBetaSmoothing(t *testing.T) {
	// Hand-computed Beta-binomial posterior means (conjugate update; Gelman
	// et al. 2013 §2.4, from memory): rate = (α0+A)/(α0+β0+E), S = 10,
	// content prior 0.2 so α0 = 2 at the organisation level, whose estimate
	// is in turn the department's prior mean.
	opts := Options{ContentPrior: 0.2}
	hl := 30 * 24 * time.Hour
	cases := []struct {
		name       string
		events     []Event
		dept, q    string
		wantRate   float64
		wantSource string
	}{
		{"org then dept", sessions("ops", "pump", now, 6, 3, 0, "valve"),
			// org (2+3)/16 = 0.3125; dept (3.125+3)/16
			"ops", "pump", 6.125 / 16, SourceDepartment},
		{"ipw at position 1", sessions("ops", "pump", now, 6, 1, 1, "x", "valve"),
			// A = 1/0.5 = 2: org (2+2)/16 = 0.25; dept (2.5+2)/16
			"ops", "pump", 4.5 / 16, SourceDepartment},
		{"decayed one half-life", sessions("ops", "pump", now.Add(-hl), 6, 3, 0, "valve"),
			// A = 1.5, E = 3: org 3.5/13; dept (35/13+1.5)/13 = 54.5/169
			"ops", "pump", 54.5 / 169, SourceDepartment},
		{"two departments", concat(sessions("ops", "pump", now, 6, 3, 0, "valve"),
			sessions("fin", "pump", now, 6, 0, 0, "valve")),
			// org (2+3)/22; ops (50/22+3)/16
			"ops", "pump", (50.0/22 + 3) / 16, SourceDepartment},
		{"two departments, other side", concat(sessions("ops", "pump", now, 6, 3, 0, "valve"),
			sessions("fin", "pump", now, 6, 0, 0, "valve")),
			"fin", "pump", (50.0 / 22) / 16, SourceDepartment},
		{"another query does not leak", concat(sessions("ops", "pump", now, 1, 1, 1, "x", "valve"),
			sessions("ops", "pump2", now, 39, 0, 0, "valve")),
			// not the same query: pump has 1 session, so content 0.2 at every level
			"ops", "pump", 0.2, SourceContent},
		{"query-term generalisation", sessions("ops", "pump station", now, 6, 3, 0, "valve"),
			// "pump" alone has no data; term over queries containing "pump": (2+3)/16
			"ops", "pump", 5.0 / 16, SourceQueryTerm},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			m := Build(c.events, now, opts)
			rate, ev := m.Acceptance(c.dept, c.q, "valve")
			if math.Abs(rate-c.wantRate) > 1e-9 || ev.Source != c.wantSource {
				t.Fatalf("rate %.10f (%s), want %.10f (%s); evidence %+v",
					rate, ev.Source, c.wantRate, c.wantSource, ev)
			}
		})
	}
	t.Run("clip at 0.05 weighs 20", func(t *testing.T) {
		// 40 sessions, one accept at a position of propensity 0.01 → 1/0.05.
		m := Build(sessions("ops", "pump", now, 40, 1, 1, "x", "valve"), now,
			Options{ContentPrior: 0.2, Propensity: []float64{1, 0.01}})
		rate, ev := m.Acceptance("ops", "pump", "valve")
		// org (2+20)/50 = 0.44; dept (4.4+20)/50 = 0.488
		if math.Abs(ev.Accepts-20) > 1e-9 || math.Abs(rate-0.488) > 1e-9 {
			t.Fatalf("rate %v, evidence %+v; want 0.488 with A = 20", rate, ev)
		}
	})
}

func TestMinSessions(t *testing.T) {
	// Gate: own data counts from MinSessions (5) distinct sessions on.
	cases := []struct {
		name      string
		ops, fin  int
		want      string
		equalsOrg bool
	}{
		{"both thin", 4, 0, SourceContent, true},
		{"org passes, dept thin", 4, 1, SourceOrganisation, true},
		{"dept at the gate", 5, 0, SourceDepartment, false},
		{"org only", 0, 9, SourceOrganisation, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			evs := concat(sessions("ops", "pump", now, c.ops, c.ops, 0, "valve"),
				sessions("fin", "pump", now, c.fin, 0, 0, "valve"))
			m := Build(evs, now, Options{})
			rate, ev := m.Acceptance("ops", "pump", "valve")
			orgRate, _ := m.Acceptance("nobody", "pump", "valve")
			if ev.Source != c.want || (rate == orgRate) != c.equalsOrg {
				t.Fatalf("source %s rate %v (org %v), want %s equalsOrg=%v",
					ev.Source, rate, orgRate, c.want, c.equalsOrg)
			}
		})
	}
}

func TestSessionCap(t *testing.T) {
	// One session counts once per (query, term) per day for impressions and
	// once for accepts (requirement; common practice against heavy users).
	day := 24 * time.Hour
	repeat := func(session string, at time.Time, n int) []Event {
		var evs []Event
		for range n {
			evs = append(evs, SessionEvents(session, "ops", "pump", at, []string{"valve"}, 0)...)
		}
		return evs
	}
	cases := []struct {
		name     string
		events   []Event
		wantE    float64
		sessions int
	}{
		{"same day ten times", repeat("s1", now, 10), 1, 1},
		{"same day, hours apart", concat(repeat("s1", now.Add(-2*time.Hour), 3), repeat("s1", now, 3)), 1, 1},
		{"two days", concat(repeat("s1", now.Add(-day), 5), repeat("s1", now, 5)), 2, 1},
		{"two sessions", concat(repeat("s1", now, 5), repeat("s2", now, 5)), 2, 2},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			m := Build(c.events, now, Options{MinSessions: 1, HalfLife: 1e6 * time.Hour})
			_, ev := m.Acceptance("ops", "pump", "valve")
			if math.Abs(ev.Impressions-c.wantE) > 1e-4 || math.Abs(ev.Accepts-c.wantE) > 1e-4 ||
				ev.Sessions != c.sessions {
				t.Fatalf("evidence %+v, want E = A = %v over %d sessions", ev, c.wantE, c.sessions)
			}
		})
	}
}

func TestIPWRecoversRate(t *testing.T) {
	// Position-based model: P(accept at k) = p_k · r (examination
	// hypothesis; Richardson et al., WWW 2007), p_k = 1/(k+1). IPW with the
	// known propensities recovers r (Joachims et al., WSDM 2017, IPS
	// unbiasedness); the naive rate is biased by the mean propensity 0.457.
	// 20000 impressions give a standard error below 0.01; tolerance 0.04.
	terms := []string{"t0", "t1", "t2", "t3", "t4"}
	rel := map[string]float64{"t0": 0.6, "t1": 0.4, "t2": 0.3, "t3": 0.2, "t4": 0.1}
	p := DecayPropensities(5, 1)
	rng := rand.New(rand.NewPCG(3, 5))
	var evs []Event
	for i := range 20000 {
		shown := append([]string(nil), terms...)
		rng.Shuffle(len(shown), func(a, b int) { shown[a], shown[b] = shown[b], shown[a] })
		id := fmt.Sprint("s", i)
		evs = append(evs, Event{Kind: KindImpression, Time: now, Session: id, Department: "ops", Query: "q", Shown: shown})
		for k, term := range shown {
			if rng.Float64() < p[k]*rel[term] {
				evs = append(evs, Event{Kind: KindAccept, Time: now, Session: id, Department: "ops", Query: "q", Term: term, Position: k})
			}
		}
	}
	ipw := Build(evs, now, Options{Propensity: p})
	naive := Build(evs, now, Options{Propensity: []float64{1}})
	for _, term := range terms {
		got, ev := ipw.Acceptance("ops", "q", term)
		t.Logf("%s: true %.2f IPW %.3f", term, rel[term], got)
		if ev.Source != SourceDepartment || math.Abs(got-rel[term]) > 0.04 {
			t.Errorf("%s: IPW rate %.3f (%s), want %.2f", term, got, ev.Source, rel[term])
		}
		if n, _ := naive.Acceptance("ops", "q", term); math.Abs(n-0.457*rel[term]) > 0.03 {
			t.Errorf("%s: naive rate %.3f, want about %.3f (biased)", term, n, 0.457*rel[term])
		}
	}
}

func TestIsolation(t *testing.T) {
	// Requirement: A's events reach B only through the organisation level,
	// so moving them to a third department C leaves B's ranking unchanged.
	rng := rand.New(rand.NewPCG(1, 2))
	cands := []Candidate{{"valve", 0.9}, {"seal", 0.7}, {"meter", 0.5}, {"gasket", 0.3}}
	sim := Simulation{Dept: "a", Query: "pump", Candidates: cands,
		Preferred: map[string]bool{"gasket": true}, Start: now.Add(-72 * time.Hour)}
	evA, _ := sim.Run(rng, 300, nil)
	sim.Dept, sim.Preferred = "b", map[string]bool{"seal": true}
	evB, _ := sim.Run(rng, 40, nil)
	moved := make([]Event, len(evA))
	for i, ev := range evA {
		ev.Department = "c"
		moved[i] = ev
	}
	with := Build(concat(evA, evB), now, Options{})
	asC := Build(concat(moved, evB), now, Options{})
	alone := Build(evB, now, Options{})
	for i := range 50 {
		id := fmt.Sprint("imp", i)
		r1, r2 := with.Rank("b", "pump", cands, id), asC.Rank("b", "pump", cands, id)
		if fmt.Sprint(r1) != fmt.Sprint(r2) {
			t.Fatalf("impression %s: B's ranking changed when A's events moved to C:\n%v\n%v", id, r1, r2)
		}
	}
	changed := false
	for _, c := range cands {
		r1, e1 := with.Acceptance("b", "pump", c.Term)
		r3, e3 := alone.Acceptance("b", "pump", c.Term)
		if e1.Source == SourceDepartment && e1 != e3 {
			t.Fatalf("%s: B's own evidence depends on A: %+v vs %+v", c.Term, e1, e3)
		}
		changed = changed || r1 != r3
	}
	if !changed {
		t.Fatal("A's events should still move B's estimates through the organisation prior")
	}
}
