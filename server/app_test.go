package server

import (
	"io/fs"
	"regexp"
	"slices"
	"strings"
	"testing"

	"fieldtab/webui"
)

// The app's promises that can be checked on its files: under 240 KB, user
// text never parsed as HTML, no inline script or handlers (CSP would block
// them anyway), and every file in the service worker's offline copy.
func TestAppAssets(t *testing.T) {
	files := webui.Files()
	var total int
	var paths []string
	err := fs.WalkDir(files, ".", func(path string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		b, err := fs.ReadFile(files, path)
		if err != nil {
			return err
		}
		total += len(b)
		paths = append(paths, path)
		text := string(b)
		for _, bad := range []string{"innerHTML", "outerHTML", "insertAdjacentHTML", "document.write", "eval(", "new Function"} {
			if strings.Contains(text, bad) {
				t.Errorf("%s uses %s", path, bad)
			}
		}
		if strings.HasSuffix(path, ".html") && (regexp.MustCompile(`<script(?:\s[^>]*)?>\s*[^<\s]`).MatchString(text) ||
			regexp.MustCompile(`\son[a-z]+\s*=`).MatchString(text) || strings.Contains(text, "style=")) {
			t.Errorf("%s has inline script, handlers or styles", path)
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	// 240 KB: the lead's editors for every kind of record and the
	// corrections took the app past 200 KB. It loads once per device over the
	// site Wi-Fi, then comes from the cache.
	if total >= 240_000 {
		t.Errorf("app payload %d bytes; the budget is 240,000", total)
	}
	t.Logf("app payload %d bytes in %d files", total, len(paths))

	sw, err := fs.ReadFile(files, "sw.js")
	if err != nil {
		t.Fatal(err)
	}
	shell := regexp.MustCompile(`'([^']+\.(?:js|css|svg|webmanifest))'`).FindAllStringSubmatch(string(sw), -1)
	var cached []string
	for _, m := range shell {
		cached = append(cached, m[1])
	}
	for _, p := range paths {
		if p != "sw.js" && p != "index.html" && !slices.Contains(cached, p) {
			t.Errorf("%s is not in sw.js's offline list: the app would break offline on the screen that needs it", p)
		}
	}
	for _, c := range cached {
		if !slices.Contains(paths, c) {
			t.Errorf("sw.js lists %s, which is not an app file", c)
		}
	}
}
