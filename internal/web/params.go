package web

import (
	"fmt"
	"maps"
	"net/http"
	"net/url"
	"slices"
	"strings"
	"unicode/utf8"

	"github.com/gin-gonic/gin"
)

// maxParamBytes bounds every query parameter but the query itself
// (bytes): the "|"-joined accepted terms and useful IDs, the persona.
const maxParamBytes = 4096

// defaultMaxQueryBytes is the default limit of q, the same as the
// finder's (index.QueryLimits).
const defaultMaxQueryBytes = 512

// strictQuery parses the query string of a route that takes only the
// allowed parameters, each at most once, each valid UTF-8 without control
// characters and at most maxParamBytes long. Anything else answers 400
// naming the problem, so that a typo or a smuggled second value is never
// silently dropped. It returns the values by name ("" when absent).
func strictQuery(c *gin.Context, allowed ...string) (map[string]string, bool) {
	raw, err := url.ParseQuery(c.Request.URL.RawQuery)
	if err != nil {
		apiError(c, http.StatusBadRequest, "bad_query_string", "the query string is malformed: "+err.Error())
		return nil, false
	}
	out := make(map[string]string, len(allowed))
	for _, name := range allowed {
		out[name] = ""
	}
	for _, name := range slices.Sorted(maps.Keys(raw)) {
		vals := raw[name]
		if _, ok := out[name]; !ok {
			apiError(c, http.StatusBadRequest, "unknown_parameter",
				fmt.Sprintf("unknown parameter %s; this route takes %s", truncate(name, 64), strings.Join(allowed, ", ")))
			return nil, false
		}
		if len(vals) > 1 {
			apiError(c, http.StatusBadRequest, "repeated_parameter", fmt.Sprintf("parameter %s is given %d times; give it once", name, len(vals)))
			return nil, false
		}
		v := vals[0]
		if !utf8.ValidString(v) {
			apiError(c, http.StatusBadRequest, "invalid_utf8", "parameters must be valid UTF-8")
			return nil, false
		}
		if strings.ContainsFunc(v, isControl) {
			apiError(c, http.StatusBadRequest, "control_characters", fmt.Sprintf("parameter %s contains control characters", name))
			return nil, false
		}
		if name != "q" && len(v) > maxParamBytes {
			apiError(c, http.StatusBadRequest, "parameter_too_long", fmt.Sprintf("parameter %s is %d bytes; the limit is %d", name, len(v), maxParamBytes))
			return nil, false
		}
		out[name] = v
	}
	return out, true
}

// isControl reports a control character (Unicode general category Cc:
// U+0000..U+001F, U+007F..U+009F) other than the tab, which a pasted
// query may hold and the analyser treats as a space.
func isControl(r rune) bool {
	return r != '\t' && (r < 0x20 || r >= 0x7f && r <= 0x9f)
}
