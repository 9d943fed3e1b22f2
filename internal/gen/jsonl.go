package gen

import (
	"bufio"
	"context"
	"fmt"
	"io"
	"time"
	"unicode/utf8"

	"kinword/internal/doc"
)

// progressEvery is how many documents WriteJSONL writes between progress
// calls.
const progressEvery = 1000

// Generate builds a Generator for opts and streams its documents to fn;
// see (*Generator).Generate.
func Generate(ctx context.Context, opts Options, fn func(doc.Document) error) error {
	g, err := New(opts)
	if err != nil {
		return err
	}
	return g.Generate(ctx, fn)
}

// WriteJSONL builds a Generator for opts and writes its documents as JSON
// lines; see (*Generator).WriteJSONL.
func WriteJSONL(ctx context.Context, opts Options, w io.Writer, progress func(done int)) error {
	g, err := New(opts)
	if err != nil {
		return err
	}
	return g.WriteJSONL(ctx, w, progress)
}

// Generate calls fn with each document in index order, one at a time; the
// corpus is never held in memory. Document i (0-based) has ID
// "gen-%06d" of i+1, a department, no groups or one restricted group,
// URL https://intranet.tarnwick.example/<department>/<id>, a Modified
// time in 2024-2026 (UTC, whole seconds) and Language "english"; it
// depends only on Seed and i, so a shorter corpus is a prefix of a longer
// one. Generate stops at the first error from fn (returned wrapped) or
// when ctx is done.
func (g *Generator) Generate(ctx context.Context, fn func(doc.Document) error) error {
	st := g.newState()
	for i := range g.opts.Docs {
		if i%ctxEvery == 0 {
			if err := ctx.Err(); err != nil {
				return fmt.Errorf("gen: %w", err)
			}
		}
		m := g.render(i, st)
		id := string(st.id)
		d := doc.Document{
			ID:         id,
			Title:      string(st.title),
			Body:       string(st.body),
			URL:        m.dept.urlPrefix + id,
			Department: m.dept.name,
			Language:   Language,
			Modified:   time.Unix(m.modified, 0).UTC(),
		}
		if m.group >= 0 {
			d.Groups = []string{g.opts.Groups[m.group]}
		}
		if err := fn(d); err != nil {
			return fmt.Errorf("gen: document %s: %w", id, err)
		}
	}
	return nil
}

// WriteJSONL writes every document as one JSON object per line with the
// keys id, title, text, url, department, groups, modified (RFC 3339, UTC)
// and language, in that order: the ingest JSON-lines format. Open
// documents have "groups":[]. progress, when non-nil, is called with the
// number of documents written after every 1000 and once at the end.
func (g *Generator) WriteJSONL(ctx context.Context, w io.Writer, progress func(done int)) error {
	bw := bufio.NewWriterSize(w, 256<<10)
	st := g.newState()
	line := make([]byte, 0, 32*g.opts.MeanWords)
	for i := range g.opts.Docs {
		if i%ctxEvery == 0 {
			if err := ctx.Err(); err != nil {
				return fmt.Errorf("gen: %w", err)
			}
		}
		m := g.render(i, st)
		line = g.appendJSON(line[:0], st, m)
		if _, err := bw.Write(line); err != nil {
			return fmt.Errorf("gen: write jsonl: %w", err)
		}
		if progress != nil && (i+1)%progressEvery == 0 && i+1 != g.opts.Docs {
			progress(i + 1)
		}
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("gen: write jsonl: %w", err)
	}
	if progress != nil {
		progress(g.opts.Docs)
	}
	return nil
}

func (g *Generator) appendJSON(b []byte, st *state, m meta) []byte {
	b = append(b, `{"id":`...)
	b = appendJSONString(b, st.id)
	b = append(b, `,"title":`...)
	b = appendJSONString(b, st.title)
	b = append(b, `,"text":`...)
	b = appendJSONString(b, st.body)
	b = append(b, `,"url":`...)
	b = appendJSONString(b, m.dept.urlPrefix)
	b = append(b[:len(b)-1], st.id...) // the ID is plain ASCII
	b = append(b, '"')
	b = append(b, `,"department":`...)
	b = appendJSONString(b, m.dept.name)
	b = append(b, `,"groups":[`...)
	if m.group >= 0 {
		b = appendJSONString(b, g.opts.Groups[m.group])
	}
	b = append(b, `],"modified":"`...)
	b = time.Unix(m.modified, 0).UTC().AppendFormat(b, time.RFC3339)
	b = append(b, `","language":"`+Language+`"}`+"\n"...)
	return b
}

const hexDigits = "0123456789abcdef"

// appendJSONString appends s as a JSON string (RFC 8259 section 7):
// quote, backslash and control characters are escaped, invalid UTF-8 is
// replaced by U+FFFD as encoding/json does, everything else is copied.
func appendJSONString[S ~string | ~[]byte](b []byte, s S) []byte {
	b = append(b, '"')
	start := 0
	for i := 0; i < len(s); {
		c := s[i]
		if c >= 0x20 && c != '"' && c != '\\' && c < utf8.RuneSelf {
			i++
			continue
		}
		if c < utf8.RuneSelf {
			b = append(b, s[start:i]...)
			switch c {
			case '"', '\\':
				b = append(b, '\\', c)
			case '\n':
				b = append(b, '\\', 'n')
			case '\r':
				b = append(b, '\\', 'r')
			case '\t':
				b = append(b, '\\', 't')
			default:
				b = append(b, '\\', 'u', '0', '0', hexDigits[c>>4], hexDigits[c&0xf])
			}
			i++
			start = i
			continue
		}
		r, size := utf8.DecodeRune([]byte(s[i:min(i+utf8.UTFMax, len(s))]))
		if r == utf8.RuneError && size == 1 {
			b = append(b, s[start:i]...)
			b = append(b, `\ufffd`...)
			i++
			start = i
			continue
		}
		i += size
	}
	b = append(b, s[start:]...)
	return append(b, '"')
}
