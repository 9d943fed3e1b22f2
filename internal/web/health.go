package web

import (
	"net/http"

	"github.com/gin-gonic/gin"
)

func (s *Server) healthz(c *gin.Context) { c.JSON(http.StatusOK, gin.H{"status": "ok"}) }

func (s *Server) readyz(c *gin.Context) {
	if err := s.f.Ready(); err != nil {
		c.JSON(http.StatusServiceUnavailable, gin.H{"status": "not ready", "reason": err.Error()})
		return
	}
	c.JSON(http.StatusOK, gin.H{"status": "ready", "loaded": s.f.Status()})
}
