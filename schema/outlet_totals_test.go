package schema

import (
	"math"
	"testing"
)

// The totals are plain sums of results' figures, checked by hand: an
// outlet read final counts its final flow, one read only as found its
// as-found flow, one not read only its design.
func TestOutletTotals(t *testing.T) {
	f := func(v float64) *OutletReading { return &OutletReading{Flow: &v} }
	outlets := []*OutletResult{
		{Kind: "exhaust", DesignFlow: 100, AsFound: f(90)},
		{Kind: "supply", DesignFlow: 500, AsFound: f(410), Final: f(505)},
		{Kind: "supply", DesignFlow: 400, AsFound: f(300)},
		{Kind: "supply", DesignFlow: 250},
		{Kind: "transfer", DesignFlow: 50, Final: f(55)},
	}
	got := OutletTotals(outlets)
	if len(got) != 3 || got[0].Kind != "supply" || got[1].Kind != "exhaust" || got[2].Kind != "transfer" {
		t.Fatalf("kinds %+v; want supply, exhaust, transfer", got)
	}
	s := got[0]
	// By hand: design 500+400+250 = 1150; as found 410+300 = 710 (2 read);
	// final 505 (1); measured 505+300 = 805 over design 900: 89.44 %.
	if s.Outlets != 3 || s.Design != 1150 || s.AsFound != 710 || s.AsFoundRead != 2 || s.Final != 505 || s.FinalRead != 1 ||
		s.Measured != 805 || s.Read != 2 || s.DesignRead != 900 || s.PercentOfDesign == nil ||
		math.Abs(*s.PercentOfDesign-805.0/9) > 1e-9 {
		t.Errorf("supply totals %+v", s)
	}
	if e := got[1]; e.Measured != 90 || e.PercentOfDesign == nil || *e.PercentOfDesign != 90 {
		t.Errorf("exhaust totals %+v", e)
	}
	if none := OutletTotals([]*OutletResult{{Kind: "return", DesignFlow: 300}}); len(none) != 1 || none[0].PercentOfDesign != nil || none[0].Read != 0 {
		t.Errorf("unread return: %+v", none)
	}
}
