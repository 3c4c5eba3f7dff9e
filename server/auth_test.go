package server

import (
	"bytes"
	"net/http"
	"strings"
	"testing"
	"time"

	"fieldtab/schema"
)

func TestAuth(t *testing.T) {
	ts := MustOpenServer(t)
	f := ts.mustFixture(t)
	job := "/jobs/" + f.job
	// Every data endpoint, each needing a token.
	endpoints := []struct{ method, path string }{
		{"GET", "/jobs"}, {"POST", "/jobs"}, {"GET", job}, {"PUT", job},
		{"GET", job + "/changes?since=0"}, {"GET", job + "/audit"},
		{"GET", job + "/readings"}, {"POST", job + "/readings"},
		{"GET", job + "/outlets"}, {"POST", job + "/outlets"},
		{"GET", job + "/outlets/" + f.outlet}, {"PUT", job + "/outlets/" + f.outlet}, {"DELETE", job + "/outlets/" + f.outlet},
		{"GET", "/me"}, {"GET", "/devices"}, {"POST", "/join-codes"}, {"POST", "/devices/" + ts.techDev.ID + "/revoke"},
	}
	t.Run("ErrNoToken", func(t *testing.T) {
		for _, e := range endpoints {
			r := ts.do(t, e.method, e.path, "", `{}`)
			want(t, r, 401, "")
			if r.header.Get("WWW-Authenticate") == "" {
				t.Errorf("%s %s: 401 without WWW-Authenticate", e.method, e.path)
			}
		}
	})
	t.Run("ErrWrongToken", func(t *testing.T) {
		for _, e := range endpoints {
			want(t, ts.do(t, e.method, e.path, "not-a-token", `{}`), 401, "")
		}
	})
	t.Run("ErrTechnicianOnLeadRoute", func(t *testing.T) {
		lead := []struct{ method, path string }{
			{"POST", "/jobs"}, {"PUT", job}, {"GET", job + "/audit"},
			{"POST", job + "/outlets"}, {"PUT", job + "/outlets/" + f.outlet}, {"DELETE", job + "/outlets/" + f.outlet},
			{"POST", job + "/systems"}, {"DELETE", job + "/systems/" + f.system},
			{"GET", "/devices"}, {"POST", "/join-codes"}, {"POST", "/devices/" + ts.techDev.ID + "/revoke"},
		}
		for _, e := range lead {
			want(t, ts.do(t, e.method, e.path, ts.tech, `{}`), 403, "")
		}
		// Nothing was deleted on the way.
		want(t, ts.do(t, "GET", job+"/outlets/"+f.outlet, ts.tech, nil), 200, "")
	})
	t.Run("OKSchemeAnyCase", func(t *testing.T) {
		r := ts.do(t, "GET", "/me", "", nil)
		want(t, r, 401, "")
		req, _ := http.NewRequest("GET", ts.ts.URL+"/api/v1/me", nil)
		req.Header.Set("Authorization", "bearer "+ts.tech)
		resp, err := ts.ts.Client().Do(req)
		if err != nil {
			t.Fatal(err)
		}
		resp.Body.Close()
		if resp.StatusCode != 200 {
			t.Fatalf("lower-case scheme: status %d", resp.StatusCode)
		}
	})
	t.Run("OKTechnicianReads", func(t *testing.T) {
		for _, p := range []string{"/jobs", job, job + "/readings", job + "/outlets", job + "/changes?since=0", "/me"} {
			want(t, ts.do(t, "GET", p, ts.tech, nil), 200, "")
		}
	})
	t.Run("ErrRevokedToken", func(t *testing.T) {
		_, tok, err := ts.db.CreateDevice(t.Context(), schema.Actor{Name: "test"}, "Phone 2", schema.RoleTechnician)
		if err != nil {
			t.Fatal(err)
		}
		var me struct{ Device schema.Device }
		r := ts.do(t, "GET", "/me", tok, nil)
		want(t, r, 200, "")
		r.decode(t, &me)
		want(t, ts.do(t, "POST", "/devices/"+me.Device.ID+"/revoke", ts.lead, nil), 204, "")
		want(t, ts.do(t, "GET", "/me", tok, nil), 401, "")
		want(t, ts.do(t, "GET", job, tok, nil), 401, "")
		want(t, ts.do(t, "POST", job+"/readings", tok, `{"readings":[]}`), 401, "")
	})
}

func TestPairing(t *testing.T) {
	t.Run("OK", func(t *testing.T) {
		ts := MustOpenServer(t)
		code, expires, err := ts.NewJoinCode(schema.RoleTechnician)
		if err != nil {
			t.Fatal(err)
		}
		if !expires.After(testNow) {
			t.Fatalf("expires %v", expires)
		}
		var out struct {
			Token  string
			Device schema.Device
		}
		r := ts.do(t, "POST", "/pair", "", map[string]string{"code": code, "name": "Phone 7"})
		want(t, r, 201, "")
		r.decode(t, &out)
		if out.Token == "" || out.Device.Role != schema.RoleTechnician || out.Device.Name != "Phone 7" {
			t.Fatalf("pair: %s", r.body)
		}
		want(t, ts.do(t, "GET", "/me", out.Token, nil), 200, "")
		want(t, ts.do(t, "GET", "/jobs", out.Token, nil), 200, "")
		want(t, ts.do(t, "POST", "/jobs", out.Token, `{}`), 403, "")
		// A technician code serves the whole crew until it expires; typed in
		// lower case and without the dash it still works.
		want(t, ts.do(t, "POST", "/pair", "", map[string]string{"code": code, "name": "Phone 8"}), 201, "")
		loose := code[:4] + " " + code[5:]
		want(t, ts.do(t, "POST", "/pair", "", map[string]string{"code": loose, "name": "Phone 9"}), 201, "")
	})
	t.Run("OKLeadCodeSingleUse", func(t *testing.T) {
		ts := MustOpenServer(t)
		code, _, err := ts.NewJoinCode(schema.RoleLead)
		if err != nil {
			t.Fatal(err)
		}
		var out struct{ Token string }
		r := ts.do(t, "POST", "/pair", "", map[string]string{"code": code, "name": "Lead tablet"})
		want(t, r, 201, "")
		r.decode(t, &out)
		want(t, ts.do(t, "POST", "/jobs", out.Token, map[string]string{"name": "Dock 4", "units": "ip"}), 201, "")
		want(t, ts.do(t, "POST", "/pair", "", map[string]string{"code": code, "name": "Second"}), 401, "code")
	})
	t.Run("OKLeadCodeKeptOnRefusedName", func(t *testing.T) {
		ts := MustOpenServer(t)
		code, _, _ := ts.NewJoinCode(schema.RoleLead)
		want(t, ts.do(t, "POST", "/pair", "", map[string]string{"code": code, "name": " "}), 400, "name")
		want(t, ts.do(t, "POST", "/pair", "", map[string]string{"code": code, "name": "Lead tablet"}), 201, "")
	})
	t.Run("ErrExpiredCode", func(t *testing.T) {
		ts := MustOpenServer(t)
		now := testNow
		ts.Now = func() time.Time { return now }
		code, _, _ := ts.NewJoinCode(schema.RoleTechnician)
		now = now.Add(joinCodeTTL + time.Second)
		want(t, ts.do(t, "POST", "/pair", "", map[string]string{"code": code, "name": "Late"}), 401, "code")
	})
	t.Run("ErrWrongCodeThenTooMany", func(t *testing.T) {
		ts := MustOpenServer(t)
		now := testNow
		ts.Now = func() time.Time { return now }
		code, _, _ := ts.NewJoinCode(schema.RoleTechnician)
		for i := 0; i < guessesPerClient; i++ {
			want(t, ts.do(t, "POST", "/pair", "", map[string]string{"code": "AAAA-AAAA", "name": "Guess"}), 401, "code")
		}
		limited := ts.do(t, "POST", "/pair", "", map[string]string{"code": "AAAA-AAAA", "name": "Guess"})
		want(t, limited, 429, "code")
		if limited.header.Get("Retry-After") != "60" {
			t.Errorf("Retry-After = %q, want 60", limited.header.Get("Retry-After"))
		}
		// The right code waits out the window too.
		want(t, ts.do(t, "POST", "/pair", "", map[string]string{"code": code, "name": "Phone"}), 429, "code")
		now = now.Add(guessWindow + time.Second)
		want(t, ts.do(t, "POST", "/pair", "", map[string]string{"code": code, "name": "Phone"}), 201, "")
	})
	t.Run("OKGuessClient", func(t *testing.T) {
		for host, want := range map[string]string{
			"192.0.2.7": "192.0.2.7", "2001:db8:1:2:3:4:5:6": "2001:db8:1:2::/64", "2001:db8:1:2:ffff::1": "2001:db8:1:2::/64",
		} {
			if got := guessClient(host); got != want {
				t.Errorf("guessClient(%s) = %s, want %s", host, got, want)
			}
		}
	})
	t.Run("ErrBody", func(t *testing.T) {
		ts := MustOpenServer(t)
		code, _, _ := ts.NewJoinCode(schema.RoleTechnician)
		want(t, ts.do(t, "POST", "/pair", "", `{"code":"x","nmae":"y"}`), 400, "nmae")
		want(t, ts.do(t, "POST", "/pair", "", map[string]string{"code": code, "name": ""}), 400, "name")
	})
	t.Run("OKJoinCodeEndpoint", func(t *testing.T) {
		ts := MustOpenServer(t)
		ts.SetLANAddrs([]string{"192.0.2.10:8470"}) // TEST-NET-1 (RFC 5737)
		var jc struct {
			Code, Role string
			JoinURL    string `json:"join_url"`
			QRPNG      []byte `json:"qr_png"`
		}
		r := ts.do(t, "POST", "/join-codes", ts.lead, map[string]string{"role": "technician"})
		want(t, r, 201, "")
		r.decode(t, &jc)
		if !strings.HasSuffix(jc.JoinURL, "/#join="+strings.ReplaceAll(jc.Code, "-", "")) || !bytes.HasPrefix(jc.QRPNG, []byte("\x89PNG")) {
			t.Errorf("join_url %q, qr_png %d bytes: want the join address and a PNG of it", jc.JoinURL, len(jc.QRPNG))
		}
		want(t, ts.do(t, "POST", "/pair", "", map[string]string{"code": jc.Code, "name": "Phone"}), 201, "")
		want(t, ts.do(t, "POST", "/join-codes", ts.lead, map[string]string{"role": "owner"}), 400, "role")
	})
	t.Run("OKDevices", func(t *testing.T) {
		ts := MustOpenServer(t)
		var out struct{ Devices []schema.Device }
		r := ts.do(t, "GET", "/devices", ts.lead, nil)
		want(t, r, 200, "")
		r.decode(t, &out)
		if len(out.Devices) != 2 {
			t.Fatalf("devices: %s", r.body)
		}
		want(t, ts.do(t, "POST", "/devices/"+schema.NewID()+"/revoke", ts.lead, nil), 404, "")
	})
}
