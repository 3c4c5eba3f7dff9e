package report

import (
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"fieldtab/schema"
)

// An SI job: capacities also in kW, an airflow at the entering density
// labelled as such (not standard air), the nameplate in kW and mm, and a
// chart with its 2 °C wet-bulb lines and no two words overlapping.
func TestRenderSIChartAndUnits(t *testing.T) {
	needTool(t, "pdftotext", "poppler-utils")
	p := newPlan(schema.Job{Name: "SI fixture hall", Units: "si", ProjectNumber: "SI-77"})
	p.instrumentsFor(fixtureNow)
	sys := p.system(schema.System{Tag: "AHU-S", Kind: "air_handler", Design: schema.SystemDesign{Airflow: 2000, RatedTotal: 40_000,
		MotorHP: 5.5, ServiceFactor: 1.15, FanSheavePitch: 315, FanSheaveSize: "SPA 315"}})
	ct := schema.CapacityTest{ID: schema.NewID(), JobID: p.job.ID, SystemID: sys.ID, Tag: "CT-S", Mode: "cooling",
		FlowSource: "direct", FlowBasis: "enter"}
	p.caps = append(p.caps, ct)
	at := fixtureNow.Add(-time.Hour)
	p.read(schema.SubjectCapacityTest, ct.ID, "flow", 0, 1900, schema.UnitLps, schema.StageFinal, "", at)
	for i, q := range []struct {
		q string
		v float64
	}{{"enter_db", 26.5}, {"enter_wb", 19}, {"leave_db", 13.2}, {"leave_wb", 12.4}, {"outdoor_db", 32}} {
		p.read(schema.SubjectCapacityTest, ct.ID, q.q, 0, q.v, schema.UnitDegC, schema.StageFinal, "Psychrometer 1", at.Add(time.Duration(i)*time.Minute))
	}
	in := inputFor(t, p.store(t, t.TempDir(), fixtureNow), fixtureNow)
	path, _ := render(t, in)
	raw := norm(pdfText(t, path, "raw"))
	c := in.Results.CapacityTests[0]
	if c.Capacity == nil {
		t.Fatalf("no capacity: %s %q %q", c.Status, c.Missing, c.Errors)
	}
	u := newUnits(in.Results.Units)
	for _, w := range []string{"1900.0 L/s at the density of the entering air", norm(u.capU(c.Capacity.Latent, true)),
		"Motor power 5.5 kW", "Fan sheave SPA 315, 315 mm pitch diameter", "Service factor 1.15",
		"dashed lines of constant wet bulb every 2 °C", "SI-77"} {
		if !strings.Contains(raw, norm(w)) {
			t.Errorf("the SI report lacks %q", w)
		}
	}
	if strings.Contains(raw, "scfm") || strings.Contains(raw, "MBH") {
		t.Error("the SI report uses IP labels")
	}
	// No two words overlap on the chart page.
	word := regexp.MustCompile(`<word xMin="([\d.]+)" yMin="([\d.]+)" xMax="([\d.]+)" yMax="([\d.]+)">([^<]*)</word>`)
	for pg := 1; pg <= pageCount(t, path); pg++ {
		if !strings.Contains(norm(pdfText(t, path, "raw", pg, pg)), "Psychrometric chart of") {
			continue
		}
		out := run(t, "pdftotext", "-bbox", "-f", strconv.Itoa(pg), "-l", strconv.Itoa(pg), path, "-")
		var bs [][5]string
		for _, m := range word.FindAllStringSubmatch(out, -1) {
			bs = append(bs, [5]string{m[1], m[2], m[3], m[4], m[5]})
		}
		f := func(s string) float64 { v, _ := strconv.ParseFloat(s, 64); return v }
		for i, a := range bs {
			for _, b := range bs[i+1:] {
				ox := min(f(a[2]), f(b[2])) - max(f(a[0]), f(b[0]))
				oy := min(f(a[3]), f(b[3])) - max(f(a[1]), f(b[1]))
				if ox > 0.3 && oy > 1.2 {
					t.Errorf("page %d: %q and %q overlap", pg, a[4], b[4])
				}
			}
		}
	}
}
