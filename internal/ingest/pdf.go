package ingest

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"os/exec"
	"strings"
	"time"

	"github.com/ledongthuc/pdf"
)

// pdfExtractor reads PDF text with pdftotext when available and with the
// built-in reader (github.com/ledongthuc/pdf) otherwise.
type pdfExtractor struct {
	tool    string // resolved pdftotext path; "" when none
	timeout time.Duration
}

// newPDFExtractor resolves tool: "" looks pdftotext up on PATH (absence is
// fine), "none" disables it, anything else must be an executable.
func newPDFExtractor(tool string, timeout time.Duration) (pdfExtractor, error) {
	switch tool {
	case "none":
		return pdfExtractor{timeout: timeout}, nil
	case "":
		p, _ := exec.LookPath("pdftotext")
		return pdfExtractor{tool: p, timeout: timeout}, nil
	}
	p, err := exec.LookPath(tool)
	if err != nil {
		return pdfExtractor{}, fmt.Errorf("ingest: pdftotext: %w", err)
	}
	return pdfExtractor{tool: p, timeout: timeout}, nil
}

func (x pdfExtractor) parse(ctx context.Context, data []byte) (string, string, Meta, error) {
	ctx, cancel := context.WithTimeout(ctx, x.timeout)
	defer cancel()
	return ParsePDF(ctx, data, x.tool)
}

// ParsePDF extracts a PDF's text. With tool set (a pdftotext path) it runs
// "tool -enc UTF-8 - -" on data and falls back to the built-in reader when
// the tool fails; a file neither can read gives ErrCorrupt with both
// messages. With tool "" only the built-in reader is tried, and a failure
// gives ErrNoExtractor with a hint. Pages (form feeds) and blank lines end
// paragraphs; the title is the first line when short. Meta is empty.
func ParsePDF(ctx context.Context, data []byte, tool string) (title, body string, meta Meta, err error) {
	var text string
	if tool != "" {
		var toolErr error
		text, toolErr = pdfToText(ctx, tool, data)
		if toolErr != nil {
			if ctx.Err() != nil {
				return "", "", Meta{}, reason(ErrCorrupt, "pdf: %v", toolErr)
			}
			lib, libErr := pdfLibraryText(data)
			if libErr != nil {
				return "", "", Meta{}, reason(ErrCorrupt, "pdf: %v; built-in reader: %v", toolErr, libErr)
			}
			text = lib
		}
	} else {
		text, err = pdfLibraryText(data)
		if err != nil {
			return "", "", Meta{}, reason(ErrNoExtractor,
				"pdftotext not found (install poppler-utils or set Options.PDFToText) and the built-in reader failed: %v", err)
		}
	}
	text = strings.ReplaceAll(strings.ToValidUTF8(text, "\uFFFD"), "\r\n", "\n")
	body = splitParagraphs(text)
	if body == "" && tool == "" {
		return "", "", Meta{}, reason(ErrNoExtractor, "the built-in reader found no text and pdftotext is not installed")
	}
	return firstLineTitle(text), body, Meta{}, nil
}

// pdfToText runs pdftotext on data via stdin and returns its output.
func pdfToText(ctx context.Context, tool string, data []byte) (string, error) {
	cmd := exec.CommandContext(ctx, tool, "-enc", "UTF-8", "-", "-")
	cmd.Stdin = bytes.NewReader(data)
	var out, stderr bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &stderr
	if err := cmd.Run(); err != nil {
		msg := strings.TrimSpace(stderr.String())
		if len(msg) > 300 {
			msg = msg[:300] + "..."
		}
		msg = strings.Join(strings.Fields(strings.ToValidUTF8(msg, "?")), " ")
		if msg == "" {
			msg = err.Error()
		}
		return "", errors.New("pdftotext: " + msg)
	}
	return out.String(), nil
}

// pdfLibraryText reads the text with the built-in reader, which may panic
// on damaged files.
func pdfLibraryText(data []byte) (text string, err error) {
	defer func() {
		if r := recover(); r != nil {
			text, err = "", fmt.Errorf("%v", r)
		}
	}()
	r, err := pdf.NewReader(bytes.NewReader(data), int64(len(data)))
	if err != nil {
		return "", err
	}
	rd, err := r.GetPlainText()
	if err != nil {
		return "", err
	}
	b, err := io.ReadAll(rd)
	return string(b), err
}
