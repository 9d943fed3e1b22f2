package web

import (
	"context"
	"errors"
	"net/http"

	"github.com/gin-gonic/gin"

	"kinword/internal/finder"
)

// Reloader is what a reload needs; *finder.Finder satisfies it. Reload
// must swap in a complete new snapshot or, on error, keep the old one.
type Reloader interface {
	Reload(ctx context.Context) error
}

// Reload reloads what the server serves (the finder's index snapshot and
// association table, swapped in at once). POST /api/v1/reload and SIGHUP
// in kinword serve both come here; by names who asked (a token name or
// "SIGHUP") for the log. Each outcome counts in
// kinword_reload_total{result="ok"|"failed"}; after a failure the previous
// snapshot keeps serving.
func (s *Server) Reload(ctx context.Context, by string) error {
	if err := s.reloader.Reload(ctx); err != nil {
		s.metrics.reloads.WithLabelValues("failed").Inc()
		s.opts.Log.Error("reload failed; the previous snapshot keeps serving", "by", by, "err", err)
		return err
	}
	s.metrics.reloads.WithLabelValues("ok").Inc()
	s.opts.Log.Warn("reloaded the index snapshot and the association table", "by", by)
	return nil
}

// reload is POST /api/v1/reload (admin).
func (s *Server) reload(c *gin.Context) {
	err := s.Reload(c.Request.Context(), s.caller(c).Name)
	switch {
	case errors.Is(err, finder.ErrNotReady):
		c.Header("Retry-After", "5")
		apiError(c, http.StatusServiceUnavailable, "not_ready", "the index is not loaded yet")
		return
	case err != nil:
		apiError(c, http.StatusInternalServerError, "reload_failed", "the previous snapshot keeps serving: "+err.Error())
		return
	}
	c.JSON(http.StatusOK, gin.H{"status": "reloaded", "loaded": s.f.Status()})
}

// CountReload counts a swap done outside Reload (a replica installing a
// published snapshot) in kinword_reload_total, so a rejected or failed
// snapshot shows in the same metric as a failed reload.
func (s *Server) CountReload(ok bool) {
	if ok {
		s.metrics.reloads.WithLabelValues("ok").Inc()
		return
	}
	s.metrics.reloads.WithLabelValues("failed").Inc()
}
