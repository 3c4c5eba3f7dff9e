package report

import (
	"strings"
	"testing"

	"fieldtab/schema"
)

// Capacities are restated in MBH and tons (IP) or kW (SI): a ton of
// refrigeration is 12,000 Btu/h by definition (ASHRAE Terminology).
func TestCapacityUnits(t *testing.T) {
	ip, si := newUnits(schema.ResultUnits{System: "ip", Power: "Btu/h"}), newUnits(schema.ResultUnits{System: "si", Power: "W"})
	for _, c := range []struct {
		u    units
		v    float64
		want string
	}{
		{ip, 221_330, "221,330 Btu/h (221.3 MBH, 18.44 tons)"},
		{ip, 12_000, "12,000 Btu/h (12.0 MBH, 1.00 tons)"},
		{si, 64_860, "64 860 W (64.86 kW)"},
	} {
		if got := norm(c.u.capU(c.v)); got != c.want {
			t.Errorf("capU(%v) = %q, want %q", c.v, got, c.want)
		}
	}
	if got := norm(ip.flowOnBasis(5707, "standard")); got != "5,707 scfm (standard air, 0.075 lb/ft³)" {
		t.Errorf("standard-air flow: %q", got)
	}
	if got := norm(si.flowOnBasis(2693.4, "enter")); !strings.Contains(got, "at the density of the entering air") || strings.Contains(got, "standard") {
		t.Errorf("actual flow: %q", got)
	}
}

// The demo report labels standard-air flows and gives capacities in MBH
// and tons beside Btu/h.
func TestRenderCapacityUnits(t *testing.T) {
	needTool(t, "pdftotext", "poppler-utils")
	in := demoInput(t)
	path, _ := render(t, in)
	raw := norm(pdfText(t, path, "raw"))
	u := newUnits(in.Results.Units)
	for _, ct := range in.Results.CapacityTests {
		if ct.FlowBasis != "standard" || ct.Airflow == nil || ct.Capacity == nil {
			t.Fatalf("fixture test %s: basis %q", ct.Tag, ct.FlowBasis)
		}
		for _, w := range []string{"Airflow " + norm(u.air(*ct.Airflow)) + " scfm (standard air, 0.075 lb/ft³), from",
			"(" + norm(u.capAlt(ct.Capacity.Total)) + ") (" + ct.Capacity.Process + ")"} {
			if !strings.Contains(raw, w) {
				t.Errorf("%s: the report lacks %q", ct.Tag, w)
			}
		}
	}
}
