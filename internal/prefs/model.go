package prefs

// priorEps keeps Beta prior means inside (0, 1) so both shape parameters
// stay positive.
const priorEps = 1e-3

// Model is an immutable snapshot of learned acceptance statistics (nothing
// writes its maps after Snapshot); it is safe for concurrent use.
type Model struct {
	opts  Options
	names map[string]int32 // interned strings
	dept  table            // pack(dept, org index)
	org   table            // pack(query, term)
	qt    table            // pack(query term, term)
	snip  snippetTable     // evidence from clicked results' snippets
}

// id is the interned id of s, or -1 if no event mentioned it.
func (m *Model) id(s string) int32 {
	if id, ok := m.names[s]; ok {
		return id
	}
	return -1
}

// Options returns the options the model was built with, defaults filled in.
func (m *Model) Options() Options { return m.opts }

// estimate is a Beta posterior: its mean and the effective number of
// examinations n behind it, so Beta(mean·n, (1−mean)·n) is the posterior.
type estimate struct {
	mean, n float64
	ev      Evidence
}

// Acceptance returns the smoothed acceptance rate of term for query in dept,
// with ContentPrior standing in for the content score (Rank uses each
// candidate's own content).
func (m *Model) Acceptance(dept, query, term string) (float64, Evidence) {
	e := m.estimate(dept, query, term, m.opts.ContentPrior)
	return e.mean, e.ev
}

// posterior is the Beta-smoothed accept rate
//
//	rate = (α0 + A) / (α0 + β0 + E),  α0 = μ·S, β0 = (1−μ)·S
//
// with prior mean μ and strength S = PriorStrength: the posterior mean of a
// Beta(α0, β0) prior after A successes in E trials (Gelman et al., Bayesian
// Data Analysis, 3rd ed. 2013, §2.4, conjugate Beta-binomial; from memory).
// IPW can make A exceed E, so the rate is clipped to [0, 1].
func (m *Model) posterior(mu float64, s stats, src string) estimate {
	mu = min(max(mu, priorEps), 1-priorEps)
	strength := m.opts.PriorStrength
	rate := (mu*strength + s.A) / (strength + s.E)
	return estimate{
		mean: min(max(rate, 0), 1),
		n:    strength + s.E,
		ev:   Evidence{Sessions: s.Sessions, Accepts: s.A, Impressions: s.E, Source: src},
	}
}

// estimate walks the back-off chain. The department's own statistics count
// only once MinSessions distinct sessions of that department saw the pair;
// their prior mean is the organisation-wide estimate. Below the gate the
// department gets the organisation-wide estimate unchanged, so one
// department's events reach another only through the organisation level.
func (m *Model) estimate(dept, query, term string, content float64) estimate {
	org := m.orgEstimate(query, term, content)
	var d stats
	if i, ok := m.org.idx[pack(m.id(query), m.id(term))]; ok {
		d = m.dept.get(pack(m.id(dept), i))
	}
	if d.Sessions < m.opts.MinSessions {
		return org
	}
	return m.posterior(org.mean, d, SourceDepartment)
}

// orgEstimate pools all departments, gated by MinSessions like the
// department level; its prior is the query-term estimate.
func (m *Model) orgEstimate(query, term string, content float64) estimate {
	prior := m.queryTermEstimate(query, term, content)
	o := m.org.get(pack(m.id(query), m.id(term)))
	if o.Sessions < m.opts.MinSessions {
		return prior
	}
	return m.posterior(prior.mean, o, SourceOrganisation)
}

// queryTermEstimate generalises across queries: for each query term t it
// takes the term's statistics over every query containing t, minus this
// query's own (leave-this-query-out, so the organisation level does not
// count its data twice; the session count is subtracted too, a lower bound
// on the distinct other sessions), smooths them toward the content prior,
// and averages the terms that pass the MinSessions gate. With none, the
// estimate is the content prior itself.
func (m *Model) queryTermEstimate(query, term string, content float64) estimate {
	termID := m.id(term)
	self := m.org.get(pack(m.id(query), termID))
	var sum float64
	var pooled stats
	var used int
	var buf [8]string
	for _, t := range queryTerms(query, buf[:0]) {
		s := m.qt.get(pack(m.id(t), termID))
		s.A = max(s.A-self.A, 0)
		s.E = max(s.E-self.E, 0)
		s.Sessions -= self.Sessions
		if s.Sessions < m.opts.MinSessions {
			continue
		}
		sum += m.posterior(content, s, SourceQueryTerm).mean
		pooled.A += s.A
		pooled.E += s.E
		pooled.Sessions += s.Sessions
		used++
	}
	if used == 0 {
		mu := min(max(content, priorEps), 1-priorEps)
		return estimate{mean: mu, n: m.opts.PriorStrength, ev: Evidence{Source: SourceContent}}
	}
	return estimate{
		mean: sum / float64(used),
		n:    m.opts.PriorStrength + pooled.E/float64(used),
		ev: Evidence{Sessions: pooled.Sessions, Accepts: pooled.A,
			Impressions: pooled.E, Source: SourceQueryTerm},
	}
}
