package server

import (
	"context"
	"regexp"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"

	"fieldtab/schema"
)

// setupSel selects the setup form's control for the JSON field k.
func setupSel(k string) string { return "[data-test=" + js("f-"+k) + "]" }

// fillForm types each value into its field of the setup form; keys ending in
// "=" are choices (selects) or dates, set as a pick would set them.
func (p *page) fillForm(kv ...string) {
	p.t.Helper()
	for i := 0; i+1 < len(kv); i += 2 {
		k, v := kv[i], kv[i+1]
		if strings.HasSuffix(k, "=") {
			k = strings.TrimSuffix(k, "=")
			if p.attr(setupSel(k), "type") == "date" {
				p.run("set "+k, chromedp.Evaluate[chromedp.Void]("(() => { const el = "+q(setupSel(k))+"; el.value = "+js(v)+
					"; el.dispatchEvent(new Event('input', {bubbles: true})); el.dispatchEvent(new Event('change', {bubbles: true})); })()"))
				continue
			}
			p.choose(setupSel(k), v)
			continue
		}
		p.typeInto(setupSel(k), v)
	}
}

// saveSetupForm presses the form's save button and waits for the setup screen.
func (p *page) saveSetupForm() {
	p.t.Helper()
	p.click("[data-test=edit-save]")
	p.waitSel("[data-test=setup-screen]")
}

// setupFieldError waits for the error beside field k and returns its text.
func (p *page) setupFieldError(k string) string {
	p.t.Helper()
	sel := "[data-field=" + js(k) + "] [data-test=field-error]"
	p.waitSel(sel)
	return p.text(sel)
}

// setupInternalName matches what a technician must never read: a snake_case or
// dotted JSON name.
var setupInternalName = regexp.MustCompile(`[a-z]+_[a-z_]+|design\.|tolerances\.`)

// TestBrowserSetupJob starts from an empty store: a lead pairs with a join
// code, creates the job in the app, then a system with its nameplate, an
// instrument, an outlet, a traverse, a capacity test and a water test, all
// through the forms; bad values are answered beside their field in words.
func TestBrowserSetupJob(t *testing.T) {
	app := startApp(t)
	ctx := context.Background()
	code, _, err := app.srv.NewJoinCode(schema.RoleLead)
	if err != nil {
		t.Fatal(err)
	}
	code = strings.ReplaceAll(code, "-", "")
	// A technician on an empty store is told who starts the job.
	tcode, _, err := app.srv.NewJoinCode(schema.RoleTechnician)
	if err != nil {
		t.Fatal(err)
	}
	tech := newPage(t, app)
	tech.navigate("/#join=" + strings.ReplaceAll(tcode, "-", ""))
	tech.typeInto("[data-test=device-name]", "Phone Ada")
	tech.click("[data-test=join-submit]")
	tech.wait("the technician told to ask the lead", q("[data-test=jobs]")+" && "+q("[data-test=jobs]")+".textContent.includes('Ask your lead')")
	if tech.count("[data-test=new-job], [data-test=edit-screen]") != 0 {
		t.Error("a technician is offered the new-job form")
	}

	p := newPage(t, app)
	p.navigate("/#join=" + code)
	p.wait("the join link's code in the code field", joinCodeIs(code))
	p.typeInto("[data-test=device-name]", "Lead tablet")
	p.click("[data-test=join-submit]")

	// An empty store: the lead sees the new-job form at once.
	p.waitSel("[data-test=edit-screen][data-kind=job]")
	p.wait("the default tolerances shown", q(setupSel("tolerances.fan_low_pct"))+".value === '5'")
	p.fillForm("name", "Harbour Clinic", "project_number", "HC-2291", "site_address", "4 Quay Lane", "tab_firm", "Level Air Balancing",
		"_air=", "barometric")
	p.wait("the pressure in psia for an IP job", q("[data-field=barometric] label")+".textContent.includes('psia')")
	p.fillForm("units=", "si")
	p.wait("the pressure in kPa for an SI job", q("[data-field=barometric] label")+".textContent.includes('kPa')")
	p.fillForm("units=", "ip")
	p.fillForm("barometric", "200")
	p.click("[data-test=edit-save]")
	if msg := p.setupFieldError("barometric"); !strings.HasPrefix(msg, "Barometric pressure") || !strings.Contains(msg, "psia") || setupInternalName.MatchString(msg) {
		t.Errorf("the barometric pressure's error reads %q; want it after its label, with its unit, and no internal name", msg)
	}
	p.fillForm("barometric", "14.2")
	p.screenshots("setup-job", "[data-field=barometric]")
	p.saveSetupForm()
	jobs, err := app.db.Jobs(ctx)
	if err != nil || len(jobs) != 1 {
		t.Fatalf("jobs after the form: %v %v", jobs, err)
	}
	job := jobs[0]
	if job.Name != "Harbour Clinic" || job.ProjectNumber != "HC-2291" || job.Units != "ip" || job.Barometric == nil || *job.Barometric != 14.2 || job.Elevation != nil {
		t.Errorf("stored job %+v; want the form's name, project number, IP units and 14.2 psia with no elevation", job)
	}
	// The crew phone that joined before the job existed finds it without a reload.
	tech.waitFor("the crew phone to open the new job by itself", q("[data-test=job-home]"), 20*time.Second)
	if job.Tolerances != schema.DefaultTolerances() {
		t.Errorf("stored tolerances %+v; want the defaults %+v the form showed", job.Tolerances, schema.DefaultTolerances())
	}

	// A system with its nameplate and drive; a slipped digit first.
	p.click("[data-test=add-system]")
	p.fillForm("tag", "AHU-1", "kind=", "air_handler", "name", "Clinic air handler", "design.airflow", "40000000")
	p.click("[data-test=edit-save]")
	msg := p.setupFieldError("design.airflow")
	if !strings.HasPrefix(msg, "Design airflow") || !strings.Contains(msg, "cfm") || setupInternalName.MatchString(msg) {
		t.Errorf("the airflow's error reads %q; want it after the label Design airflow, in cfm, with no internal name", msg)
	}
	p.screenshots("setup-error", "[data-field='design.airflow']")
	p.fillForm("design.airflow", "4000", "design.outdoor_air", "800", "design.external_static", "1.2", "design.make", "Northwind Air Works",
		"design.model", "NW-AH40", "design.serial", "NW24-0193", "design.motor_hp", "5", "design.volts", "460", "design.phase=", "3",
		"design.fla", "6.8", "design.motor_rpm", "1755", "design.motor_frame", "184T", "design.service_factor", "1.15",
		"design.fan_rpm", "1120", "design.fan_sheave_size", "1B5V110", "design.fan_sheave_pitch", "11.0",
		"design.motor_sheave_size", "1VP71", "design.motor_sheave_pitch", "7", "design.belts", "1 × BX64", "design.filters", "8 × 24×24×2 MERV 13",
		"remarks", "Access panel on the north side")
	p.screenshots("setup-system", "")
	p.saveSetupForm()

	// An instrument, an outlet, a traverse, a capacity test and a water test.
	p.click("[data-test=add-instrument]")
	p.fillForm("tag", "Hood 1", "kind=", "flow_hood", "make", "Tallis Instruments", "calibrated_on=", "2026-06-01", "calibration_due=", "2027-06-01",
		"accuracy_pct", "3", "accuracy_abs", "5", "accuracy_unit", "cfm")
	p.saveSetupForm()
	p.click(tagSel("setup-system", "AHU-1") + " [data-test=add-outlet]")
	p.fillForm("tag", "S-101", "room", "Exam 1", "size", "24x24", "design_flow", "250")
	p.saveSetupForm()
	p.click(tagSel("setup-system", "AHU-1") + " [data-test=add-traverse]")
	p.fillForm("tag", "T-1", "location", "Main supply after the fan", "shape=", "round", "method=", "log-linear", "diameter", "16",
		"points_per_diameter", "7", "diameters", "2")
	p.click("[data-test=edit-save]")
	if msg := p.setupFieldError("points_per_diameter"); !strings.HasPrefix(msg, "Points per diameter") || setupInternalName.MatchString(msg) {
		t.Errorf("the traverse's error reads %q; want it after the label Points per diameter, with no internal name", msg)
	}
	p.fillForm("points_per_diameter", "6")
	p.saveSetupForm()
	p.click(tagSel("setup-system", "AHU-1") + " [data-test=add-capacity_test]")
	p.fillForm("tag", "CT-1", "mode=", "cooling", "flow_source=", "traverse")
	p.saveSetupForm()
	p.click(tagSel("setup-system", "AHU-1") + " [data-test=add-water_test]")
	p.fillForm("tag", "CHW coil AHU-1", "valve_cv", "6.3", "fluid=", "pg", "concentration", "30", "design_flow", "12")
	p.click("[data-test=edit-save]")
	if msg := p.setupFieldError("mode"); !strings.HasPrefix(msg, "Cooling or heating is required") {
		t.Errorf("a water test without its mode: %q; want the mode required, in words", msg)
	}
	p.fillForm("mode=", "cooling")
	p.saveSetupForm()
	p.screenshots("setup", "")

	snap, err := app.db.Snapshot(ctx, job.ID)
	if err != nil {
		t.Fatal(err)
	}
	if len(snap.Systems) != 1 || len(snap.Instruments) != 1 || len(snap.Outlets) != 1 || len(snap.Traverses) != 1 ||
		len(snap.CapacityTests) != 1 || len(snap.WaterTests) != 1 {
		t.Fatalf("stored %d systems, %d instruments, %d outlets, %d traverses, %d capacity and %d water tests; want one of each",
			len(snap.Systems), len(snap.Instruments), len(snap.Outlets), len(snap.Traverses), len(snap.CapacityTests), len(snap.WaterTests))
	}
	sys, d := snap.Systems[0], snap.Systems[0].Design
	if d.Airflow != 4000 || d.Make != "Northwind Air Works" || d.Phase != 3 || d.ServiceFactor != 1.15 || d.FanSheavePitch != 11 ||
		d.Belts != "1 × BX64" || sys.Remarks != "Access panel on the north side" {
		t.Errorf("stored system %+v; want the form's nameplate and drive", sys)
	}
	if i := snap.Instruments[0]; i.CalibratedOn != "2026-06-01" || i.AccuracyAbs != 5 || i.AccuracyUnit != "cfm" {
		t.Errorf("stored instrument %+v", i)
	}
	if o := snap.Outlets[0]; o.SystemID != sys.ID || o.DesignFlow != 250 || o.Method != "hood" || o.Factor != 1 {
		t.Errorf("stored outlet %+v; want the system preset, 250 cfm, hood with factor 1", o)
	}
	if tr := snap.Traverses[0]; tr.Shape != "round" || tr.Method != "log-linear" || tr.Diameter != 16 || tr.PointsPerDiameter != 6 || tr.Diameters != 2 {
		t.Errorf("stored traverse %+v", tr)
	}
	if ct := snap.CapacityTests[0]; ct.FlowSource != "traverse" || ct.TraverseID != snap.Traverses[0].ID || ct.Mode != "cooling" {
		t.Errorf("stored capacity test %+v; want its airflow from traverse T-1", ct)
	}
	if w := snap.WaterTests[0]; w.Mode != "cooling" || w.FlowSource != "valve" || w.ValveCv != 6.3 || w.Fluid != "pg" || w.Concentration != 30 || w.DesignFlow != 12 {
		t.Errorf("stored water test %+v", w)
	}

	// Edit, then delete with its confirming second tap.
	p.goHash("#/job/" + job.ID)
	p.waitSel("[data-test=open-setup]")
	p.screenshots("setup-home", "")
	p.click("[data-test=open-setup]")
	p.click(tagSel("edit-outlet", "S-101"))
	p.fillForm("design_flow", "275")
	p.saveSetupForm()
	p.click(tagSel("edit-outlet", "S-101"))
	p.click("[data-test=edit-delete]")
	p.wait("the delete asks to be confirmed", q("[data-test=edit-delete]")+".textContent.includes('again')")
	if n := len(setupSnapshot(t, app, job.ID).Outlets); n != 1 {
		t.Fatalf("one tap on Delete left %d outlets; want the outlet kept until confirmed", n)
	}
	p.click("[data-test=edit-delete]")
	p.waitSel("[data-test=setup-screen]")
	if n := len(setupSnapshot(t, app, job.ID).Outlets); n != 0 {
		t.Errorf("%d outlets after a confirmed delete; want 0", n)
	}

	// A system with tests is not deleted: the refusal says why, in words.
	p.click(tagSel("edit-system", "AHU-1"))
	p.click("[data-test=edit-delete]")
	p.wait("the delete asks to be confirmed", q("[data-test=edit-delete]")+".textContent.includes('again')")
	p.click("[data-test=edit-delete]")
	p.waitSel("[data-test=edit-error]")
	if msg := p.text("[data-test=edit-error]"); !strings.HasPrefix(msg, "System AHU-1 still has") || setupInternalName.MatchString(msg) {
		t.Errorf("deleting a system with tests: %q; want it refused in words", msg)
	}
	p.goHash("#/job/" + job.ID + "/setup")

	// The units are locked now that the job holds design data.
	p.click("[data-test=edit-job]")
	p.wait("the units locked", q(setupSel("units"))+".disabled && "+q("[data-field=units]")+".textContent.includes('Locked')")
	p.checkConsole(false) // the refused saves' 400s are logged by the network
}

func setupSnapshot(t *testing.T, app *appServer, job string) *schema.Snapshot {
	t.Helper()
	s, err := app.db.Snapshot(context.Background(), job)
	if err != nil {
		t.Fatal(err)
	}
	return s
}
