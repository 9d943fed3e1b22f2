// Package assoc mines term associations offline: from the index's per-document
// term data it counts how often terms share a passage or a short window,
// detects multi-word phrases, scores every pair with standard association
// measures (Dunning's G2, PMI, NPMI, chi-square, Dice, P(b|a), t-score),
// keeps each term's strongest neighbours, and stores the result as a
// versioned, checksummed binary artifact.
//
// Access control is built in: the documents open to everyone form one scope,
// and every restricted access group forms another (its documents plus the open
// ones). Each scope's table is mined from that scope's documents alone, so a
// viewer who is shown only the open table and the tables of their own groups
// can never learn a term, phrase or count that stems from a document they may
// not read.
//
// The open documents are counted once. All counts are sums over documents,
// and a group's own documents are never open, so a group scope's counts are
// the open documents' counts plus those over the group's own documents;
// their sorted runs are merged (summed) before ranking. Exact semantics:
//   - Vocabulary: a term (or phrase) is counted in a scope when its document
//     frequency over the scope's documents reaches MinDF. The open documents'
//     pairs are therefore counted for every term counted in some scope, also
//     one below MinDF among the open documents alone; each scope ranks only
//     the pairs of its own terms, so the open table equals mining the open
//     documents alone.
//   - Phrases: the open scope's phrases are detected on the open documents.
//     A group's phrases are the open ones plus those detected on the
//     adjacency counts over the open and the group's documents together.
//     Open documents are rewritten with the open phrases in every scope, a
//     group's own documents with the group's phrases, so a phrase found only
//     for a group counts only its occurrences in the group's documents.
//     With phrases off, or when detection over the open and the group's
//     documents together finds exactly the open phrases, a group scope
//     equals mining the group's documents plus the open ones as one corpus.
//
// Group scopes mostly repeat the open scope, so a group scope stores only
// a delta against it, in memory and in the artifact: the terms whose
// frequencies or neighbour list differ from the open scope's, with list
// entries that equal an open entry stored as a reference to it. Every
// query answers exactly as if each scope were stored in full.
//
// Counting runs in bounded memory: pair counts live in compact open-addressing
// tables that spill sorted runs to temporary files when they outgrow
// Options.MemoryBudget, and the runs are k-way merged, giving exactly the
// same result as an all-in-memory run.
//
// The package is pure logic plus file I/O. It must not import bleve, gin or
// database drivers; its only Kinword dependency is internal/access. It reads
// documents through the small Corpus interface it declares.
package assoc
