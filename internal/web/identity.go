package web

import (
	"crypto/subtle"
	"net"
	"strings"

	"github.com/gin-gonic/gin"

	"kinword/internal/access"
)

// Identity says how a request becomes a viewer. Intranets authenticate at
// a reverse proxy, which passes the user's department and groups in
// headers; Kinword trusts those headers only when the proxy also sends the
// shared secret (or, if allowed, when the request comes from loopback).
// Anything else is an anonymous viewer who reads open documents only.
type Identity struct {
	// DepartmentHeader carries the department; default X-Kinword-Department.
	DepartmentHeader string
	// GroupsHeader carries comma-separated groups; default X-Kinword-Groups.
	GroupsHeader string
	// SecretHeader carries the shared secret; default X-Kinword-Proxy-Secret.
	SecretHeader string
	// Secret is the shared secret (from the environment, never the config
	// file); empty disables header trust unless TrustLoopback.
	Secret string
	// TrustLoopback trusts identity headers from 127.0.0.0/8 and ::1.
	TrustLoopback bool
}

func (id Identity) resolved() Identity {
	if id.DepartmentHeader == "" {
		id.DepartmentHeader = "X-Kinword-Department"
	}
	if id.GroupsHeader == "" {
		id.GroupsHeader = "X-Kinword-Groups"
	}
	if id.SecretHeader == "" {
		id.SecretHeader = "X-Kinword-Proxy-Secret"
	}
	return id
}

// viewer returns who is asking. In demo mode a persona parameter picks a
// demo department (only those configured).
func (s *Server) viewer(c *gin.Context) access.Viewer {
	if s.opts.Demo {
		if p := c.Query("persona"); p != "" {
			for _, per := range s.opts.Personas {
				if per.Department == p {
					return access.Viewer{Department: per.Department, Groups: per.Groups}.Normalize()
				}
			}
		}
	}
	id := s.opts.Identity.resolved()
	if !s.trusted(c, id) {
		return access.Anonymous
	}
	v := access.Viewer{Department: c.GetHeader(id.DepartmentHeader)}
	for _, g := range strings.Split(c.GetHeader(id.GroupsHeader), ",") {
		v.Groups = append(v.Groups, g)
	}
	return v.Normalize()
}

func (s *Server) trusted(c *gin.Context, id Identity) bool {
	if id.Secret != "" {
		got := c.GetHeader(id.SecretHeader)
		return subtle.ConstantTimeCompare([]byte(got), []byte(id.Secret)) == 1
	}
	return id.TrustLoopback && loopback(c.Request.RemoteAddr)
}

// loopback reports whether a request's remote address (host:port) is in
// 127.0.0.0/8 or ::1.
func loopback(remoteAddr string) bool {
	host, _, err := net.SplitHostPort(remoteAddr)
	if err != nil {
		return false
	}
	ip := net.ParseIP(host)
	return ip != nil && ip.IsLoopback()
}
