package main

import (
	"context"
	"path/filepath"

	"kinword/internal/index"
	"kinword/internal/rank"
	"kinword/internal/text"
)

// openIndex opens the index in the data folder with the configured pipeline.
func (e *env) openIndex(ctx context.Context) (*index.Index, error) {
	p, err := text.NewPipeline(e.cfg.Language)
	if err != nil {
		return nil, err
	}
	return index.Open(ctx, filepath.Join(e.dataDir, "index"), index.Options{Pipeline: p, BatchSize: e.cfg.Index.BatchSize})
}

func (e *env) bm25() rank.BM25 { return rank.BM25{K1: e.cfg.Index.BM25K1, B: e.cfg.Index.BM25B} }

func (e *env) queryLimits() index.QueryLimits {
	return index.QueryLimits{MaxBytes: e.cfg.Search.MaxQueryBytes, MaxTerms: e.cfg.Search.MaxQueryTerms}
}
