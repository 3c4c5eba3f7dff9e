package server

import (
	"bytes"
	"context"
	"encoding/json"
	"io"
	"net/http"
	"slices"
	"strings"
	"testing"
	"time"

	"fieldtab/schema"
)

func TestJoinURLs(t *testing.T) {
	lan := []string{"192.0.2.10:8470", "198.51.100.4:8470"} // RFC 5737 documentation addresses
	tests := []struct {
		host string
		lan  []string
		want []string
	}{
		{"localhost:8470", lan, []string{"http://192.0.2.10:8470", "http://198.51.100.4:8470"}},
		{"LOCALHOST", lan, []string{"http://192.0.2.10:8470", "http://198.51.100.4:8470"}},
		{"app.localhost:8470", lan, []string{"http://192.0.2.10:8470", "http://198.51.100.4:8470"}},
		{"127.0.0.1:8470", lan, []string{"http://192.0.2.10:8470", "http://198.51.100.4:8470"}},
		{"[::1]:8470", lan, []string{"http://192.0.2.10:8470", "http://198.51.100.4:8470"}},
		{"0.0.0.0:8470", lan, []string{"http://192.0.2.10:8470", "http://198.51.100.4:8470"}},
		// A request that came in on a reachable address keeps it, first.
		{"198.51.100.4:8470", lan, []string{"http://198.51.100.4:8470", "http://192.0.2.10:8470"}},
		{"laptop.site.example:8470", lan, []string{"http://laptop.site.example:8470", "http://192.0.2.10:8470", "http://198.51.100.4:8470"}},
		{"192.0.2.99:8470", nil, []string{"http://192.0.2.99:8470"}},
		{"localhost:8470", nil, nil},
		{"", []string{"127.0.0.1:8470"}, nil},
	}
	for _, tt := range tests {
		got, note := JoinURLs(tt.host, tt.lan)
		if !slices.Equal(got, tt.want) {
			t.Errorf("JoinURLs(%q, %v) = %v, want %v", tt.host, tt.lan, got, tt.want)
		}
		if (len(got) == 0) != (note != "") {
			t.Errorf("JoinURLs(%q, %v): note %q with %d addresses", tt.host, tt.lan, note, len(got))
		}
	}
	if got := JoinLink("http://192.0.2.10:8470", "ABCD-EFGH"); got != "http://192.0.2.10:8470/#join=ABCDEFGH" {
		t.Errorf("JoinLink = %q", got)
	}
}

// joinCodeVia asks POST /join-codes as the lead with the request's Host set
// to host, the way a browser on that address sends it.
func joinCodeVia(t *testing.T, ts *testServer, host string) map[string]any {
	t.Helper()
	req, err := http.NewRequest("POST", ts.ts.URL+"/api/v1/join-codes", strings.NewReader(`{"role":"technician"}`))
	if err != nil {
		t.Fatal(err)
	}
	req.Host = host
	req.Header.Set("Authorization", "Bearer "+ts.lead)
	req.Header.Set("Content-Type", "application/json")
	resp, err := ts.ts.Client().Do(req)
	if err != nil {
		t.Fatal(err)
	}
	defer resp.Body.Close()
	b, _ := io.ReadAll(resp.Body)
	if resp.StatusCode != 201 {
		t.Fatalf("status %d: %s", resp.StatusCode, b)
	}
	var out map[string]any
	if err := json.Unmarshal(b, &out); err != nil {
		t.Fatal(err)
	}
	return out
}

func TestJoinCodeLinks(t *testing.T) {
	ts := MustOpenServer(t)
	ts.SetLANAddrs([]string{"192.0.2.10:8470"}) // TEST-NET-1 (RFC 5737)
	t.Run("OKLocalhostGetsLAN", func(t *testing.T) {
		for _, host := range []string{"localhost:8470", "127.0.0.1:8470"} {
			out := joinCodeVia(t, ts, host)
			code := strings.ReplaceAll(out["code"].(string), "-", "")
			if out["join_url"] != "http://192.0.2.10:8470/#join="+code {
				t.Errorf("Host %s: join_url %v, want the LAN address", host, out["join_url"])
			}
			if _, ok := out["qr_png"].(string); !ok {
				t.Errorf("Host %s: no qr_png", host)
			}
		}
	})
	t.Run("OKLANHostKept", func(t *testing.T) {
		out := joinCodeVia(t, ts, "198.51.100.4:8470")
		code := strings.ReplaceAll(out["code"].(string), "-", "")
		if out["join_url"] != "http://198.51.100.4:8470/#join="+code {
			t.Errorf("join_url %v, want the request's own address", out["join_url"])
		}
		urls, _ := out["join_urls"].([]any)
		if len(urls) != 2 || urls[1] != "http://192.0.2.10:8470/#join="+code {
			t.Errorf("join_urls %v", urls)
		}
	})
	t.Run("OKNoLANSaysSo", func(t *testing.T) {
		ts.SetLANAddrs(nil)
		out := joinCodeVia(t, ts, "localhost:8470")
		if out["join_url"] != "" || out["join_url_note"] != NoLANNote || out["qr_png"] != nil {
			t.Errorf("no LAN: %v", out)
		}
		// The code itself still pairs a device.
		want(t, ts.do(t, "POST", "/pair", "", map[string]string{"code": out["code"].(string), "name": "Phone"}), 201, "")
	})
	t.Run("OKLoopbackOnlySaysWhy", func(t *testing.T) {
		// serve --addr 127.0.0.1:… has LAN addresses, but none answers.
		ts.SetLANAddrs(nil)
		ts.SetJoinNote("fieldtab listens only on this computer")
		out := joinCodeVia(t, ts, "localhost:8470")
		if out["join_url"] != "" || out["join_url_note"] != "fieldtab listens only on this computer" {
			t.Errorf("loopback only: %v", out)
		}
	})
}

// A code made through a second handle on the store file, as `fieldtab
// join-code` does beside `fieldtab serve`, pairs through the server.
func TestJoinCodeFromAnotherProcess(t *testing.T) {
	path := t.TempDir() + "/fieldtab.db"
	ts := mustOpenServerAt(t, path)
	cli, err := schema.Open(context.Background(), path)
	if err != nil {
		t.Fatal(err)
	}
	defer cli.Close()
	laptop := schema.Actor{Name: "command line", Role: schema.RoleLead}
	lead, _, err := cli.CreateJoinCode(t.Context(), laptop, schema.RoleLead, testNow)
	if err != nil {
		t.Fatal(err)
	}
	var out struct {
		Token  string
		Device schema.Device
	}
	r := ts.do(t, "POST", "/pair", "", map[string]string{"code": lead, "name": "Lead tablet"})
	want(t, r, 201, "")
	r.decode(t, &out)
	if out.Device.Role != schema.RoleLead {
		t.Fatalf("paired as %q, want lead", out.Device.Role)
	}
	want(t, ts.do(t, "GET", "/devices", out.Token, nil), 200, "")
	// A lead code joins one device.
	want(t, ts.do(t, "POST", "/pair", "", map[string]string{"code": lead, "name": "Second tablet"}), 401, "code")
	// A code made 16 minutes before the server's clock has expired.
	old, _, err := cli.CreateJoinCode(t.Context(), laptop, schema.RoleTechnician, testNow.Add(-joinCodeTTL-time.Minute))
	if err != nil {
		t.Fatal(err)
	}
	r = ts.do(t, "POST", "/pair", "", map[string]string{"code": old, "name": "Late phone"})
	want(t, r, 401, "code")
	if !bytes.Contains(r.body, []byte("expired")) {
		t.Errorf("expired code: %s", r.body)
	}
}
