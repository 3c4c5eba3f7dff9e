package main

import (
	"context"
	"encoding/json"
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"fieldtab/schema"
	"fieldtab/server"
)

var uuidLine = regexp.MustCompile(`^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}\n$`)

func TestJobNewList(t *testing.T) {
	dbPath := filepath.Join(t.TempDir(), "site.db")
	code, out, errOut := runCmd(t, "job", "new", "--db", dbPath, "--name", "Harbour Library", "--units", "ip", "--elevation", "2500",
		"--site", "1 Quay St (fictional)", "--client", "City of Nowhere", "--engineer", "Mx Eng", "--contractor", "Pipe & Duct", "--firm", "Balance Works",
		"--project-number", "P-26-014")
	if code != 0 || !uuidLine.MatchString(out) || !strings.Contains(errOut, "Harbour Library") {
		t.Fatalf("job new: exit %d, stdout %q, stderr %q: want the ID alone on stdout", code, out, errOut)
	}
	id := strings.TrimSpace(out)
	code, out2, errOut := runCmd(t, "job", "new", "--db", dbPath, "--name", "Pier 9", "--units", "si", "--barometric", "98.2")
	if code != 0 || !uuidLine.MatchString(out2) {
		t.Fatalf("job new --barometric: exit %d %q %q", code, out2, errOut)
	}
	id2 := strings.TrimSpace(out2)

	db, err := schema.Open(context.Background(), dbPath)
	if err != nil {
		t.Fatal(err)
	}
	j, err := db.Job(context.Background(), id)
	if err != nil {
		t.Fatal(err)
	}
	if j.Name != "Harbour Library" || j.Units != "ip" || j.Elevation == nil || *j.Elevation != 2500 || j.Barometric != nil ||
		j.SiteAddress != "1 Quay St (fictional)" || j.Client != "City of Nowhere" || j.Engineer != "Mx Eng" ||
		j.Contractor != "Pipe & Duct" || j.TABFirm != "Balance Works" || j.ProjectNumber != "P-26-014" || j.Status != schema.JobOpen || j.Tolerances != schema.DefaultTolerances() {
		t.Errorf("stored job %+v", j)
	}
	// Two systems, three outlets on the first job, for the counts.
	a := schema.Actor{Name: "test", Role: schema.RoleLead}
	for i, tag := range []string{"AHU-1", "AHU-2"} {
		sys := &schema.System{JobID: id, Tag: tag, Kind: "air_handler"}
		if err := schema.Create(context.Background(), db, a, sys); err != nil {
			t.Fatal(err)
		}
		for k := 0; k <= 1-i; k++ {
			o := &schema.Outlet{JobID: id, SystemID: sys.ID, Tag: tag + "-S" + string(rune('1'+k)), Kind: "supply", DesignFlow: 400, Method: "hood", Factor: 1}
			if err := schema.Create(context.Background(), db, a, o); err != nil {
				t.Fatal(err)
			}
		}
	}
	db.Close()

	code, list, errOut := runCmd(t, "job", "list", "--db", dbPath)
	if code != 0 || errOut != "" {
		t.Fatalf("job list: exit %d %s", code, errOut)
	}
	lines := strings.Split(strings.TrimRight(list, "\n"), "\n")
	if len(lines) != 3 {
		t.Fatalf("job list: want a header and 2 jobs:\n%s", list)
	}
	// Newest first; the columns line up under the header.
	want := [][]string{
		{"ID", "NAME", "UNITS", "STATUS", "SYSTEMS", "OUTLETS", "TRAVERSES", "CAPACITY TESTS", "WATER TESTS", "READINGS"},
		{id2, "Pier 9", "SI", "open", "0", "0", "0", "0", "0", "0"},
		{id, "Harbour Library", "IP", "open", "2", "3", "0", "0", "0", "0"},
	}
	var cols []int
	for _, h := range want[0] {
		cols = append(cols, strings.Index(lines[0], h))
	}
	for i, row := range want[1:] {
		line := lines[i+1]
		for c, cell := range row {
			end := len(line)
			if c+1 < len(cols) {
				end = cols[c+1]
			}
			if cols[c] < 0 || end > len(line) || strings.TrimSpace(line[cols[c]:end]) != cell {
				t.Errorf("job list row %d column %q: want %q aligned under the header:\n%s", i+1, want[0][c], cell, list)
			}
		}
	}
}

func TestJobNewErrors(t *testing.T) {
	dbPath := filepath.Join(t.TempDir(), "site.db")
	tests := []struct {
		args []string
		want []string // in stderr
	}{
		{[]string{"--units", "ip"}, []string{"--name is required"}},
		{[]string{"--name", "X"}, []string{"--units is required", "ip (inch-pound) or si"}},
		{[]string{"--name", "X", "--units", "metric"}, []string{"--units", "ip, si"}},
		{[]string{"--name", "X", "--units", "ip", "--elevation", "30000"}, []string{"--elevation", "30,000 ft", "25,000 ft"}},
		{[]string{"--name", "X", "--units", "si", "--elevation", "9000"}, []string{"--elevation", "9,000 m", "7,500 m"}},
		{[]string{"--name", "X", "--units", "ip", "--barometric", "101.3"}, []string{"--barometric", "101.3 psia", "16 psia"}},
		{[]string{"--name", "X", "--units", "ip", "--elevation", "high"}, []string{"--elevation", "not a number"}},
		{[]string{"--name", "X", "--units", "ip", "--elevation", "100", "--barometric", "14.6"}, []string{"--elevation and --barometric", "not both"}},
		{[]string{"--name", "X", "--units", "ip", "--firm", "a\tb"}, []string{"--firm"}},
		{[]string{"--name", strings.Repeat("x", 201), "--units", "ip"}, []string{"--name"}},
		{[]string{"--name", "X", "--units", "ip", "--project-number", strings.Repeat("9", 81)}, []string{"--project-number"}},
	}
	for _, tt := range tests {
		code, out, errOut := runCmd(t, append([]string{"job", "new", "--db", dbPath}, tt.args...)...)
		ok := code == 1 && out == ""
		for _, w := range tt.want {
			ok = ok && strings.Contains(errOut, w)
		}
		// The user's words only: no JSON field names outside the flags' own.
		bare := regexp.MustCompile(`--[a-z-]+`).ReplaceAllString(errOut, "")
		for _, internal := range []string{"tab_firm", "site_address", "elevation:", "barometric:", "units:", "name:"} {
			ok = ok && !strings.Contains(bare, internal)
		}
		if !ok {
			t.Errorf("job new %q: exit %d, stdout %q, stderr %q; want exit 1 and %q", tt.args, code, out, errOut, tt.want)
		}
	}
	if code, out, _ := runCmd(t, "job", "list", "--db", dbPath); code != 0 || out != "" {
		t.Errorf("a refused job was stored:\n%s", out)
	}
}

// Without --db, job new and job list use the store serve uses.
func TestJobDefaultStore(t *testing.T) {
	data := t.TempDir()
	t.Setenv("XDG_DATA_HOME", data)
	code, out, errOut := runCmd(t, "job", "new", "--name", "Default store", "--units", "si")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	want, err := defaultDBPath()
	if err != nil {
		t.Fatal(err)
	}
	if want != filepath.Join(data, "fieldtab", "fieldtab.db") || !strings.Contains(errOut, want) {
		t.Errorf("store %s; stderr %q", want, errOut)
	}
	if _, err := os.Stat(want); err != nil {
		t.Fatal(err)
	}
	if _, list, _ := runCmd(t, "job", "list"); !strings.Contains(list, strings.TrimSpace(out)) {
		t.Errorf("job list of the default store:\n%s", list)
	}
}

// `fieldtab join-code` run beside a server on the same store file makes a
// code the server pairs with: a lead code once only.
func TestJoinCodeCommand(t *testing.T) {
	ctx := context.Background()
	dbPath := filepath.Join(t.TempDir(), "site.db")
	db, err := schema.Open(ctx, dbPath)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	srv := server.New(db, "127.0.0.1:0", nil)
	hs := httptest.NewServer(srv.Handler())
	defer hs.Close()

	code, out, errOut := runCmd(t, "join-code", "--db", dbPath, "--role", "lead", "--port", "8471")
	if code != 0 || errOut != "" {
		t.Fatalf("join-code: exit %d: %s", code, errOut)
	}
	m := regexp.MustCompile(`Lead join code:  ([2-9A-Z]{4}-[2-9A-Z]{4})  \(one device, as a lead, until \d\d:\d\d\)`).FindStringSubmatch(out)
	if m == nil || !strings.Contains(out, "join-code again") {
		t.Fatalf("join-code output:\n%s", out)
	}
	// Links: this machine's LAN addresses on --port, never localhost; with
	// none, a note says so.
	links := regexp.MustCompile(`http://\S+`).FindAllString(out, -1)
	for _, l := range links {
		if strings.Contains(l, "localhost") || strings.Contains(l, "127.0.0.1") || !strings.Contains(l, ":8471/#join="+strings.ReplaceAll(m[1], "-", "")) {
			t.Errorf("join link %s", l)
		}
	}
	if len(links) == 0 && !strings.Contains(out, "No join link: "+server.NoLANNote) {
		t.Errorf("neither a link nor the note:\n%s", out)
	}
	if len(links) > 0 && !strings.Contains(out, "█") {
		t.Errorf("no QR code:\n%s", out)
	}

	pair := func(name string) int {
		body := strings.NewReader(`{"code":"` + m[1] + `","name":"` + name + `"}`)
		resp, err := http.Post(hs.URL+"/api/v1/pair", "application/json", body)
		if err != nil {
			t.Fatal(err)
		}
		defer resp.Body.Close()
		var got struct{ Device schema.Device }
		json.NewDecoder(resp.Body).Decode(&got)
		if resp.StatusCode == 201 && got.Device.Role != schema.RoleLead {
			t.Errorf("paired as %q", got.Device.Role)
		}
		return resp.StatusCode
	}
	if s := pair("Lead tablet"); s != 201 {
		t.Fatalf("pair: %d", s)
	}
	if s := pair("Second tablet"); s != 401 {
		t.Errorf("second use of a lead code: %d, want 401", s)
	}
	if code, _, errOut := runCmd(t, "join-code", "--db", dbPath, "--role", "owner"); code != 1 || !strings.Contains(errOut, "--role") {
		t.Errorf("--role owner: exit %d %s", code, errOut)
	}
}
