// Package static embeds Kinword's web assets into the binary. go:embed
// cannot reach parent folders, so the embedding lives here beside the files.
// It must not import anything but the standard library.
package static

import "embed"

// FS holds the embedded assets.
//
//go:embed index.html app.js widget.js brand.css openapi.json
//go:embed librarian.html librarian.js librarian-io.js admin.html admin.js trials.js desk.js desk.css
//go:embed vendor/uplot/uPlot.iife.min.js vendor/uplot/uPlot.min.css vendor/uplot/LICENSE vendor/uplot/README.md
var FS embed.FS
