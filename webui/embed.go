// Package webui holds the field app's assets: plain HTML, CSS and JavaScript
// modules, served by the server package as they are (no build step).
package webui

import (
	"embed"
	"io/fs"
)

//go:embed static
var files embed.FS

// Files returns the app's assets, rooted at the app's top directory
// (index.html, app.css, sw.js, js/…).
func Files() fs.FS {
	sub, err := fs.Sub(files, "static")
	if err != nil {
		panic(err) // the directory is embedded above: cannot happen
	}
	return sub
}
