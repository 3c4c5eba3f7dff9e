package report

import (
	"strings"
	"testing"
)

// Every record's remark and every counting reading's note is printed beside
// the record, the nameplate block shows what was read off the equipment and
// leaves out what was not (no "0" for a blank), and the outlet tables close
// with each system's totals by kind.
func TestRenderRemarksNameplateTotals(t *testing.T) {
	needTool(t, "pdftotext", "poppler-utils")
	p := demoPlan(t, fixtureNow)
	rtu := &p.systems[0]
	rtu.Remarks = "roof access by the north ladder only"
	d := &rtu.Design
	d.Make, d.Model, d.Serial = "Fixture Air (fictional)", "RT-100", "FX-0001"
	d.MotorMake, d.MotorFrame, d.ServiceFactor = "Fixture Motors (fictional)", "184T", 1.15
	d.FanSheaveSize, d.FanSheavePitch, d.MotorSheaveSize, d.MotorSheavePitch = "BK130", 12.4, "1VP56 adjustable", 5
	d.Belts, d.FanBushing, d.Filters = "1 × BX48", "H 1-3/16", "8 × 24×24×2 MERV 13"
	p.outlets[5].Remarks = "flex duct kinked above the ceiling"
	p.traverses[0].Remarks = "ports 4 ft downstream of an elbow"
	p.caps[0].Remarks = "economiser locked closed for the test"
	p.waters[0].Remarks = "valve handle marked at the set position"
	p.instruments[0].Remarks = "zeroed before each room"
	// A note on S-8's final reading, confirmed far from design.
	var s8 int
	for i, r := range p.readings {
		if r.SubjectID == p.outlets[7].ID && r.Stage == "final" {
			s8 = i
		}
	}
	p.readings[s8].Note = "no balancing damper found"
	p.readings[s8].Confirmed = true
	in := inputFor(t, p.store(t, t.TempDir(), fixtureNow), fixtureNow)
	path, _ := render(t, in)
	raw := norm(pdfText(t, path, "raw"))
	for _, w := range []string{
		"Remarks Level 2 ceiling closed before the final readings",
		"Remarks roof access by the north ladder only",
		"Make Fixture Air (fictional)", "Model RT-100", "Serial FX-0001", "Frame 184T", "Service factor 1.15",
		"Fan sheave BK130, 12.40 in pitch diameter", "Motor sheave 1VP56 adjustable, 5.00 in pitch diameter",
		"Belts 1 × BX48", "Fan bushing H 1-3/16", "Filters 8 × 24×24×2 MERV 13", "Motor power 3.0 hp", "Phase 3",
		"flex duct kinked above the ceiling",
		"final: no balancing damper found; final confirmed far from design",
		"Remarks ports 4 ft downstream of an elbow",
		"Remarks economiser locked closed for the test",
		"CHW coil AHU-1, remarks: valve handle marked at the set position",
		", remarks: zeroed before each room",
	} {
		if !strings.Contains(raw, w) {
			t.Errorf("the report lacks %q", w)
		}
	}
	// AHU-1 has no nameplate beyond its ratings: no blank printed as 0.
	ahu := raw[strings.Index(raw, "System AHU-1: Health centre Kind"):]
	ahu = ahu[:strings.Index(ahu, "Airflow")]
	for _, bad := range []string{"Make", "Serial", "Service factor", "Fan sheave", "Belts", " 0 "} {
		if strings.Contains(ahu, bad) {
			t.Errorf("AHU-1's nameplate block prints %q: %s", bad, ahu)
		}
	}
	// Totals: RTU-1's supply outlets read as the results give them.
	for _, w := range []string{"Total supply, 9 of 10 read 4,000", "Total return, 2 of 2 read 3,500", "Total exhaust, 3 of 3 read 700"} {
		if !strings.Contains(raw, w) {
			t.Errorf("the outlet tables lack the total %q", w)
		}
	}
}
