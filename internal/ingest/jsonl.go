package ingest

import (
	"bufio"
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"strings"
)

// jsonlKeys are the document fields a JSON line may carry besides text.
var jsonlKeys = metaKeys

// ParseJSONLine reads one JSON Lines record: an object with a required
// "id" (string or number) and "text" (string), and optional title, url,
// department, groups (list or comma-separated string), language and
// modified. Other keys are ignored. meta holds the fields; body the text
// with blank-line paragraphs. Problems give ErrMalformedLine (or
// ErrInvalidUTF8).
func ParseJSONLine(line []byte) (title, body string, meta Meta, err error) {
	if err := checkUTF8(line); err != nil {
		return "", "", Meta{}, err
	}
	dec := json.NewDecoder(bytes.NewReader(line))
	dec.UseNumber()
	var m map[string]any
	if err := dec.Decode(&m); err != nil {
		return "", "", Meta{}, reason(ErrMalformedLine, "json: %v", err)
	}
	if rest := bytes.TrimSpace(line[dec.InputOffset():]); len(rest) > 0 {
		return "", "", Meta{}, reason(ErrMalformedLine, "json: data after the object")
	}
	if m == nil {
		return "", "", Meta{}, reason(ErrMalformedLine, "want an object, got null")
	}
	text, ok := m["text"].(string)
	if !ok {
		return "", "", Meta{}, reason(ErrMalformedLine, "text: want a string, got %s", typeName(m["text"]))
	}
	meta, err = metaFromMap(m, jsonlKeys, false)
	if err != nil {
		return "", "", Meta{}, reason(ErrMalformedLine, "%v", err)
	}
	if meta.ID == "" {
		return "", "", Meta{}, reason(ErrMalformedLine, "missing id")
	}
	body = splitParagraphs(strings.ReplaceAll(text, "\r\n", "\n"))
	return meta.Title, body, meta, nil
}

func typeName(v any) string {
	if v == nil {
		return "nothing"
	}
	return fmt.Sprintf("%T", v)
}

// streamJSONL emits one result per non-blank line of f, in order. Lines
// longer than MaxBytes are skipped; the file itself may be any size.
func (w *walker) streamJSONL(ctx context.Context, f *file, emit func(result) error) error {
	fileSkip := func(err error) error { return emit(skipOf(f, err)[0]) }
	side, sideBytes, err := readSidecar(f)
	if err != nil {
		return fileSkip(err)
	}
	fh, err := os.Open(f.abs)
	if err != nil {
		return fileSkip(reason(ErrUnreadable, "%v", err))
	}
	defer fh.Close()
	br := bufio.NewReaderSize(fh, 64<<10)
	head, _ := br.Peek(8 << 10)
	if err := checkBinary(head); err != nil {
		return fileSkip(err)
	}
	emitted := false
	for n := 1; ; n++ {
		if ctx.Err() != nil {
			return fmt.Errorf("ingest: walk: %w", ctx.Err())
		}
		line, tooLong, rerr := readLine(br, w.opts.MaxBytes)
		if rerr != nil && !errors.Is(rerr, io.EOF) {
			return fileSkip(reason(ErrUnreadable, "line %d: %v", n, rerr))
		}
		path, source := fmt.Sprintf("%s#L%d", f.path, n), fmt.Sprintf("%s#L%d", f.abs, n)
		r := result{Item: Item{Path: path}, source: source}
		line = bytes.TrimSuffix(line, []byte("\r"))
		switch {
		case tooLong:
			r.Skip = &Skip{Path: path, Reason: reason(ErrTooLarge, "line over %d bytes", w.opts.MaxBytes)}
		case len(bytes.TrimSpace(line)) == 0:
			if errors.Is(rerr, io.EOF) {
				if !emitted {
					return fileSkip(ErrEmpty)
				}
				return nil
			}
			continue
		default:
			r = w.jsonLine(f, r, line, side, sideBytes)
		}
		if err := emit(r); err != nil {
			return err
		}
		emitted = true
		if errors.Is(rerr, io.EOF) {
			return nil
		}
	}
}

// jsonLine turns one line into a result.
func (w *walker) jsonLine(f *file, r result, line []byte, side Meta, sideBytes []byte) result {
	hash := contentHash(line, sideBytes, f.folder.fingerprint)
	if w.unchanged != nil {
		if id, ok := w.unchanged(r.source, hash); ok {
			r.unchangedID = id
			return r
		}
	}
	title, body, meta, err := ParseJSONLine(line)
	if err == nil && body == "" {
		err = ErrEmpty
	}
	if err != nil {
		r.Skip = &Skip{Path: r.Path, Reason: err}
		return r
	}
	if title == "" {
		title = meta.ID
	}
	d, warns := w.build(f, meta.ID, title, body, meta, side, hash, r.source)
	r.Doc, r.Warnings = &d, prefix(r.Path, warns)
	return r
}

// readLine reads up to and without the next "\n". A line longer than max
// is consumed and reported as tooLong. At the end it returns io.EOF along
// with the last (possibly empty) line.
func readLine(br *bufio.Reader, max int64) (line []byte, tooLong bool, err error) {
	var buf []byte
	for {
		chunk, err := br.ReadSlice('\n')
		if !tooLong {
			if int64(len(buf)+len(chunk)) > max+1 {
				tooLong, buf = true, nil
			} else {
				buf = append(buf, chunk...)
			}
		}
		if errors.Is(err, bufio.ErrBufferFull) {
			continue
		}
		return bytes.TrimSuffix(buf, []byte("\n")), tooLong, err
	}
}
