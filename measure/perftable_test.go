package measure

import (
	"errors"
	"math"
	"os"
	"strings"
	"testing"
)

// perfTestRows is a hand-made 2×2×2 grid (EWB 62/72 °F × ODB 85/105 °F ×
// 3000/5000 cfm) with totals and sensibles in MBh chosen so averages are easy to
// check by hand.
func perfTestRows() []PerfRow {
	mbh := func(v float64) Power { return BtuPerHour(v * 1000) }
	var rows []PerfRow
	add := func(ewb, odb, cfm, tot, sen float64) {
		rows = append(rows, PerfRow{DegF(ewb), DegF(odb), CFM(cfm), mbh(tot), mbh(sen)})
	}
	add(62, 85, 3000, 100, 80)
	add(62, 85, 5000, 110, 92)
	add(62, 105, 3000, 90, 76)
	add(62, 105, 5000, 100, 88)
	add(72, 85, 3000, 120, 70)
	add(72, 85, 5000, 132, 82)
	add(72, 105, 3000, 108, 66)
	add(72, 105, 5000, 120, 78)
	return rows
}

func perfTestMBh(p Power) float64 { return p.BtuH() / 1000 }

func TestPerfTableGridPointsExact(t *testing.T) {
	rows := perfTestRows()
	tab, err := NewPerfTable(rows)
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range rows {
		tot, sen, err := tab.Expected(r.EnterWB, r.OutdoorDB, r.Flow)
		if err != nil {
			t.Fatal(err)
		}
		if tot != r.Total || sen != r.Sensible {
			t.Errorf("at %.0f °F, %.0f °F, %.0f cfm: got %v, %v W, want exactly %v, %v",
				r.EnterWB.F(), r.OutdoorDB.F(), r.Flow.CFM(), tot, sen, r.Total, r.Sensible)
		}
	}
}

func TestPerfTableMidpoints(t *testing.T) {
	tab, err := NewPerfTable(perfTestRows())
	if err != nil {
		t.Fatal(err)
	}
	// Hand-computed averages of the grid values in perfTestRows (MBh).
	tests := []struct {
		name          string
		ewb, odb, cfm float64
		tot, sen      float64
	}{
		{"MidFlow", 62, 85, 4000, (100 + 110) / 2.0, (80 + 92) / 2.0},     // 105, 86
		{"MidODB", 72, 95, 5000, (132 + 120) / 2.0, (82 + 78) / 2.0},      // 126, 80
		{"MidEWB", 67, 105, 3000, (90 + 108) / 2.0, (76 + 66) / 2.0},      // 99, 71
		{"QuarterFlow", 62, 85, 3500, 100 + 0.25*(110-100), 80 + 0.25*12}, // 102.5, 83
		{"Center", 67, 95, 4000, (100 + 110 + 90 + 100 + 120 + 132 + 108 + 120) / 8.0, // 110
			(80 + 92 + 76 + 88 + 70 + 82 + 66 + 78) / 8.0}, // 79
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			tot, sen, err := tab.Expected(DegF(tc.ewb), DegF(tc.odb), CFM(tc.cfm))
			if err != nil {
				t.Fatal(err)
			}
			balRel(t, "total MBh", perfTestMBh(tot), tc.tot, 1e-9)
			balRel(t, "sensible MBh", perfTestMBh(sen), tc.sen, 1e-9)
		})
	}
}

func TestPerfTableSensibleCappedAtTotal(t *testing.T) {
	// A dry-coil corner printed with sensible above total (62 °F, 85 °F, 5000 cfm:
	// 110 total, 118 sensible); at the point and next to it sensible is capped.
	rows := perfTestRows()
	rows[1].Sensible = BtuPerHour(118000)
	tab, err := NewPerfTable(rows)
	if err != nil {
		t.Fatal(err)
	}
	tot, sen, err := tab.Expected(DegF(62), DegF(85), CFM(5000))
	if err != nil {
		t.Fatal(err)
	}
	if sen != tot {
		t.Errorf("sensible = %g MBh, want total %g MBh", perfTestMBh(sen), perfTestMBh(tot))
	}
	// Midway along flow: total (100+110)/2 = 105, sensible (80+118)/2 = 99, not capped.
	tot, sen, err = tab.Expected(DegF(62), DegF(85), CFM(4000))
	if err != nil {
		t.Fatal(err)
	}
	balRel(t, "total MBh", perfTestMBh(tot), 105, 1e-9)
	balRel(t, "sensible MBh", perfTestMBh(sen), 99, 1e-9)
	// At 4900 cfm: total 100 + 0.95·10 = 109.5, sensible 80 + 0.95·38 = 116.1 → capped at 109.5.
	tot, sen, err = tab.Expected(DegF(62), DegF(85), CFM(4900))
	if err != nil {
		t.Fatal(err)
	}
	balRel(t, "total MBh", perfTestMBh(tot), 109.5, 1e-9)
	balRel(t, "sensible MBh", perfTestMBh(sen), 109.5, 1e-9)
}

func TestPerfTableRefusesOutside(t *testing.T) {
	ip, err := NewPerfTable(perfTestRows())
	if err != nil {
		t.Fatal(err)
	}
	si, err := NewPerfTableIn(SI, perfTestRows())
	if err != nil {
		t.Fatal(err)
	}
	// 62 °F = 16.6667 °C, 72 °F = 22.2222 °C; 3000 cfm = 1415.84 L/s, 5000 cfm = 2359.74 L/s.
	tests := []struct {
		name          string
		tab           *PerfTable
		ewb, odb, cfm float64
		input, unit   string
		min, max      float64
	}{
		{"ErrEWBBelow", ip, 61.9, 95, 4000, "ewb", "°F", 62, 72},
		{"ErrEWBAbove", ip, 75, 95, 4000, "ewb", "°F", 62, 72},
		{"ErrODBBelow", ip, 67, 80, 4000, "odb", "°F", 85, 105},
		{"ErrODBAbove", ip, 67, 115, 4000, "odb", "°F", 85, 105},
		{"ErrFlowBelow", ip, 67, 95, 2900, "flow", "cfm", 3000, 5000},
		{"ErrFlowAbove", ip, 67, 95, 5001, "flow", "cfm", 3000, 5000},
		{"ErrEWBNaN", ip, math.NaN(), 95, 4000, "ewb", "°F", 62, 72},
		{"ErrFlowInf", ip, 67, 95, math.Inf(1), "flow", "cfm", 3000, 5000},
		{"ErrSIEWBAbove", si, 75, 95, 4000, "ewb", "°C", 16.6666667, 22.2222222},
		{"ErrSIFlowAbove", si, 67, 95, 6000, "flow", "L/s", 1415.84232, 2359.73720},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, _, err := tc.tab.Expected(DegF(tc.ewb), DegF(tc.odb), CFM(tc.cfm))
			balInputErr(t, err, tc.input)
			var ie *InputError
			if !errors.As(err, &ie) {
				return
			}
			if ie.Unit != tc.unit {
				t.Errorf("Unit = %q, want %q", ie.Unit, tc.unit)
			}
			balRel(t, "Min", ie.Min, tc.min, 1e-8)
			balRel(t, "Max", ie.Max, tc.max, 1e-8)
			if !strings.Contains(err.Error(), "not extrapolated") {
				t.Errorf("message %q does not say the table is not extrapolated", err)
			}
		})
	}
	t.Run("EdgesWithinRoundingAccepted", func(t *testing.T) {
		// 72 °F given as 22.2222222222 °C differs from DegF(72) by ~1e-11 K.
		if _, _, err := ip.Expected(DegC(22.2222222222), DegF(85), CFM(3000)); err != nil {
			t.Error(err)
		}
	})
}

func TestPerfTableGridErrors(t *testing.T) {
	tests := []struct {
		name string
		rows func() []PerfRow
		want string
	}{
		{"ErrMissing", func() []PerfRow { r := perfTestRows(); return append(r[:5], r[6:]...) },
			"performance table: missing the row for ewb 72 °F, odb 85 °F, flow 5000 cfm"},
		{"ErrDuplicate", func() []PerfRow { r := perfTestRows(); return append(r, r[2]) },
			"row 9: duplicate of row 3: ewb 62 °F, odb 105 °F, flow 3000 cfm"},
		{"ErrDuplicateReplacingOne", func() []PerfRow { r := perfTestRows(); r[7] = r[0]; return r },
			"row 8: duplicate of row 1: ewb 62 °F, odb 85 °F, flow 3000 cfm"},
		{"ErrExtraValue", func() []PerfRow {
			r := perfTestRows()
			return append(r, PerfRow{DegF(67), DegF(85), CFM(3000), BtuPerHour(1e5), BtuPerHour(8e4)})
		}, "performance table: missing the row for ewb 67 °F, odb 85 °F, flow 5000 cfm"},
		{"ErrOneFlow", func() []PerfRow {
			var out []PerfRow
			for _, r := range perfTestRows() {
				if r.Flow == CFM(3000) {
					out = append(out, r)
				}
			}
			return out
		}, "performance table: only one flow value (3000 cfm); interpolation needs at least two"},
		{"ErrEmpty", func() []PerfRow { return nil }, "performance table: no rows"},
		{"ErrTotalNegative", func() []PerfRow { r := perfTestRows(); r[2].Total = BtuPerHour(-5); return r },
			"row 3: total = -5 Btu/h: must be a finite value above 0 Btu/h"},
		{"ErrEWBNaN", func() []PerfRow { r := perfTestRows(); r[0].EnterWB = Temperature(math.NaN()); return r },
			"row 1: ewb = NaN °F is outside the accepted range 14 to 122 °F"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			tab, err := NewPerfTable(tc.rows())
			if err == nil {
				t.Fatalf("got a table with ranges %+v, want error %q", tab.Ranges(), tc.want)
			}
			var pe *PerfTableError
			if !errors.As(err, &pe) {
				t.Errorf("error %T is not a *PerfTableError", err)
			}
			if err.Error() != tc.want {
				t.Errorf("error = %q\nwant    %q", err, tc.want)
			}
		})
	}
}

func TestPerfTableCSVExample(t *testing.T) {
	// testdata/perf_rtu_example.csv is invented demo data; the expected values are
	// read from its lines by hand.
	f, err := os.Open("../testdata/perf_rtu_example.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	tab, err := ParsePerfTableCSV(f)
	if err != nil {
		t.Fatal(err)
	}
	if tab.Units() != IP {
		t.Errorf("Units = %v, want ip", tab.Units())
	}
	rg := tab.Ranges()
	balRel(t, "EWB min", rg.EnterWBMin.F(), 57, 1e-12)
	balRel(t, "EWB max", rg.EnterWBMax.F(), 72, 1e-12)
	balRel(t, "ODB min", rg.OutdoorDBMin.F(), 85, 1e-12)
	balRel(t, "ODB max", rg.OutdoorDBMax.F(), 105, 1e-12)
	balRel(t, "flow min", rg.FlowMin.CFM(), 3200, 1e-12)
	balRel(t, "flow max", rg.FlowMax.CFM(), 4800, 1e-12)

	tests := []struct {
		name          string
		ewb, odb, cfm float64
		tot, sen      float64
	}{
		{"GridLine26", 67, 95, 4000, 120.0, 86.4},
		{"GridLine4Corner", 57, 85, 3200, 102.7, 95.0},
		{"GridLine39Corner", 72, 105, 4800, 124.7, 79.8},
		{"DryCoilLine6", 57, 85, 4800, 112.7, 112.7},
		// Lines 17 and 26: (113.5 + 120.0)/2, (95.9 + 86.4)/2.
		{"MidEWB", 64.5, 95, 4000, 116.75, 91.15},
		// Lines 9 and 12 (dry coil, sensible = total): (111.2 + 109.7)/2.
		{"MidODBDryCoil", 57, 100, 4800, 110.45, 110.45},
		// Lines 31 and 32: (126.7 + 132.5)/2, (69.7 + 78.2)/2.
		{"MidFlow", 72, 85, 3600, 129.6, 73.95},
		// Centre of the cell on lines 17, 18, 20, 21, 26, 27, 29, 30:
		// (113.5+117.7+110.5+114.7+120.0+124.2+115.5+119.7)/8 = 116.975,
		// (95.9+104.2+93.9+102.1+86.4+94.4+83.7+91.6)/8 = 94.025.
		{"CellCentre", 64.5, 100, 4400, 116.975, 94.025},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			tot, sen, err := tab.Expected(DegF(tc.ewb), DegF(tc.odb), CFM(tc.cfm))
			if err != nil {
				t.Fatal(err)
			}
			balRel(t, "total MBh", perfTestMBh(tot), tc.tot, 1e-9)
			balRel(t, "sensible MBh", perfTestMBh(sen), tc.sen, 1e-9)
		})
	}
	t.Run("ErrOutside", func(t *testing.T) {
		_, _, err := tab.Expected(DegF(67), DegF(95), CFM(5000))
		want := "flow = 5000 cfm: outside the table's range 3200 to 4800 cfm; the table is not extrapolated"
		if err == nil || err.Error() != want {
			t.Errorf("error = %v, want %q", err, want)
		}
	})
}

// perfCSV is a valid 2×2×2 table in CSV.
const perfCSV = `ewb_f,odb_f,flow_cfm,total_mbh,sensible_mbh
62,85,3000,100,80
62,85,5000,110,92
62,105,3000,90,76
62,105,5000,100,88
72,85,3000,120,70
72,85,5000,132,82
72,105,3000,108,66
72,105,5000,120,78
`

func TestPerfTableCSVFormats(t *testing.T) {
	t.Run("ReorderedCaseBOMExtraColumnComments", func(t *testing.T) {
		in := "\ufeff# invented\nSensible_MBH, Flow_CFM ,notes,ODB_F,EWB_F,Total_MBH\n" +
			"80,3000,a,85,62,100\n92,5000,b,85,62,110\n\n76,3000,,105,62,90\n88,5000,,105,62,100\n" +
			"# a comment between rows\n70,3000,,85,72,120\n82,5000,,85,72,132\n66,3000,,105,72,108\n78,5000,,105,72,120\n"
		// The BOM sits before '#', so line 1 is not a comment but a header; use it without the comment.
		in = strings.Replace(in, "\ufeff# invented\n", "\ufeff", 1)
		tab, err := ParsePerfTableCSV(strings.NewReader(in))
		if err != nil {
			t.Fatal(err)
		}
		tot, sen, err := tab.Expected(DegF(67), DegF(95), CFM(4000))
		if err != nil {
			t.Fatal(err)
		}
		balRel(t, "total MBh", perfTestMBh(tot), 110, 1e-9) // as TestPerfTableMidpoints/Center
		balRel(t, "sensible MBh", perfTestMBh(sen), 79, 1e-9)
	})
	t.Run("SIkW", func(t *testing.T) {
		// 17 and 22 °C EWB, 30 and 40 °C ODB, 1500 and 2300 L/s; hand average at the centre.
		in := "ewb_c,odb_c,flow_lps,total_kw,sensible_kw\n" +
			"17,30,1500,30,24\n17,30,2300,33,28\n17,40,1500,27,22\n17,40,2300,30,26\n" +
			"22,30,1500,36,21\n22,30,2300,40,25\n22,40,1500,33,20\n22,40,2300,36,24\n"
		tab, err := ParsePerfTableCSV(strings.NewReader(in))
		if err != nil {
			t.Fatal(err)
		}
		if tab.Units() != SI {
			t.Errorf("Units = %v, want si", tab.Units())
		}
		tot, sen, err := tab.Expected(DegC(19.5), DegC(35), LitersPerSecond(1900))
		if err != nil {
			t.Fatal(err)
		}
		balRel(t, "total kW", tot.KW(), (30+33+27+30+36+40+33+36)/8.0, 1e-9)
		balRel(t, "sensible kW", sen.KW(), (24+28+22+26+21+25+20+24)/8.0, 1e-9)
		_, _, err = tab.Expected(DegC(19.5), DegC(45), LitersPerSecond(1900))
		want := "odb = 45 °C: outside the table's range 30 to 40 °C; the table is not extrapolated"
		if err == nil || err.Error() != want {
			t.Errorf("error = %v, want %q", err, want)
		}
	})
	t.Run("OtherUnits", func(t *testing.T) {
		// Btu/h, tons and m³/h columns: 1 ton = 12 000 Btu/h.
		in := "ewb_f,odb_c,flow_m3h,total_tons,sensible_btuh\n" +
			"62,30,5000,8,80000\n62,30,8000,9,92000\n62,40,5000,7,76000\n62,40,8000,8,88000\n" +
			"72,30,5000,10,70000\n72,30,8000,11,82000\n72,40,5000,9,66000\n72,40,8000,10,78000\n"
		tab, err := ParsePerfTableCSV(strings.NewReader(in))
		if err != nil {
			t.Fatal(err)
		}
		tot, sen, err := tab.Expected(DegF(62), DegC(30), CubicMetersPerHour(6500))
		if err != nil {
			t.Fatal(err)
		}
		balRel(t, "total Btu/h", tot.BtuH(), 8.5*12000, 1e-9)
		balRel(t, "sensible Btu/h", sen.BtuH(), 86000, 1e-9)
	})
}

func TestPerfTableCSVErrors(t *testing.T) {
	header := "ewb_f,odb_f,flow_cfm,total_mbh,sensible_mbh\n"
	rows := strings.SplitAfter(strings.TrimPrefix(perfCSV, header), "\n")
	// withRow replaces data row n (0-based; file line n+2) by s.
	withRow := func(n int, s string) string {
		r := append([]string(nil), rows...)
		r[n] = s
		return header + strings.Join(r, "")
	}
	tests := []struct {
		name, in, want string
	}{
		{"ErrEmpty", "", "performance table: no header row"},
		{"ErrOnlyComments", "# nothing\n", "performance table: no header row"},
		{"ErrNoRows", header, "performance table: no rows"},
		{"ErrMissingColumn", strings.Replace(perfCSV, ",sensible_mbh", ",latent_mbh", 1),
			"line 1: no sensible column in the header; name it sensible_ with one of btuh, mbh, kw, w, tons"},
		{"ErrUnknownUnit", strings.Replace(perfCSV, "ewb_f", "ewb_k", 1),
			`line 1, column ewb_k: unknown unit "k" for ewb; use one of f, c`},
		{"ErrSecondColumn", strings.Replace(perfCSV, "flow_cfm,", "flow_cfm,flow_lps,", 1),
			"line 1, column flow_lps: a second flow column (the first is flow_cfm)"},
		{"ErrNotANumber", withRow(5, "72,85,5000,abc,82\n"), `line 7, column total_mbh: not a number: "abc"`},
		{"ErrEmptyCell", withRow(0, "62,85,3000,100, \n"), "line 2, column sensible_mbh: empty value"},
		{"ErrNegativeTotal", withRow(2, "62,105,3000,-5,76\n"),
			"line 4, column total_mbh: total = -5 MBh: must be a finite value above 0 MBh"},
		{"ErrNaNCell", withRow(3, "NaN,105,5000,100,88\n"),
			"line 5, column ewb_f: ewb = NaN °F is outside the accepted range 14 to 122 °F"},
		{"ErrHugeCell", withRow(3, "62,105,1e999,100,88\n"), `line 5, column flow_cfm: number out of range: "1e999"`},
		{"ErrODBOutOfRange", withRow(1, "62,185,5000,110,92\n"),
			"line 3, column odb_f: odb = 185 °F is outside the accepted range -40 to 140 °F"},
		{"ErrFieldCount", withRow(4, "72,85,3000,120\n"), "line 6: 4 fields, but the header has 5"},
		{"ErrBareQuote", withRow(6, "72,105,3\"000,108,66\n"), `line 8: bare " in non-quoted-field`},
		{"ErrDuplicateRow", withRow(7, "62,85,3000,101,81\n"),
			"line 9: duplicate of line 2: ewb 62 °F, odb 85 °F, flow 3000 cfm"},
		{"ErrMissingRow", header + strings.Join(rows[:7], ""),
			"performance table: missing the row for ewb 72 °F, odb 105 °F, flow 5000 cfm"},
		{"ErrLineCountsComments", "# demo\n# more\n" + withRow(1, "62,85,5000,110,x\n"),
			`line 5, column sensible_mbh: not a number: "x"`},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			tab, err := ParsePerfTableCSV(strings.NewReader(tc.in))
			if err == nil {
				t.Fatalf("got a table with ranges %+v, want error %q", tab.Ranges(), tc.want)
			}
			var pe *PerfTableError
			if !errors.As(err, &pe) {
				t.Errorf("error %T is not a *PerfTableError", err)
			}
			if err.Error() != tc.want {
				t.Errorf("error = %q\nwant    %q", err, tc.want)
			}
		})
	}
	t.Run("InputErrorReachable", func(t *testing.T) {
		_, err := ParsePerfTableCSV(strings.NewReader(withRow(2, "62,105,3000,-5,76\n")))
		balInputErr(t, err, "total")
	})
}

func FuzzParsePerfTableCSV(f *testing.F) {
	f.Add(perfCSV)
	if b, err := os.ReadFile("../testdata/perf_rtu_example.csv"); err == nil {
		f.Add(string(b))
	}
	f.Add("ewb_c,odb_c,flow_lps,total_kw,sensible_kw\n17,30,1500,30,24\n17,30,2300,33,28\n")
	f.Fuzz(func(t *testing.T, in string) {
		tab, err := ParsePerfTableCSV(strings.NewReader(in))
		if err != nil {
			return
		}
		rg := tab.Ranges()
		mid := func(a, b float64) float64 { return a/2 + b/2 }
		for _, p := range [][3]float64{
			{float64(rg.EnterWBMin), float64(rg.OutdoorDBMin), float64(rg.FlowMin)},
			{float64(rg.EnterWBMax), float64(rg.OutdoorDBMax), float64(rg.FlowMax)},
			{mid(float64(rg.EnterWBMin), float64(rg.EnterWBMax)), mid(float64(rg.OutdoorDBMin), float64(rg.OutdoorDBMax)),
				mid(float64(rg.FlowMin), float64(rg.FlowMax))},
		} {
			tot, sen, err := tab.Expected(Temperature(p[0]), Temperature(p[1]), VolumeFlow(p[2]))
			if err != nil {
				t.Fatalf("Expected inside the table's own range: %v", err)
			}
			if math.IsNaN(float64(tot)) || math.IsInf(float64(tot), 0) || math.IsNaN(float64(sen)) ||
				math.IsInf(float64(sen), 0) || sen > tot {
				t.Fatalf("bad result %v, %v", tot, sen)
			}
		}
	})
}

func BenchmarkPerfTableExpected(b *testing.B) {
	tab, err := NewPerfTable(perfTestRows())
	if err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		if _, _, err := tab.Expected(DegF(66.3), DegF(97.1), CFM(4123)); err != nil {
			b.Fatal(err)
		}
	}
}

func TestPerfTableZeroValue(t *testing.T) {
	// A table not built by the constructors errors instead of panicking.
	for _, tab := range []*PerfTable{nil, {}} {
		if _, _, err := tab.Expected(DegF(67), DegF(95), CFM(4000)); err == nil {
			t.Error("Expected on an unbuilt table: no error")
		}
		if tab.Ranges() != (PerfRanges{}) || tab.Units() != 0 {
			t.Error("Ranges or Units of an unbuilt table not zero")
		}
	}
}
