package web

import (
	"context"
	"errors"
	"fmt"
	"io"
	"mime"
	"net/http"
	"strings"
	"unicode/utf8"

	"github.com/gin-gonic/gin"

	"kinword/internal/finder"
)

// Documents is what the document routes need; *finder.Finder satisfies it.
// Both calls commit before they return, so a search that starts after the
// answer sees the change.
type Documents interface {
	PutDocuments(ctx context.Context, docs []finder.DocumentIn) (finder.PushResult, error)
	DeleteDocuments(ctx context.Context, ids []string) (finder.PushResult, error)
}

// documentsIn is the body of POST /api/v1/documents.
type documentsIn struct {
	Documents []finder.DocumentIn `json:"documents"`
}

// putDocuments adds or replaces a batch of documents (admin).
func (s *Server) putDocuments(c *gin.Context) {
	var in documentsIn
	if !bindStrict(c, &in) {
		return
	}
	if len(in.Documents) == 0 || len(in.Documents) > finder.MaxPushBatch {
		apiError(c, http.StatusBadRequest, "batch_size", fmt.Sprintf("send 1 to %d documents", finder.MaxPushBatch))
		return
	}
	res, err := s.docs.PutDocuments(c.Request.Context(), in.Documents)
	if s.documentError(c, err) {
		return
	}
	s.opts.Log.Warn("documents pushed", "token", s.caller(c).Name, "added", res.Added, "replaced", res.Replaced)
	c.JSON(http.StatusOK, res)
}

// deleteDocument removes one document by ID (admin). The ID is the rest of
// the path, so IDs with slashes work, sent as they are or percent-encoded.
func (s *Server) deleteDocument(c *gin.Context) {
	id := strings.TrimPrefix(c.Param("id"), "/")
	if strings.TrimSpace(id) == "" || !utf8.ValidString(id) {
		apiError(c, http.StatusBadRequest, "missing_id", "name the document: DELETE /api/v1/documents/{id}")
		return
	}
	res, err := s.docs.DeleteDocuments(c.Request.Context(), []string{id})
	if s.documentError(c, err) {
		return
	}
	s.opts.Log.Warn("document deleted", "token", s.caller(c).Name, "deleted", res.Deleted)
	c.JSON(http.StatusOK, res)
}

// documentError answers a failed document call and reports whether it did.
func (s *Server) documentError(c *gin.Context, err error) bool {
	switch {
	case err == nil:
		return false
	case errors.Is(err, finder.ErrInvalidDocument):
		apiError(c, http.StatusBadRequest, "invalid_document", err.Error())
	case errors.Is(err, finder.ErrNotReady):
		c.Header("Retry-After", "5")
		apiError(c, http.StatusServiceUnavailable, "not_ready", "the index is not loaded yet")
	default:
		s.opts.Log.Error("documents", "err", err)
		apiError(c, http.StatusInternalServerError, "internal", "the documents were not written: "+err.Error())
	}
	return true
}

// readJSONBody reads an application/json body of at most maxBody bytes of
// valid UTF-8, or answers 415, 413 or 400 and returns false.
func readJSONBody(c *gin.Context) ([]byte, bool) {
	if mt, _, err := mime.ParseMediaType(c.GetHeader("Content-Type")); err != nil || mt != "application/json" {
		apiError(c, http.StatusUnsupportedMediaType, "content_type", "send application/json")
		return nil, false
	}
	body, err := io.ReadAll(io.LimitReader(c.Request.Body, maxBody+1))
	if err != nil {
		apiError(c, http.StatusBadRequest, "bad_body", "could not read the body")
		return nil, false
	}
	if len(body) > maxBody {
		apiError(c, http.StatusRequestEntityTooLarge, "too_large", "the body exceeds 1 MiB")
		return nil, false
	}
	if !utf8.Valid(body) {
		apiError(c, http.StatusBadRequest, "invalid_utf8", "the body must be valid UTF-8")
		return nil, false
	}
	return body, true
}
