package server

// Mistakes and their corrections in a real browser: traverse points entered
// fast, corrections and voids from the entry screens and from the history,
// values far from design confirmed before they are sent. Each is checked in
// the store afterwards. The harness is in browser_test.go.

import (
	"fmt"
	"strconv"
	"strings"
	"testing"
	"time"

	"fieldtab/schema"
)

// currentByPoint counts the readings that count (schema.CurrentReadings) of
// subject at each point.
func currentByPoint(rs []schema.Reading, subject string) map[int][]schema.Reading {
	m := map[int][]schema.Reading{}
	for _, r := range schema.CurrentReadings(rs) {
		if r.SubjectID == subject {
			m[r.Point] = append(m[r.Point], r)
		}
	}
	return m
}

// TestBrowserTraverseFastEntry enters the eight points of a traverse 0.2 s
// apart, as a technician who knows the drill does, then goes back to point 2
// and enters it again while its first value may still wait in the outbox.
// The store must hold exactly one current reading per point, and the second
// value of point 2 must supersede the first, never sit beside it unmarked.
func TestBrowserTraverseFastEntry(t *testing.T) {
	app := startApp(t)
	job := makeBrowserJob(t, app.db, 1)
	p := newPage(t, app)
	p.join("Phone Ivy")
	p.click(tagSel("traverse-item", "T-1"))
	p.waitSel("[data-test=traverse-point][data-point=\"1\"]")
	vps := []float64{0.08, 0.10, 0.11, 0.10, 0.09, 0.10, 0.12, 0.10}
	for _, vp := range vps {
		p.typeInto("[data-test=reading-value]", strconv.FormatFloat(vp, 'f', -1, 64))
		p.click("[data-test=reading-save]")
		time.Sleep(200 * time.Millisecond)
	}
	// Point 2 again at once: a second value for a point already read.
	p.click("[data-test=point-button][data-point=\"2\"]")
	p.waitSel("[data-test=traverse-point][data-point=\"2\"]")
	p.typeInto("[data-test=reading-value]", "0.105")
	p.click("[data-test=reading-save]")
	app.waitAtLeast(job.job, len(vps)+1)
	p.waitSync("data-waiting", "0", syncTimeout)
	p.screenshots("traverse-points", "[data-test=point-buttons]")

	rs := app.readings(job.job)
	byID := map[string]schema.Reading{}
	for _, r := range rs {
		byID[r.ID] = r
	}
	cur := currentByPoint(rs, job.traverse)
	for n := 1; n <= len(vps); n++ {
		if len(cur[n]) != 1 {
			var vals []string
			for _, r := range cur[n] {
				vals = append(vals, strconv.FormatFloat(*r.Value, 'f', -1, 64))
			}
			t.Errorf("point %d has %d current readings %v in the store, want exactly one", n, len(cur[n]), vals)
		}
	}
	if c := cur[2]; len(c) == 1 {
		r := c[0]
		if *r.Value != 0.105 {
			t.Errorf("point 2's current reading is %g, want the second value 0.105", *r.Value)
		}
		first, ok := byID[r.Supersedes]
		if !ok || first.Point != 2 || *first.Value != 0.10 {
			t.Errorf("point 2's second value supersedes %q (%+v), want the first value of point 2 (0.10)", r.Supersedes, first)
		}
	}
	if len(rs) != len(vps)+1 {
		t.Errorf("the store holds %d readings, want %d: one per point and the correction", len(rs), len(vps)+1)
	}
	// Every reading of a point beyond the first is linked by supersedes.
	per := map[int]int{}
	for _, r := range rs {
		per[r.Point]++
		if per[r.Point] > 1 && r.Supersedes == "" {
			t.Errorf("reading %s (point %d, %g) is a second value of its point with no supersedes", r.ID, r.Point, *r.Value)
		}
	}

	// A negative static pressure typed with the ± key (a phone's decimal pad
	// may have no minus sign).
	p.typeInto("[data-test=q-static]", "0.45")
	p.click("[data-test=sign-toggle][data-for=q-static]")
	p.click("[data-test=plane-save]")
	app.waitAtLeast(job.job, len(vps)+2)
	found := false
	for _, r := range app.readings(job.job) {
		if r.Quantity == "static" {
			found = true
			if *r.Value != -0.45 {
				t.Errorf("the static pressure typed as 0.45 then ± is stored as %g, want -0.45", *r.Value)
			}
		}
	}
	if !found {
		t.Errorf("no static pressure in the store after saving the plane readings")
	}
	p.checkConsole(true)
}

// waitAtLeast waits up to the sync timeout for the store to hold n or more
// readings of job; past that, the test goes on to say what it holds.
func (a *appServer) waitAtLeast(job string, n int) {
	a.t.Helper()
	for deadline := time.Now().Add(syncTimeout); len(a.readings(job)) < n && time.Now().Before(deadline); {
		time.Sleep(100 * time.Millisecond)
	}
}

// readingByValue is the reading of subject and quantity whose value is v.
func readingByValue(rs []schema.Reading, subject, quantity string, v float64) (schema.Reading, bool) {
	for _, r := range rs {
		if r.SubjectID == subject && r.Quantity == quantity && r.Value != nil && *r.Value == v {
			return r, true
		}
	}
	return schema.Reading{}, false
}

// inViewport is a JavaScript test that sel is wholly on screen.
func inViewport(sel string) string {
	return "(() => { const el = " + q(sel) + "; if (!el) return false; const b = el.getBoundingClientRect(); " +
		"return b.top >= 0 && b.bottom <= innerHeight && b.height > 0; })()"
}

// TestBrowserOutletCorrections is the technician who typed 10,000 for a
// 400 cfm outlet: the app asks before sending it, the value sent anyway is
// marked confirmed with its remark, the result is on screen at phone size,
// and the mistake is corrected from the outlet screen (two taps and the
// typing) and again from the history; a final reading is voided with a
// reason. The store keeps every value, linked by supersedes, and the results
// use the last correction.
func TestBrowserOutletCorrections(t *testing.T) {
	app := startApp(t)
	job := makeBrowserJob(t, app.db, 2)
	o := job.outlets[0]
	p := newPage(t, app)
	p.join("Phone Jo")
	p.openOutlet(o.Tag)

	// Far from design: asked, and "Change it" sends nothing.
	p.choose("[data-test=stage]", "as_found")
	p.typeInto("[data-test=reading-value]", "10000")
	p.click("[data-test=reading-save]")
	p.waitSel("[data-test=confirm-far]")
	if txt := p.text("[data-test=confirm-far]"); !containsAll(txt, "10,000", "3 times", "400") {
		t.Errorf("the confirmation says %q; want the value, the rule and the design", txt)
	}
	p.click("[data-test=confirm-no]")
	time.Sleep(500 * time.Millisecond)
	if n := len(app.readings(job.job)); n != 0 {
		t.Fatalf("the store holds %d readings after Change it, want none", n)
	}
	// Sent anyway, with a remark: stored with confirmed set.
	p.typeInto("[data-test=reading-value]", "10000")
	p.typeInto("[data-test=reading-note]", "hood skirt torn")
	p.click("[data-test=reading-save]")
	p.click("[data-test=confirm-yes]")
	app.waitAtLeast(job.job, 1)
	first, ok := readingByValue(app.readings(job.job), o.ID, "flow", 10000)
	if !ok || !first.Confirmed || first.Note != "hood skirt torn" {
		t.Fatalf("the far-off value in the store: %+v (found %v); want confirmed with the remark", first, ok)
	}
	// Its result (flow, % of design, status) is on screen at 390 × 844.
	latest := "[data-test=outlet-latest][data-status=high]"
	p.waitSel(latest)
	p.wait("the saved value's result within the phone's screen", inViewport(latest))
	if !containsAll(p.text(latest), "10,000", "%") {
		t.Errorf("the result under Save shows %q; want the flow and the %% of design", p.text(latest))
	}
	p.screenshots("outlet-confirmed", "")

	// Corrected from the screen: Correct (tap), type, Save correction (tap).
	p.click("[data-test=outlet-stage][data-stage=as_found] [data-test=correct]")
	p.typeInto("[data-test=fix-value]", "243")
	p.click("[data-test=fix-save]")
	app.waitAtLeast(job.job, 2)
	second, ok := readingByValue(app.readings(job.job), o.ID, "flow", 243)
	if !ok || second.Supersedes != first.ID || second.Stage != "as_found" {
		t.Fatalf("the correction in the store: %+v (found %v); want 243 cfm superseding %s", second, ok, first.ID)
	}
	p.wait("the as-found result to show the correction", resultShows("[data-test=outlet-stage][data-stage=as_found]", 243))

	// A final reading, then voided from the history with a reason.
	p.choose("[data-test=stage]", "final")
	p.typeInto("[data-test=reading-value]", "395")
	p.click("[data-test=reading-save]")
	app.waitAtLeast(job.job, 3)
	final, _ := readingByValue(app.readings(job.job), o.ID, "flow", 395)
	p.wait("the final result", q("[data-test=outlet-stage][data-stage=final][data-status=within]"))
	p.click("[data-test=history] > summary")
	item := fmt.Sprintf("[data-test=history-item][data-id=%q]", final.ID)
	p.click(item + " [data-test=void]")
	p.typeInto("[data-test=fix-note]", "read with the damper still moving")
	p.click("[data-test=fix-save]")
	app.waitAtLeast(job.job, 4)
	// The line under Save no longer waits for the voided reading's result.
	p.wait("no wait for a voided reading's result", "!document.querySelector('[data-test=outlet-latest][data-status=waiting]')")
	// And the as-found correction corrected again from the history.
	p.click(fmt.Sprintf("[data-test=history-item][data-id=%q] [data-test=correct]", second.ID))
	p.typeInto("[data-test=fix-value]", "250")
	p.click("[data-test=fix-save]")
	app.waitAtLeast(job.job, 5)
	p.waitSync("data-waiting", "0", syncTimeout)

	rs := app.readings(job.job)
	var void schema.Reading
	for _, r := range rs {
		if r.Void {
			void = r
		}
	}
	if void.Supersedes != final.ID || void.Note != "read with the damper still moving" || void.Value != nil {
		t.Errorf("the void in the store: %+v; want no value, superseding the final %s, with the reason", void, final.ID)
	}
	third, ok := readingByValue(rs, o.ID, "flow", 250)
	if !ok || third.Supersedes != second.ID {
		t.Errorf("the second correction: %+v (found %v); want 250 superseding the 243 (%s)", third, ok, second.ID)
	}
	if len(rs) != 5 {
		t.Errorf("the store holds %d readings, want 5: nothing is overwritten", len(rs))
	}
	var view struct {
		Results struct {
			Outlets []struct {
				Tag     string `json:"tag"`
				Status  string `json:"status"`
				AsFound *struct {
					Reading   float64 `json:"reading"`
					ReadingID string  `json:"reading_id"`
				} `json:"as_found"`
				Final *struct{} `json:"final"`
			} `json:"outlets"`
		} `json:"results"`
	}
	app.api("GET", "/jobs/"+job.job, nil, &view)
	for _, r := range view.Results.Outlets {
		if r.Tag != o.Tag {
			continue
		}
		if r.AsFound == nil || r.AsFound.Reading != 250 || r.AsFound.ReadingID != third.ID || r.Final != nil {
			t.Errorf("the server's result of %s: as found %+v, final %v; want as found 250 (the last correction) and no final (voided)", o.Tag, r.AsFound, r.Final)
		}
	}
	p.wait("the history to show the chain", fmt.Sprintf("document.querySelectorAll('[data-test=history-item]').length === 5 && %s",
		q(fmt.Sprintf("[data-test=history-item][data-id=%q][data-counts=true]", third.ID))))
	p.screenshots("outlet-history", "[data-test=history]")
	p.checkConsole(true)
}

// containsAll reports whether s contains every one of subs.
func containsAll(s string, subs ...string) bool {
	for _, x := range subs {
		if !strings.Contains(s, x) {
			return false
		}
	}
	return true
}

// TestBrowserFanSteps saves the fan screen's steps one at a time: volts and
// amps alone, then a negative return static typed with the ± key, each
// stored as typed, and the motor's results shown beside its step.
func TestBrowserFanSteps(t *testing.T) {
	app := startApp(t)
	job := makeBrowserJob(t, app.db, 1)
	p := newPage(t, app)
	p.join("Phone Kit")
	p.goHash("#/job/" + job.job + "/fan/" + job.system)
	p.waitSel("[data-test=step-electrical]")
	for leg, v := range []string{"460", "458", "462"} {
		p.typeInto(fmt.Sprintf("[data-test=q-volts-%d]", leg+1), v)
	}
	for leg, v := range []string{"10.2", "10.0", "10.4"} {
		p.typeInto(fmt.Sprintf("[data-test=q-amps-%d]", leg+1), v)
	}
	p.click("[data-test=electrical]")
	app.waitAtLeast(job.job, 6)
	p.wait("the current imbalance beside the volts and amps", q("[data-test=electrical-result] [data-test=fan-aimb]")+
		" && /\\d/.test("+q("[data-test=electrical-result] [data-test=fan-aimb]")+".textContent)")
	p.typeInto("[data-test=q-static_return]", "0.6")
	p.click("[data-test=sign-toggle][data-for=q-static_return]")
	p.click("[data-test=statics]")
	app.waitAtLeast(job.job, 7)
	p.waitSync("data-waiting", "0", syncTimeout)
	n := map[string]int{}
	for _, r := range app.readings(job.job) {
		n[r.Quantity]++
		if r.Quantity == "static_return" && *r.Value != -0.6 {
			t.Errorf("the return static typed 0.6 then ± is stored as %g, want -0.6", *r.Value)
		}
	}
	if n["volts"] != 3 || n["amps"] != 3 || n["static_return"] != 1 || len(n) != 3 {
		t.Errorf("the store holds %v; want 3 volts, 3 amps and 1 return static", n)
	}
	p.screenshots("fan", "[data-test=step-electrical]")
	p.checkConsole(true)
}
