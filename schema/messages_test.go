package schema

import (
	"regexp"
	"strings"
	"testing"

	"fieldtab/measure"
)

var (
	// msgQuoted strips what a message quotes: a value as the client sent it, or
	// the literal values it may send instead.
	msgQuoted = regexp.MustCompile(`"[^"]*"`)
	// msgJSONName is a snake_case or dotted JSON name in prose.
	msgJSONName = regexp.MustCompile(`[a-z]+_[a-z_]+|\b(design|tolerances)\.[a-z]`)
)

// TestMessagesInWords checks that validation messages, read after their
// field's label in the app, say things in words: the field stays the JSON
// name for clients, the prose never carries one.
func TestMessagesInWords(t *testing.T) {
	job, sys, tr := NewID(), NewID(), NewID()
	f := func(v float64) *float64 { return &v }
	cases := []struct {
		name, field, want string
		err               error
	}{
		{"AccuracyUnit", "accuracy_unit", "the ± value",
			(&Instrument{JobID: job, Tag: "Hood 1", Kind: "flow_hood", AccuracyAbs: 5}).Validate()},
		{"InstrumentKind", "kind", `"flow_hood"`, (&Instrument{JobID: job, Tag: "X", Kind: "hood"}).Validate()},
		{"TraverseOnDirect", "traverse_id", "comes from a traverse",
			(&CapacityTest{JobID: job, SystemID: sys, Tag: "CT", Mode: "cooling", FlowSource: "direct", FlowBasis: "standard", TraverseID: tr}).Validate()},
		{"WaterModeMissing", "mode", "cooling or heating",
			(&WaterTest{JobID: job, SystemID: sys, Tag: "W", FlowSource: "meter", Fluid: "water", DesignFlow: 10}).Validate(measure.IP)},
		{"OutletKindMissing", "kind", "supply, return, exhaust or outdoor air",
			(&Outlet{JobID: job, SystemID: sys, Tag: "S", DesignFlow: 100, Method: "hood", Factor: 1}).Validate(measure.IP)},
		{"FlowBasisMissing", "flow_basis", "standard air, entering air or leaving air",
			(&CapacityTest{JobID: job, SystemID: sys, Tag: "CT", Mode: "cooling", FlowSource: "direct"}).Validate()},
		{"RectLogLinear", "method", "round ducts only",
			(&Traverse{JobID: job, SystemID: sys, Tag: "T", Shape: "rect", Method: "log-linear", Width: 24, Height: 16, PointsW: 5, PointsH: 5}).Validate(measure.IP)},
		{"Airflow", "design.airflow", "500,000 cfm",
			(&System{JobID: job, Tag: "AHU-1", Kind: "air_handler", Design: SystemDesign{Airflow: 4e7}}).Validate(measure.IP)},
		{"Tolerance", "tolerances.outlet_low_pct", "0 to 100 %",
			(&Job{Name: "J", Units: "ip", Tolerances: Tolerances{OutletLowPct: 120}}).Validate()},
		{"Units", "units", "ip (inch-pound) or si", (&Job{Name: "J"}).Validate()},
		{"Barometric", "barometric", "psia", (&Job{Name: "J", Units: "ip", Barometric: f(200)}).Validate()},
		{"PerfTable", "design.perf_table_csv", "", (&System{JobID: job, Tag: "RTU-1", Kind: "rooftop_unit",
			Design: SystemDesign{PerfTableCSV: "enter_wb_F,total_btuh\n67,100\n"}}).Validate(measure.IP)},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if c.err == nil {
				t.Fatalf("accepted; want an error for %s", c.field)
			}
			code, field, msg := ErrorCode(c.err), ErrorField(c.err), ErrorMessage(c.err)
			if code != Invalid || field != c.field || !strings.Contains(msg, c.want) {
				t.Errorf("%s %s: %q; want invalid, field %s, a message containing %q", code, field, msg, c.field, c.want)
			}
			if m := msgJSONName.FindString(msgQuoted.ReplaceAllString(msg, "")); m != "" {
				t.Errorf("message %q names %q: say it in words", msg, m)
			}
			if strings.HasPrefix(strings.ToLower(msg), "performance table") {
				t.Errorf("message %q repeats the field's label", msg)
			}
		})
	}
}
