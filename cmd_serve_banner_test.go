package main

import (
	"bytes"
	"context"
	"path/filepath"
	"strings"
	"testing"

	"fieldtab/schema"
	"fieldtab/server"
)

// TestServeBannerSafety prints serve's start-up banner from a real store and
// checks its safety line names the work that can hurt someone (roofs,
// ladders, rotating equipment, live electrical, hot water, a pump against a
// closed valve) and defers to the specification, codes and licensed practice.
func TestServeBannerSafety(t *testing.T) {
	ctx := context.Background()
	path := filepath.Join(t.TempDir(), "site.db")
	db, err := schema.Open(ctx, path)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	var out, errOut bytes.Buffer
	m := NewMain(strings.NewReader(""), &out, &errOut)
	m.printJoinInfo(server.New(db, "127.0.0.1:0", nil), path)
	var safety string
	for _, l := range strings.Split(out.String(), "\n") {
		if strings.HasPrefix(l, "Safety:") {
			safety = l
		}
	}
	if safety == "" {
		t.Fatalf("no safety line in the banner (stderr %q):\n%s", errOut.String(), out.String())
	}
	for _, w := range []string{"roof", "ladder", "rotating", "live-electrical", "hot-water", "closed discharge valve",
		"project specification", "local codes", "licensed practice"} {
		if !strings.Contains(safety, w) {
			t.Errorf("the banner's safety line lacks %q: %s", w, safety)
		}
	}
}
