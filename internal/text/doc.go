// Package text is Kinword's one text pipeline: Unicode normalisation and case
// folding, a tokenizer, English stopwords and Snowball stemming, plus the
// surface-form table that maps stems back to readable words.
//
// The index, the association miner and the feedback models all analyse text
// through this package, so the terms they index, mine and suggest are the same
// terms. It is pure logic: it must not import bleve, gin, database drivers or
// any other Kinword package.
package text
