package web

import (
	"crypto/rand"
	"crypto/sha256"
	"crypto/subtle"
	"encoding/base64"
	"encoding/hex"
	"errors"
	"fmt"
	"strings"

	"github.com/gin-gonic/gin"
)

// TokenPrefix starts every API token Kinword makes, so that a leaked one is
// easy to recognise in a scan of files or logs.
const TokenPrefix = "kw_"

// tokenBytes is the token's random part: 32 bytes (256 bits) from
// crypto/rand.
const tokenBytes = 32

// maxTokenLen bounds the Authorization value Kinword hashes (bytes).
const maxTokenLen = 512

// ErrBadToken wraps every problem with a configured token.
var ErrBadToken = errors.New("web: bad token")

// Token is one API token the server accepts. Only its SHA-256 is kept: the
// token itself is shown once by `kinword token` and never stored or
// logged.
type Token struct {
	// Name identifies the token in logs (the only trace a request with a
	// token leaves); unique, required.
	Name string
	// Role is RoleLibrarian or RoleAdmin.
	Role Role
	// SHA256 is the lowercase hex SHA-256 of the token (64 digits).
	SHA256 string
}

// NewToken returns a new random token (TokenPrefix, then 32 bytes from
// crypto/rand in unpadded base64url, RFC 4648 section 5) and its hex
// SHA-256, the value to configure.
func NewToken() (token, sum string, err error) {
	var b [tokenBytes]byte
	if _, err := rand.Read(b[:]); err != nil {
		return "", "", fmt.Errorf("web: new token: %w", err)
	}
	token = TokenPrefix + base64.RawURLEncoding.EncodeToString(b[:])
	return token, HashToken(token), nil
}

// HashToken returns the lowercase hex SHA-256 of a token.
func HashToken(token string) string {
	sum := sha256.Sum256([]byte(token))
	return hex.EncodeToString(sum[:])
}

// tokenSet holds the configured tokens' hashes.
type tokenSet struct {
	tokens []Token
	sums   [][sha256.Size]byte
}

// newTokenSet validates the configured tokens: known role, 64 hex digits,
// unique names and hashes.
func newTokenSet(ts []Token) (*tokenSet, error) {
	set := &tokenSet{}
	names := map[string]bool{}
	sums := map[string]bool{}
	for i, t := range ts {
		if strings.TrimSpace(t.Name) == "" {
			return nil, fmt.Errorf("%w: token %d has no name", ErrBadToken, i+1)
		}
		if t.Role != RoleLibrarian && t.Role != RoleAdmin {
			return nil, fmt.Errorf("%w: token %q: role %q is neither %s nor %s", ErrBadToken, t.Name, t.Role, RoleLibrarian, RoleAdmin)
		}
		raw, err := hex.DecodeString(t.SHA256)
		if err != nil || len(raw) != sha256.Size {
			return nil, fmt.Errorf("%w: token %q: sha256 must be 64 hex digits", ErrBadToken, t.Name)
		}
		if names[t.Name] {
			return nil, fmt.Errorf("%w: token name %q is used twice", ErrBadToken, t.Name)
		}
		key := strings.ToLower(t.SHA256)
		if sums[key] {
			return nil, fmt.Errorf("%w: token %q has the same hash as another token", ErrBadToken, t.Name)
		}
		names[t.Name], sums[key] = true, true
		var s [sha256.Size]byte
		copy(s[:], raw)
		set.tokens = append(set.tokens, t)
		set.sums = append(set.sums, s)
	}
	return set, nil
}

// match returns the configured token whose hash is the SHA-256 of token.
// Every configured hash is compared, each in constant time, so the time
// taken says nothing about which hash or how much of it matched.
func (ts *tokenSet) match(token string) (Token, bool) {
	sum := sha256.Sum256([]byte(token))
	found := -1
	for i := range ts.sums {
		if subtle.ConstantTimeCompare(sum[:], ts.sums[i][:]) == 1 {
			found = i
		}
	}
	if found < 0 {
		return Token{}, false
	}
	return ts.tokens[found], true
}

// bearer reads an "Authorization: Bearer TOKEN" header (RFC 6750 section
// 2.1; the scheme name is case-insensitive, RFC 9110 section 11.1).
// present reports whether a bearer credential was sent at all; other
// schemes (a proxy's own) count as absent.
func bearer(c *gin.Context) (token string, present bool) {
	h := strings.TrimSpace(c.GetHeader("Authorization"))
	scheme, rest, ok := strings.Cut(h, " ")
	if !ok || !strings.EqualFold(scheme, "Bearer") {
		return "", false
	}
	return strings.TrimSpace(rest), true
}
