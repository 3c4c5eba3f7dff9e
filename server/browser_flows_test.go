package server

// The field app's tasks in a real browser, through the DOM contract's
// data-test attributes, each checked in the store afterwards. The harness is
// in browser_test.go.

import (
	"context"
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"
	"testing"
	"time"

	cdppage "github.com/chromedp/cdproto/page"
	"github.com/chromedp/chromedp"

	"fieldtab/schema"
)

// browserJob is a small job made through the store: one air handler with n
// outlets (S-101 … of 400 cfm design), a flow hood, a 24 in round traverse of 8
// points and a capacity test on a direct airflow reading.
type browserJob struct {
	job, system, instrument, traverse, capacity string
	outlets                                     []schema.Outlet // in tag order
}

func makeBrowserJob(t *testing.T, db *schema.DB, n int) browserJob {
	t.Helper()
	ctx := context.Background()
	a := schema.Actor{Name: "Lead", Role: schema.RoleLead}
	must := func(err error) {
		t.Helper()
		if err != nil {
			t.Fatalf("fixture: %v", err)
		}
	}
	j := &schema.Job{Name: "Harbour Library", Units: "ip"}
	must(db.CreateJob(ctx, a, j))
	sys := &schema.System{JobID: j.ID, Tag: "AHU-1", Kind: "air_handler", Name: "Reading rooms",
		Design: schema.SystemDesign{Airflow: 4000, RatedTotal: 120_000, RatedSensible: 86_000}}
	must(schema.Create(ctx, db, a, sys))
	in := &schema.Instrument{JobID: j.ID, Tag: "Hood 1", Kind: "flow_hood", AccuracyPct: 3, AccuracyAbs: 7, AccuracyUnit: "cfm",
		CalibratedOn: time.Now().AddDate(0, 0, -100).Format(time.DateOnly), CalibrationDue: time.Now().AddDate(0, 0, 200).Format(time.DateOnly)}
	must(schema.Create(ctx, db, a, in))
	bj := browserJob{job: j.ID, system: sys.ID, instrument: in.ID}
	for i := range n {
		o := &schema.Outlet{JobID: j.ID, SystemID: sys.ID, Tag: fmt.Sprintf("S-%d", 101+i), Room: fmt.Sprintf("Room %d", 101+i/2),
			Kind: "supply", DesignFlow: 400, Method: "hood", Factor: 1}
		must(schema.Create(ctx, db, a, o))
		bj.outlets = append(bj.outlets, *o)
	}
	tr := &schema.Traverse{JobID: j.ID, SystemID: sys.ID, Tag: "T-1", Location: "main supply", Shape: "round", Method: "equal-area",
		Diameter: 24, PointsPerDiameter: 4, Diameters: 2}
	must(schema.Create(ctx, db, a, tr))
	ct := &schema.CapacityTest{JobID: j.ID, SystemID: sys.ID, Tag: "CT-1", Mode: "cooling", FlowSource: "direct", FlowBasis: "standard"}
	must(schema.Create(ctx, db, a, ct))
	bj.traverse, bj.capacity = tr.ID, ct.ID
	return bj
}

// tagSel selects the contract's element test of the record tagged tag.
func tagSel(test, tag string) string {
	return fmt.Sprintf("[data-test=%s][data-tag=%s]", test, js(tag))
}

// join pairs the tab's device through the join screen with a fresh
// technician code and waits for the job home.
func (p *page) join(name string) {
	p.t.Helper()
	code, _, err := p.app.srv.NewJoinCode(schema.RoleTechnician)
	if err != nil {
		p.t.Fatal(err)
	}
	code = strings.ReplaceAll(code, "-", "")
	p.navigate("/#join=" + code)
	p.wait("the join link's code in the code field", joinCodeIs(code))
	p.typeInto("[data-test=device-name]", name)
	p.click("[data-test=join-submit]")
	p.waitSel("[data-test=job-home]")
}

// joinCodeIs tests that the join code field holds code (dashes, spaces and
// case aside).
func joinCodeIs(code string) string {
	f := q("[data-test=join-code]")
	return f + " && " + f + ".value.replace(/[-\\s]/g, '').toUpperCase() === " + js(code)
}

// goHash moves the app to a route as a link would.
func (p *page) goHash(hash string) {
	p.t.Helper()
	p.run("go to "+hash, chromedp.Evaluate[chromedp.Void]("location.hash = "+js(hash)))
}

// openOutlet goes from the job home to the system's outlet list and opens tag.
func (p *page) openOutlet(tag string) {
	p.t.Helper()
	p.click(tagSel("system", "AHU-1"))
	p.click(tagSel("outlet-item", tag))
	p.waitSel(tagSel("outlet-screen", tag))
}

// enter types value into the entry field with stage chosen and saves it.
func (p *page) enter(stage, value string) {
	p.t.Helper()
	p.choose("[data-test=stage]", stage)
	p.typeInto("[data-test=reading-value]", value)
	p.click("[data-test=reading-save]")
}

// resultShows is a JavaScript test that sel's text shows every number of
// want (to within 0.5 %, whatever the digits the app chose).
func resultShows(sel string, want ...float64) string {
	var conds []string
	for _, w := range want {
		conds = append(conds, fmt.Sprintf("__shows(t, %g)", w))
	}
	return fmt.Sprintf(`(() => {
		const el = %s; if (!el) return false;
		const t = el.textContent.replace(/(\d)[,\u2009\u202f ](?=\d{3}\b)/g, '$1');
		const __shows = (t, w) => (t.match(/-?\d+(\.\d+)?/g) || []).some(n => Math.abs(+n - w) <= 0.005 * Math.abs(w) + 1e-9);
		return %s; })()`, q(sel), strings.Join(conds, " && "))
}

// browserView is the part of GET /jobs/{job} the tests read.
type browserView struct {
	Results struct {
		Traverses []struct {
			Tag          string   `json:"tag"`
			Status       string   `json:"status"`
			PointsTotal  int      `json:"points_total"`
			Flow         *float64 `json:"flow"`
			MeanVelocity *float64 `json:"mean_velocity"`
			Points       []struct {
				Point int      `json:"point"`
				Label string   `json:"label"`
				Depth *float64 `json:"depth"`
			} `json:"points"`
		} `json:"traverses"`
		CapacityTests []struct {
			Tag      string `json:"tag"`
			Status   string `json:"status"`
			Capacity *struct {
				Total    float64 `json:"total"`
				Sensible float64 `json:"sensible"`
				Latent   float64 `json:"latent"`
				SHR      float64 `json:"shr"`
			} `json:"capacity"`
		} `json:"capacity_tests"`
	} `json:"results"`
}

// wantReading is a reading a test expects in the store.
type wantReading struct {
	subject, quantity, stage string
	point                    int
	value                    float64
}

// checkReadings fails unless the store holds exactly want for job (in any
// order), each once, every one by technician from the device and with unit.
func checkReadings(t *testing.T, got []schema.Reading, want []wantReading, technician, unit string) {
	t.Helper()
	key := func(w wantReading) string {
		return fmt.Sprintf("%s %s %s point %d = %g", w.subject, w.quantity, w.stage, w.point, w.value)
	}
	var gotKeys, wantKeys []string
	for _, r := range got {
		v := -1.0
		if r.Value != nil {
			v = *r.Value
		}
		gotKeys = append(gotKeys, key(wantReading{r.SubjectID, r.Quantity, r.Stage, r.Point, v}))
		if r.Technician != technician {
			t.Errorf("reading %s: technician %q, want the device's name %q", r.ID, r.Technician, technician)
		}
		if r.Unit != unit {
			t.Errorf("reading %s (%s): unit %q, want %q", r.ID, r.Quantity, r.Unit, unit)
		}
	}
	for _, w := range want {
		wantKeys = append(wantKeys, key(w))
	}
	sort.Strings(gotKeys)
	sort.Strings(wantKeys)
	if strings.Join(gotKeys, "\n") != strings.Join(wantKeys, "\n") {
		t.Errorf("the store holds %d readings:\n  %s\nwant %d:\n  %s", len(gotKeys), strings.Join(gotKeys, "\n  "),
			len(wantKeys), strings.Join(wantKeys, "\n  "))
	}
}

// TestBrowserJoin pairs a phone with a join code from the lead's API: a
// wrong code is refused with a message, the code of the join link is filled
// in, and the device lands on the job home, named as typed.
func TestBrowserJoin(t *testing.T) {
	app := startApp(t)
	makeBrowserJob(t, app.db, 3)
	var jc struct {
		Code string `json:"code"`
	}
	app.api("POST", "/join-codes", map[string]string{"role": "technician"}, &jc)
	p := newPage(t, app)

	p.navigate("/#/join")
	p.typeInto("[data-test=join-code]", "ZZZZ-ZZZZ")
	p.typeInto("[data-test=device-name]", "Phone Ada")
	p.click("[data-test=join-submit]")
	p.wait("a join error for a wrong code", q("[data-test=join-error]")+" && "+q("[data-test=join-error]")+".textContent.trim() !== ''")

	// The join link's own host is a LAN address (never this loopback test
	// server's), so open its path here.
	want := strings.ReplaceAll(jc.Code, "-", "")
	p.navigate("/#join=" + want)
	p.wait("the join link's code in the code field", joinCodeIs(want))
	p.typeInto("[data-test=device-name]", "Phone Ada")
	p.screenshots("join", "")
	p.click("[data-test=join-submit]")
	p.waitSel("[data-test=job-home]")
	p.waitSel(tagSel("system", "AHU-1"))
	p.wait("the instrument's calibration status", q(tagSel("instrument-status", "Hood 1")+"[data-status=current]"))

	ds, err := app.db.Devices(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	found := false
	for _, d := range ds {
		names = append(names, d.Name+" ("+d.Role+")")
		found = found || (d.Name == "Phone Ada" && d.Role == schema.RoleTechnician && d.RevokedAt == nil)
	}
	if !found {
		t.Errorf("the store's devices are %q; want a technician named Phone Ada", names)
	}
	p.checkConsole(false) // the wrong code's 401 is logged by the network
}

// TestBrowserOutlets walks three outlets with as-found and final readings,
// one left out of tolerance on purpose, and checks the statuses shown, the
// list's filter and search, the job home's progress and the store.
func TestBrowserOutlets(t *testing.T) {
	app := startApp(t)
	job := makeBrowserJob(t, app.db, 3)
	p := newPage(t, app)
	p.join("Phone Ada")
	p.openOutlet("S-101")
	p.choose("[data-test=instrument]", job.instrument)
	if got := p.text("[data-test=outlet-tag]"); strings.TrimSpace(got) != "S-101" {
		t.Errorf("outlet-tag shows %q, want S-101", got)
	}
	if im := p.attr("[data-test=reading-value]", "inputmode"); im != "decimal" {
		t.Errorf("reading-value has inputmode %q, want decimal", im)
	}

	steps := []struct {
		outlet int
		stage  string
		value  float64
		status string    // the outlet's status after this reading
		shows  []float64 // the figures its result shows then
	}{
		{0, "as_found", 380, "within", []float64{380}},
		{0, "final", 405, "within", []float64{380, 405}}, // a final after an as found shows both
		{1, "as_found", 300, "low", []float64{300}},
		{1, "final", 395, "within", []float64{300, 395}},
		{2, "as_found", 520, "high", []float64{520}}, // left out of tolerance
	}
	cur := 0
	var want []wantReading
	for _, s := range steps {
		tag := job.outlets[s.outlet].Tag
		if s.outlet != cur {
			p.click("[data-test=next-outlet]")
			p.waitSel(tagSel("outlet-screen", tag))
			cur = s.outlet
			if got := p.eval("(" + q("[data-test=instrument]") + " || {}).value"); got != job.instrument {
				t.Errorf("on %s the instrument is %q; want the last one used, %q (Hood 1)", tag, got, job.instrument)
			}
		}
		p.enter(s.stage, strconv.FormatFloat(s.value, 'f', -1, 64))
		res := "[data-test=outlet-result]"
		p.wait(fmt.Sprintf("%s of %s to be %s showing %v", res, tag, s.status, s.shows),
			q(res+"[data-status="+s.status+"]")+" && "+resultShows(res, s.shows...))
		want = append(want, wantReading{job.outlets[s.outlet].ID, "flow", s.stage, 0, s.value})
		if s.outlet == 1 && s.stage == "final" {
			p.screenshots("outlet", res)
		}
	}
	p.waitSync("data-waiting", "0", syncTimeout)

	p.goHash("#/job/" + job.job + "/system/" + job.system)
	p.choose("[data-test=outlet-filter]", "out")
	p.wait("only S-103 listed as out of tolerance",
		"document.querySelectorAll('[data-test=outlet-item]').length === 1 && "+q(tagSel("outlet-item", "S-103")+"[data-status=high]"))
	p.choose("[data-test=outlet-filter]", "all")
	p.wait("all three outlets listed", "document.querySelectorAll('[data-test=outlet-item]').length === 3")
	p.typeInto("[data-test=outlet-search]", "S-102")
	p.wait("the search to keep S-102 alone",
		"document.querySelectorAll('[data-test=outlet-item]').length === 1 && "+q(tagSel("outlet-item", "S-102")+"[data-status=within]"))
	p.typeInto("[data-test=outlet-search]", "")
	p.wait("all three outlets listed again", "document.querySelectorAll('[data-test=outlet-item]').length === 3")
	p.screenshots("outlets", "")

	p.goHash("#/job/" + job.job)
	sys := tagSel("system", "AHU-1")
	p.wait("AHU-1's progress: 3 of 3 read, 1 out of tolerance",
		q(sys)+" && /(^|\\D)3\\s+of\\s+3(\\D|$)/.test("+q(sys)+".textContent) && /(^|\\D)1\\s+out of tolerance/.test("+q(sys)+".textContent)")
	p.screenshots("home", "")

	checkReadings(t, app.readings(job.job), want, "Phone Ada", schema.UnitCFM)
	for _, r := range app.readings(job.job) {
		if r.InstrumentID != job.instrument {
			t.Errorf("reading %s of %g: instrument %q, want Hood 1 (%s)", r.ID, *r.Value, r.InstrumentID, job.instrument)
		}
	}
	p.checkConsole(true)
}

// eval is the page's string value of expr.
func (p *page) eval(expr string) string {
	p.t.Helper()
	return eval[string](p, "String("+expr+")")
}

// TestBrowserTraverse walks every point of an 8-point round traverse: each
// prompt says where the probe goes, and the flow the server computes is
// shown at the end.
func TestBrowserTraverse(t *testing.T) {
	app := startApp(t)
	job := makeBrowserJob(t, app.db, 1)
	var before browserView
	app.api("GET", "/jobs/"+job.job, nil, &before)
	if len(before.Results.Traverses) != 1 || len(before.Results.Traverses[0].Points) != 8 {
		t.Fatalf("the fixture's traverse: %+v", before.Results.Traverses)
	}
	points := before.Results.Traverses[0].Points

	p := newPage(t, app)
	p.join("Phone Ben")
	p.click(tagSel("traverse-item", "T-1"))
	p.waitSel("[data-test=traverse-screen]")
	vps := []float64{0.08, 0.10, 0.11, 0.10, 0.09, 0.10, 0.12, 0.10}
	var want []wantReading
	for i, vp := range vps {
		n := i + 1
		sel := fmt.Sprintf("[data-test=traverse-point][data-point=%q]", strconv.Itoa(n))
		p.waitSel(sel)
		if d := points[i].Depth; d != nil {
			// A mark on a pitot tube: a tenth of an inch is close enough.
			prompt := p.text(sel)
			ok := false
			for _, v := range numbers(prompt) {
				ok = ok || math.Abs(v-*d) <= 0.1
			}
			if !ok {
				t.Errorf("point %d's prompt %q does not show its depth, %.2f in from the wall", n, prompt, *d)
			}
		}
		p.typeInto("[data-test=reading-value]", strconv.FormatFloat(vp, 'f', -1, 64))
		p.click("[data-test=reading-save]")
		want = append(want, wantReading{job.traverse, "vp", "as_found", n, vp})
	}
	app.waitReadings(job.job, len(vps))
	p.waitSync("data-waiting", "0", syncTimeout)
	var after browserView
	app.api("GET", "/jobs/"+job.job, nil, &after)
	tr := after.Results.Traverses[0]
	if tr.Status != "computed" || tr.Flow == nil {
		t.Fatalf("the server's traverse result after 8 points: status %q, flow %v", tr.Status, tr.Flow)
	}
	p.wait(fmt.Sprintf("traverse-result to show the flow, %.0f cfm", *tr.Flow), resultShows("[data-test=traverse-result]", *tr.Flow))
	p.waitSel("[data-test=traverse-grid]")
	p.screenshots("traverse", "[data-test=traverse-result]")
	checkReadings(t, app.readings(job.job), want, "Phone Ben", schema.UnitInWG)
	p.checkConsole(true)
}

// TestBrowserCapacity records a cooling capacity test on a direct airflow
// reading and checks the figures shown against the server's and the chart's
// two states.
func TestBrowserCapacity(t *testing.T) {
	app := startApp(t)
	job := makeBrowserJob(t, app.db, 1)
	p := newPage(t, app)
	p.join("Phone Cy")
	p.click(tagSel("capacity-item", "CT-1"))
	p.waitSel("[data-test=capacity-screen]")
	// Temperatures may be below zero on a winter test: each has a ± key.
	for _, qty := range []string{"enter_db", "leave_wb", "outdoor_db"} {
		if p.count("[data-test=sign-toggle][data-for=q-"+qty+"]") != 1 {
			t.Errorf("no ± key for %s", qty)
		}
	}
	if p.count("[data-test=sign-toggle][data-for=q-flow]") != 0 {
		t.Error("a ± key on the airflow, which is never negative")
	}
	// What is still needed names only fields the form has.
	p.waitSel("[data-test=result-missing]")
	if txt := p.text("[data-test=result-missing]"); strings.Contains(txt, "dew point") || !strings.Contains(txt, "entering wet bulb or entering RH") {
		t.Errorf("still needed: %q; want wet bulb or RH, and no dew point the form cannot take", txt)
	}
	inputs := []struct {
		q    string
		v    float64
		unit string
	}{
		{"flow", 4000, schema.UnitCFM}, {"enter_db", 80, schema.UnitDegF}, {"enter_wb", 67, schema.UnitDegF},
		{"leave_db", 55, schema.UnitDegF}, {"leave_wb", 54, schema.UnitDegF}, {"outdoor_db", 95, schema.UnitDegF},
	}
	for _, in := range inputs {
		p.typeInto("[data-test=q-"+in.q+"]", strconv.FormatFloat(in.v, 'f', -1, 64))
	}
	p.click("[data-test=capacity-save]")
	app.waitReadings(job.job, len(inputs))
	p.waitSync("data-waiting", "0", syncTimeout)

	var view browserView
	app.api("GET", "/jobs/"+job.job, nil, &view)
	ct := view.Results.CapacityTests[0]
	if ct.Capacity == nil {
		t.Fatalf("the server computed no capacity: status %q", ct.Status)
	}
	c := ct.Capacity
	// Btu/h as the job's units say; thousands (MBH) would do as well.
	res := "[data-test=capacity-result]"
	p.wait(fmt.Sprintf("%s to show total %.0f, sensible %.0f and latent %.0f Btu/h and SHR %.2f", res, c.Total, c.Sensible, c.Latent, c.SHR),
		"("+resultShows(res, c.Total, c.Sensible, c.Latent)+" || "+resultShows(res, c.Total/1000, c.Sensible/1000, c.Latent/1000)+")")
	chart := "svg[data-test=psychro-chart]"
	p.wait("the chart with two states and the process line",
		q(chart)+" && "+q(chart)+".querySelectorAll('[data-test=chart-state]').length === 2 && "+q(chart+" [data-test=chart-process]"))
	// Dry bulb runs left to right and moisture upwards: the entering air (80 °F,
	// more moisture) is right of and above the leaving air.
	pos := eval[[][2]float64](p, "Array.from("+q(chart)+".querySelectorAll('[data-test=chart-state]'), c => { "+
		"const b = c.getBoundingClientRect(); return [b.x + b.width / 2, b.y + b.height / 2]; })")
	if len(pos) == 2 {
		right, left := pos[0], pos[1]
		if right[0] < left[0] {
			right, left = left, right
		}
		if right[0]-left[0] < 5 || right[1] >= left[1] {
			t.Errorf("chart states at %v and %v: want the entering air right of and above the leaving air", pos[0], pos[1])
		}
	}
	// Wet-bulb lines from the server's chart, and no text on the chart over
	// another (curve labels that would collide are left out).
	if n := eval[int](p, q(chart)+".querySelectorAll('.pc-wb').length"); n < 5 {
		t.Errorf("the chart has %d wet-bulb lines", n)
	}
	if clash := eval[[]string](p, "(() => { const ts = Array.from("+q(chart)+".querySelectorAll('text')), out = []; "+
		"const bs = ts.map((e) => e.getBoundingClientRect()); "+
		"for (let i = 0; i < bs.length; i++) for (let j = i + 1; j < bs.length; j++) { const a = bs[i], b = bs[j]; "+
		"if (Math.min(a.right, b.right) - Math.max(a.left, b.left) > 1 && Math.min(a.bottom, b.bottom) - Math.max(a.top, b.top) > 1) "+
		"out.push(ts[i].textContent + ' / ' + ts[j].textContent); } return out; })()"); len(clash) > 0 {
		t.Errorf("chart labels overlap: %q", clash)
	}
	p.screenshots("capacity", chart)

	var want []wantReading
	for _, in := range inputs {
		want = append(want, wantReading{job.capacity, in.q, "as_found", 0, in.v})
	}
	got := app.readings(job.job)
	var flows, temps []schema.Reading
	for _, r := range got {
		if r.Quantity == "flow" {
			flows = append(flows, r)
		} else {
			temps = append(temps, r)
		}
	}
	checkReadings(t, flows, want[:1], "Phone Cy", schema.UnitCFM)
	checkReadings(t, temps, want[1:], "Phone Cy", schema.UnitDegF)
	p.checkConsole(true)
}

// walkOutlets enters one as-found reading on each of outlets, from the
// outlet screen of the first, moving on with "next outlet"; after each it
// waits for the sync indicator to count waiting = base+i+1 (when waiting).
func (p *page) walkOutlets(outlets []schema.Outlet, values []float64, base int, waiting bool) []wantReading {
	p.t.Helper()
	var want []wantReading
	for i, o := range outlets {
		if i > 0 {
			p.click("[data-test=next-outlet]")
		}
		p.waitSel(tagSel("outlet-screen", o.Tag))
		p.enter("as_found", strconv.FormatFloat(values[i], 'f', -1, 64))
		if waiting {
			p.waitSync("data-waiting", strconv.Itoa(base+i+1), waitTimeout)
			p.waitSel("[data-test=outlet-result][data-status=waiting]")
		} else {
			p.wait("outlet-result with the server's status", q("[data-test=outlet-result][data-status=within]"))
		}
		want = append(want, wantReading{o.ID, "flow", "as_found", 0, values[i]})
	}
	return want
}

// checkExactlyOnce fails unless every reading the app posted is in the store
// once, and the store holds want and nothing else.
func checkExactlyOnce(t *testing.T, app *appServer, job string, want []wantReading, technician string) {
	t.Helper()
	got := app.readings(job)
	checkReadings(t, got, want, technician, schema.UnitCFM)
	stored := map[string]int{}
	for _, r := range got {
		stored[r.ID]++
	}
	posts := 0
	for id, n := range app.sentIDs() {
		posts += n
		if stored[id] != 1 {
			t.Errorf("reading %s was posted %d times and is in the store %d times, want once", id, n, stored[id])
		}
	}
	for id := range stored {
		if _, ok := app.sentIDs()[id]; !ok {
			t.Errorf("reading %s is in the store but was never posted", id)
		}
	}
	t.Logf("%d readings in the store, each once, after %d postings of them", len(got), posts)
}

// serviceWorkerReady waits up to the wait timeout for an active service
// worker and says whether there is one.
func (p *page) serviceWorkerReady() bool {
	p.t.Helper()
	return eval[bool](p, `(() => {
		if (!('serviceWorker' in navigator)) return false;
		return Promise.race([navigator.serviceWorker.ready.then(() => true), new Promise(r => setTimeout(() => r(false), 8000))]);
	})()`, awaitPromise)
}

// TestBrowserOfflineEmulated cuts the tab's network, enters 20 readings,
// reloads the page while still offline (from the service worker), comes back
// online, and proves each reading reached the store exactly once.
func TestBrowserOfflineEmulated(t *testing.T) {
	app := startApp(t)
	job := makeBrowserJob(t, app.db, 20)
	p := newPage(t, app)
	p.join("Phone Dee")
	sw := p.serviceWorkerReady()
	if !sw {
		t.Errorf("no active service worker 8 s after joining, on 127.0.0.1 (a secure context): the app cannot load offline")
	}
	p.openOutlet("S-101")
	p.choose("[data-test=instrument]", job.instrument)

	p.setOffline(true)
	p.waitSync("data-online", "false", waitTimeout)
	_, postsBefore := app.requests()
	values := make([]float64, 20)
	for i := range values {
		values[i] = float64(381 + i)
	}
	want := p.walkOutlets(job.outlets, values, 0, true)
	if n := len(app.readings(job.job)); n != 0 {
		t.Errorf("the store holds %d readings while the tab is offline, want none", n)
	}
	if _, posts := app.requests(); posts != postsBefore {
		t.Errorf("%d readings posts reached the server while the tab was offline", posts-postsBefore)
	}

	if sw {
		// Nothing reaches the server now (see setOffline): the page, its
		// modules and the job can only come from the service worker's cache
		// and IndexedDB.
		p.run("reload while offline", chromedp.Reload())
		p.waitSel(tagSel("outlet-screen", "S-120"))
		p.waitSync("data-waiting", "20", waitTimeout)
		p.screenshots("offline", "")
	}
	p.setOffline(false)
	if !sw {
		// Without a service worker the page cannot load offline; the outbox
		// must still have kept every entry through a reload.
		p.run("reload once online", chromedp.Reload())
	}
	p.waitSync("data-waiting", "0", syncTimeout)
	p.waitSync("data-online", "true", waitTimeout)
	checkExactlyOnce(t, app, job.job, want, "Phone Dee")
	p.checkConsole(false) // failed requests while offline are logged
}

// TestBrowserServerRestart enters two readings, stops the server, enters 20
// more, then starts a new server over the same store on the same port (a new
// boot ID, so the acknowledged-but-maybe-not-durable two are sent again) and
// proves every reading is in the store exactly once.
func TestBrowserServerRestart(t *testing.T) {
	app := startApp(t)
	job := makeBrowserJob(t, app.db, 22)
	p := newPage(t, app)
	p.join("Phone Eve")
	p.openOutlet("S-101")
	p.choose("[data-test=instrument]", job.instrument)
	values := make([]float64, 22)
	for i := range values {
		values[i] = float64(381 + i%20)
		if i >= 20 {
			values[i] += 0.5
		}
	}
	want := p.walkOutlets(job.outlets[:2], values[:2], 0, false)
	p.waitSync("data-waiting", "0", syncTimeout)

	app.stopHTTP()
	down := time.Now()
	p.click("[data-test=next-outlet]")
	want = append(want, p.walkOutlets(job.outlets[2:], values[2:], 0, true)...)
	t.Logf("20 readings entered in %.1f s with the server down", time.Since(down).Seconds())
	if n := len(app.readings(job.job)); n != 2 {
		t.Errorf("the store holds %d readings while the server is down, want the 2 sent before", n)
	}
	app.restart()
	back := time.Now()
	p.waitSync("data-waiting", "0", syncTimeout)
	t.Logf("the outbox drained %.1f s after the server came back", time.Since(back).Seconds())
	checkExactlyOnce(t, app, job.job, want, "Phone Eve")
	p.checkConsole(false) // refused connections are logged
}

// TestBrowserRejectedValue enters a flow no outlet can have (a slip of the
// thumb): the server refuses it, and the outbox shows it with the server's
// reason until it is discarded.
func TestBrowserRejectedValue(t *testing.T) {
	rejectedEntry(t, 0, "99999999", "is outside the accepted range for the outlet airflow")
}

// TestBrowserRejectedClock enters a good value from a phone whose clock is an
// hour ahead of the server's, so the reading looks taken in the future: no
// check in the app could foresee this refusal.
func TestBrowserRejectedClock(t *testing.T) {
	rejectedEntry(t, -time.Hour, "400", "more than 10 minutes after the server's time")
}

// rejectedEntry enters value on an outlet of a server whose clock is off by
// skew and expects it refused with a reason containing serverSays: counted
// as rejected, listed in the outbox with that reason, kept out of the store,
// and gone once discarded.
func rejectedEntry(t *testing.T, skew time.Duration, value, serverSays string) {
	app := startAppSkewed(t, skew)
	job := makeBrowserJob(t, app.db, 1)
	p := newPage(t, app)
	p.join("Phone Fay")
	p.openOutlet("S-101")
	p.enter("as_found", value)
	if v, _ := strconv.ParseFloat(value, 64); v > 3*job.outlets[0].DesignFlow {
		// Far from design: the app asks first, and the technician insists.
		p.click("[data-test=confirm-yes]")
	}
	p.waitSync("data-rejected", "1", syncTimeout)
	p.waitSync("data-waiting", "0", waitTimeout)

	p.goHash("#/job/" + job.job)
	p.click("[data-test=open-outbox]")
	entry := "[data-test=outbox-entry][data-state=rejected]"
	reason := entry + " [data-test=outbox-reason]"
	p.wait("the rejected entry with the server's reason ("+serverSays+")",
		q(reason)+" && "+q(reason)+".textContent.includes("+js(serverSays)+")")
	if skew == 0 {
		p.screenshots("outbox-rejected", entry)
	}
	if n := len(app.readings(job.job)); n != 0 {
		t.Errorf("the store holds %d readings, want none (the only one was rejected)", n)
	}
	p.click(entry + " [data-test=outbox-discard]")
	p.wait("the rejected entry to go", "!"+q(entry))
	p.waitSync("data-rejected", "0", waitTimeout)
	p.checkConsole(true)
}

// TestBrowserMarkupAsText gives outlets tags and rooms made of markup and
// quotes: the list and the outlet screen show them as text, and nothing in
// them runs or becomes an element.
func TestBrowserMarkupAsText(t *testing.T) {
	app := startApp(t)
	job := makeBrowserJob(t, app.db, 1)
	ctx := context.Background()
	a := schema.Actor{Name: "Lead", Role: schema.RoleLead}
	nasty := []schema.Outlet{
		{Tag: `<script>alert(1)</script>"'`, Room: `Room "7" & 'B' <b class=xss>bold</b>`},
		{Tag: `<img src=x onerror="window.__xss=1">`, Room: `<img src=x onerror="window.__xss=2">`},
	}
	for i := range nasty {
		o := &nasty[i]
		o.JobID, o.SystemID, o.Kind, o.DesignFlow, o.Method, o.Factor = job.job, job.system, "supply", 200, "hood", 1
		if err := schema.Create(ctx, app.db, a, o); err != nil {
			t.Fatalf("outlet %q: %v", o.Tag, err)
		}
	}
	p := newPage(t, app)
	dialogs := chromedp.Events(p.ctx, cdppage.JavascriptDialogOpening)
	opened := make(chan string, 10)
	go func() {
		for ev, err := range dialogs {
			if err != nil {
				return
			}
			opened <- ev.Message
			_, _ = chromedp.Call(p.ctx, cdppage.HandleJavaScriptDialog, cdppage.HandleJavaScriptDialogParams{Accept: true})
		}
	}()
	p.join("Phone Gus")
	p.click(tagSel("system", "AHU-1"))
	p.choose("[data-test=outlet-filter]", "all")
	p.wait("three outlets listed", "document.querySelectorAll('[data-test=outlet-item]').length === 3")
	for _, o := range nasty {
		item := "Array.from(document.querySelectorAll('[data-test=outlet-item]')).find(e => e.getAttribute('data-tag') === " + js(o.Tag) + ")"
		p.wait("an outlet-item whose data-tag is "+o.Tag, item)
		if !eval[bool](p, item+".textContent.includes("+js(o.Tag)+") && "+item+".textContent.includes("+js(o.Room)+")") {
			t.Errorf("the list item of %q shows %q: want its tag and room %q as text", o.Tag, p.eval(item+".textContent"), o.Room)
		}
	}
	checkInert := func(where string) {
		t.Helper()
		if n := p.count(`img[src="x"], #app script, .xss`); n != 0 {
			t.Errorf("%s: %d elements made from a tag or room's markup", where, n)
		}
		if v := p.eval("typeof window.__xss"); v != "undefined" {
			t.Errorf("%s: window.__xss is %s: markup in a tag ran", where, p.eval("window.__xss"))
		}
		select {
		case m := <-opened:
			t.Errorf("%s: a dialog opened (%q): markup in a tag ran", where, m)
		default:
		}
	}
	checkInert("outlet list")
	p.run("open the outlet tagged "+nasty[0].Tag, chromedp.Click(chromedp.JSPath(
		"Array.from(document.querySelectorAll('[data-test=outlet-item]')).find(e => e.getAttribute('data-tag') === "+js(nasty[0].Tag)+")")))
	p.wait("the outlet screen of "+nasty[0].Tag, "Array.from(document.querySelectorAll('[data-test=outlet-screen]')).some(e => e.getAttribute('data-tag') === "+js(nasty[0].Tag)+")")
	if got := p.text("[data-test=outlet-tag]"); got != nasty[0].Tag {
		t.Errorf("outlet-tag's textContent is %q, want exactly %q", got, nasty[0].Tag)
	}
	checkInert("outlet screen")
	p.checkConsole(true)
}

// TestBrowserOutletList1500 times the outlet list of a system with 1,500
// outlets, from the route change to the frame after the last item is in the
// page, in headless Chromium on this machine.
func TestBrowserOutletList1500(t *testing.T) {
	app := startApp(t)
	ctx := context.Background()
	a := schema.Actor{Name: "Lead", Role: schema.RoleLead}
	j := &schema.Job{Name: "Tower", Units: "ip"}
	if err := app.db.CreateJob(ctx, a, j); err != nil {
		t.Fatal(err)
	}
	sys := &schema.System{JobID: j.ID, Tag: "AHU-1", Kind: "air_handler", Design: schema.SystemDesign{Airflow: 400_000}}
	if err := schema.Create(ctx, app.db, a, sys); err != nil {
		t.Fatal(err)
	}
	var csv strings.Builder
	csv.WriteString("tag,room,kind,design_flow,system\n")
	for i := range 1500 {
		fmt.Fprintf(&csv, "S-%d,Room %d,supply,400,AHU-1\n", i+1, 100+i/4)
	}
	rep, err := app.db.ImportOutletSchedule(ctx, a, j.ID, strings.NewReader(csv.String()), false)
	if err != nil || rep.Created != 1500 {
		t.Fatalf("import 1,500 outlets: %+v, %v", rep, err)
	}
	p := newPage(t, app)
	p.join("Phone Hal")
	ms := evalWithin[float64](p, 40*time.Second, `(async () => {
		const t0 = performance.now();
		location.hash = `+js("#/job/"+j.ID+"/system/"+sys.ID)+`;
		const frame = () => new Promise(r => requestAnimationFrame(r));
		while (document.querySelectorAll('[data-test=outlet-item]').length < 1500) {
			if (performance.now() - t0 > 30000) return -document.querySelectorAll('[data-test=outlet-item]').length;
			await frame();
		}
		await frame();
		return performance.now() - t0;
	})()`, awaitPromise)
	if ms < 0 {
		p.fail("the outlet list shows %d of the 1,500 outlets after 30 s", int(-ms))
	}
	t.Logf("outlet list of a 1,500-outlet system rendered in %.0f ms (headless Chromium, this machine)", ms)
	p.checkConsole(true)
}
