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
// Counting runs in bounded memory: pair counts live in compact open-addressing
// tables that spill sorted runs to temporary files when they outgrow
// Options.MemoryBudget, and the runs are k-way merged, giving exactly the
// same result as an all-in-memory run.
//
// The package is pure logic plus file I/O. It must not import bleve, gin or
// database drivers; its only Kinword dependency is internal/access. It reads
// documents through the small Corpus interface it declares.
package assoc
