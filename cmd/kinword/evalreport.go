package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"

	"kinword/internal/eval"
)

// writeEvalReport writes an evaluation's report files into dir: NAME.md
// (the Markdown report), NAME.json (what --json prints) and one TREC run
// file NAME.METHOD.run per method, tagged kinword-METHOD. Each file is
// written to a temporary name and renamed, so a reader never sees half a
// report.
func writeEvalReport(dir, name string, obj map[string]any, runs map[string]map[string][]eval.Scored, markdown func(io.Writer) error) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("eval: report folder: %w", err)
	}
	var md bytes.Buffer
	if err := markdown(&md); err != nil {
		return err
	}
	js, err := json.MarshalIndent(obj, "", "  ")
	if err != nil {
		return fmt.Errorf("eval: report json: %w", err)
	}
	files := map[string][]byte{name + ".md": md.Bytes(), name + ".json": append(js, '\n')}
	methods := make([]string, 0, len(runs))
	for m := range runs {
		methods = append(methods, m)
	}
	sort.Strings(methods)
	for _, m := range methods {
		var b bytes.Buffer
		if err := eval.WriteRun(&b, "kinword-"+m, runs[m]); err != nil {
			return err
		}
		files[name+"."+m+".run"] = b.Bytes()
	}
	for fn, data := range files {
		if err := writeFileAtomic(filepath.Join(dir, fn), data); err != nil {
			return err
		}
	}
	return nil
}

// writeFileAtomic writes data to path through a temporary file in the same
// folder and a rename.
func writeFileAtomic(path string, data []byte) error {
	tmp, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".*")
	if err != nil {
		return fmt.Errorf("eval: write %s: %w", path, err)
	}
	if err := tmp.Chmod(0o644); err != nil {
		tmp.Close()
		os.Remove(tmp.Name())
		return fmt.Errorf("eval: write %s: %w", path, err)
	}
	if _, err := tmp.Write(data); err != nil {
		tmp.Close()
		os.Remove(tmp.Name())
		return fmt.Errorf("eval: write %s: %w", path, err)
	}
	if err := tmp.Close(); err != nil {
		os.Remove(tmp.Name())
		return fmt.Errorf("eval: write %s: %w", path, err)
	}
	if err := os.Rename(tmp.Name(), path); err != nil {
		os.Remove(tmp.Name())
		return fmt.Errorf("eval: write %s: %w", path, err)
	}
	return nil
}
