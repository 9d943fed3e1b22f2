package config

import (
	"strings"
	"testing"
)

// TestServerLimitsValidate: the request limits of [server] have the
// documented defaults (config/kinword.toml) and ranges, and an allowed
// origin must be an origin as a browser serialises it in the Origin
// header (RFC 6454 section 6.1: scheme "://" host [":" port], lower case,
// no path), since the server compares it byte for byte.
func TestServerLimitsValidate(t *testing.T) {
	d := Default()
	if d.Server.RatePerSecond != 50 || d.Server.RateBurst != 100 || d.Server.MaxBodyBytes != 1<<20 {
		t.Errorf("defaults drifted: %+v", d.Server)
	}
	cases := []struct {
		name, toml string
		bad        string // "" = valid
	}{
		{"limiting off", "rate_per_second = 0", ""},
		{"fractional rate", "rate_per_second = 0.5", ""},
		{"negative rate", "rate_per_second = -1", "server.rate_per_second"},
		{"NaN rate", "rate_per_second = nan", "server.rate_per_second"},
		{"zero burst", "rate_burst = 0", "server.rate_burst"},
		{"smallest body", "max_body_bytes = 1024", ""},
		{"body over 1 MiB", "max_body_bytes = 1048577", "server.max_body_bytes"},
		{"origin with port", `allowed_origins = ["https://intra.tarnwick.example:8443"]`, ""},
		{"IPv6 origin", `allowed_origins = ["http://[2001:db8::1]:8080"]`, ""},
		{"origin with a slash", `allowed_origins = ["https://intra.tarnwick.example/"]`, "server.allowed_origins"},
		{"origin with a path", `allowed_origins = ["https://intra.tarnwick.example/search"]`, "server.allowed_origins"},
		{"upper-case origin", `allowed_origins = ["https://Intra.tarnwick.example"]`, "server.allowed_origins"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			cfg := Default()
			if err := Parse([]byte("[server]\n"+c.toml+"\n"), &cfg); err != nil {
				t.Fatal(err)
			}
			err := cfg.Validate()
			switch {
			case c.bad == "" && err != nil:
				t.Fatalf("refused: %v", err)
			case c.bad != "" && (err == nil || !strings.Contains(err.Error(), c.bad)):
				t.Fatalf("error %v, want one naming %s", err, c.bad)
			}
		})
	}
}
