package schema

// OutletKindTotal sums one kind of outlet on a system: design flows, and the
// flows measured as found and final (job units, cfm or L/s).
type OutletKindTotal struct {
	Kind    string `json:"kind"` // see OutletKinds
	Outlets int    `json:"outlets"`
	// Design is the sum of every outlet's design flow, read or not.
	Design float64 `json:"design"`
	// AsFound and Final sum the computed flows of each stage, over the
	// AsFoundRead and FinalRead outlets that have one.
	AsFound     float64 `json:"as_found"`
	AsFoundRead int     `json:"as_found_read"`
	Final       float64 `json:"final"`
	FinalRead   int     `json:"final_read"`
	// Measured sums each read outlet's final flow, else its as-found one,
	// over Read outlets whose design flows sum to DesignRead; PercentOfDesign
	// is Measured ÷ DesignRead × 100, nil when none is read.
	Measured        float64  `json:"measured"`
	Read            int      `json:"read"`
	DesignRead      float64  `json:"design_read"`
	PercentOfDesign *float64 `json:"percent_of_design,omitempty"`
}

// OutletTotals sums outlets (results' OutletResults, of one system or any
// list) by kind, in OutletKinds order and then any other kind in the order
// met. It sums what results computed; it reads nothing again.
func OutletTotals(outlets []*OutletResult) []OutletKindTotal {
	order := append([]string(nil), OutletKinds...)
	by := map[string]*OutletKindTotal{}
	for _, o := range outlets {
		t := by[o.Kind]
		if t == nil {
			t = &OutletKindTotal{Kind: o.Kind}
			by[o.Kind] = t
			known := false
			for _, k := range OutletKinds {
				known = known || k == o.Kind
			}
			if !known {
				order = append(order, o.Kind)
			}
		}
		t.Outlets++
		t.Design += o.DesignFlow
		if o.AsFound != nil && o.AsFound.Flow != nil {
			t.AsFound += *o.AsFound.Flow
			t.AsFoundRead++
		}
		if o.Final != nil && o.Final.Flow != nil {
			t.Final += *o.Final.Flow
			t.FinalRead++
		}
		g := o.Final
		if g == nil || g.Flow == nil {
			g = o.AsFound
		}
		if g != nil && g.Flow != nil {
			t.Measured += *g.Flow
			t.Read++
			t.DesignRead += o.DesignFlow
		}
	}
	var out []OutletKindTotal
	for _, k := range order {
		t := by[k]
		if t == nil {
			continue
		}
		if t.DesignRead > 0 {
			t.PercentOfDesign = resPtr(t.Measured / t.DesignRead * 100)
		}
		out = append(out, *t)
	}
	return out
}
