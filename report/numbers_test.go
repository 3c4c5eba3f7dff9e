package report

import (
	"strings"
	"testing"

	"fieldtab/schema"
)

// Capacities are restated in MBH and tons (IP) or kW (SI): a ton of
// refrigeration is 12,000 Btu/h by definition (ASHRAE Terminology). Tons
// are a cooling unit: a heating figure has none.
func TestCapacityUnits(t *testing.T) {
	ip, si := newUnits(schema.ResultUnits{System: "ip", Power: "Btu/h"}), newUnits(schema.ResultUnits{System: "si", Power: "W"})
	for _, c := range []struct {
		u       units
		v       float64
		cooling bool
		want    string
	}{
		{ip, 221_330, true, "221,330 Btu/h (221.3 MBH, 18.44 tons)"},
		{ip, 12_000, true, "12,000 Btu/h (12.0 MBH, 1.00 tons)"},
		{ip, 178_906, false, "178,906 Btu/h (178.9 MBH)"},
		{si, 64_860, true, "64 860 W (64.86 kW)"},
	} {
		if got := norm(c.u.capU(c.v, c.cooling)); got != c.want {
			t.Errorf("capU(%v, %v) = %q, want %q", c.v, c.cooling, got, c.want)
		}
	}
	// A capacity and its ± to the value's third significant figure.
	for _, c := range []struct {
		u       units
		v, unc  float64
		cooling bool
		want    string
	}{
		{ip, 221_330, 17_935, true, "221,000 ± 18,000 Btu/h (221 MBH, 18.4 tons)"},
		{ip, 84_263, 10_064, false, "84,300 ± 10,100 Btu/h (84.3 MBH)"},
		{si, 64_860, 3_210, true, "64 900 ± 3200 W (64.9 kW)"},
	} {
		if got := norm(c.u.capPM(c.v, c.unc, c.cooling)); got != c.want {
			t.Errorf("capPM(%v, %v) = %q, want %q", c.v, c.unc, got, c.want)
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
		want := "Airflow " + norm(u.air(*ct.Airflow)) + " scfm (standard air, 0.075 lb/ft³), from"
		if ct.FlowSource == "outlets" {
			// Outlets are read as is: the figure is not called standard air.
			want = "Airflow " + norm(u.airU(*ct.Airflow)) + ", the sum of the supply outlets as read (not corrected to " +
				"standard air), taken as standard air (0.075 lb/ft³) for the mass flow"
		}
		for _, w := range []string{want,
			norm(u.capPM(ct.Capacity.Total, ct.Uncertainty.Total, ct.Mode == "cooling")) + " (" + ct.Capacity.Process + ")"} {
			if !strings.Contains(raw, w) {
				t.Errorf("%s: the report lacks %q", ct.Tag, w)
			}
		}
	}
}
