// Package config embeds Kinword's default configuration file so the binary
// runs with no files beside it. The typed loader lives in internal/config.
package config

import _ "embed"

// Default is the text of config/kinword.toml: every key with its default.
//
//go:embed kinword.toml
var Default []byte
