package web

import (
	"io/fs"
	"mime"
	"net/http"
	"path"
	"strings"

	"github.com/gin-gonic/gin"
)

// requiredAssets must be embedded; New fails without them.
var requiredAssets = append([]string{"index.html", "app.js", "brand.css", "widget.js", "openapi.json"}, deskAssets...)

func (s *Server) page(c *gin.Context) { s.serveAsset(c, "index.html") }

func (s *Server) asset(c *gin.Context) {
	name := strings.TrimPrefix(path.Clean(c.Param("file")), "/")
	s.serveAsset(c, name)
}

func (s *Server) serveAsset(c *gin.Context, name string) {
	b, err := fs.ReadFile(s.assets, name)
	if err != nil {
		apiError(c, http.StatusNotFound, "not_found", "no such asset")
		return
	}
	ct := mime.TypeByExtension(path.Ext(name))
	if ct == "" {
		ct = "application/octet-stream"
	}
	c.Header("Cache-Control", "no-cache")
	c.Data(http.StatusOK, ct, b)
}

func (s *Server) openapi(c *gin.Context) { s.serveAsset(c, "openapi.json") }
