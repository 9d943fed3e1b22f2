// Package eval measures retrieval quality on test collections. It reads and
// writes the plain TREC file formats (topics, qrels, run files), computes
// per-topic measures by the conventions of NIST trec_eval (AP, P@k, nDCG@k,
// R-precision, Recall@k, reciprocal rank), averages them over topics,
// compares two methods topic by topic (helped/hurt counts, robustness index,
// paired randomization test) and renders reports as aligned text, Markdown
// and JSON.
//
// It is pure logic plus file I/O: it must not import bleve, gin, database
// drivers or any other Kinword package. Callers run their searches
// elsewhere and hand the rankings in as document-id slices or scored runs.
//
// Conventions shared by every function here:
//   - A document is relevant when its grade is at least RelevanceLevel (1);
//     grade-0 judgments are kept as judged non-relevant.
//   - Ties are broken as trec_eval does: score descending, then document id
//     descending in byte order (see SortRun).
//   - Topic ids are ordered numerically when both are decimal integers and
//     bytewise otherwise, so "2" comes before "10".
package eval
