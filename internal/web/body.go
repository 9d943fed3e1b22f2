package web

import (
	"bytes"
	"encoding/json"
	"net/http"

	"github.com/gin-gonic/gin"
)

// bindStrict reads an application/json body (readJSONBody's limits) into
// v, refusing unknown fields and trailing data with 400 malformed_json.
// It reports whether the handler may go on.
func bindStrict(c *gin.Context, v any) bool {
	body, ok := readJSONBody(c)
	if !ok {
		return false
	}
	return decodeStrict(c, body, v)
}

// decodeStrict decodes a read body into v as bindStrict does.
func decodeStrict(c *gin.Context, body []byte, v any) bool {
	dec := json.NewDecoder(bytes.NewReader(body))
	dec.DisallowUnknownFields()
	if err := dec.Decode(v); err != nil || dec.More() {
		msg := "malformed JSON"
		if err != nil {
			msg += ": " + err.Error()
		}
		apiError(c, http.StatusBadRequest, "malformed_json", msg)
		return false
	}
	return true
}
