package web

import "github.com/gin-gonic/gin"

// deskAssets are the files of the librarian and admin pages ("desks"),
// added to requiredAssets so that New fails when one is not embedded. The
// pages are static: they hold no data, and every call they make goes to an
// API route that checks the caller's role.
var deskAssets = []string{
	"librarian.html", "librarian.js", "librarian-io.js",
	"admin.html", "admin.js", "trials.js",
	"desk.js", "desk.css",
	"vendor/uplot/uPlot.iife.min.js", "vendor/uplot/uPlot.min.css",
}

// librarianPage serves the vocabulary desk: rules, drafts with a preview,
// the change log, import and export (GET /librarian).
func (s *Server) librarianPage(c *gin.Context) { s.serveAsset(c, "librarian.html") }

// adminPage serves the suggestion review: trend chart, terms table and
// attention lists (GET /admin).
func (s *Server) adminPage(c *gin.Context) { s.serveAsset(c, "admin.html") }
