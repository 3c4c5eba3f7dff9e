package measure

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

func psyMustState(tb testing.TB, u UnitSystem, p float64, s AirSpec) AirState {
	tb.Helper()
	st, err := s.State(u, p)
	if err != nil {
		tb.Fatalf("State(%+v): %v", s, err)
	}
	return st
}

func psyMustCoil(tb testing.TB, q VolumeFlow, b FlowBasis, e, l AirState) CoilResult {
	tb.Helper()
	r, err := CoilCapacity(q, b, e, l)
	if err != nil {
		tb.Fatalf("CoilCapacity: %v", err)
	}
	return r
}

// psyCapIn returns a power in the capacity unit of u: Btu/h (IP) or kW (SI).
func psyCapIn(u UnitSystem, q Power) float64 {
	if u == SI {
		return q.KW()
	}
	return q.BtuH()
}

// Capacity cases of the fixture: mass flow and Δh worked in gen.js from
// PsychroLib's humidity ratio, enthalpy and specific volume. Relative 1e-5 (the
// states themselves agree to that); latent within 1e-5 of the total.
func TestAirCoilCapacityMatchesPsychroLib(t *testing.T) {
	f := loadPsychroFixture(t)
	for _, c := range f.Capacities {
		name := fmt.Sprintf("%s_z%g_%g_%s_%g-%g_to_%g-%g", c.Units, c.Elevation, c.Flow, c.Basis,
			c.EnterDryBulb, c.EnterWetBulb, c.LeaveDryBulb, c.LeaveWetBulb)
		t.Run(name, func(t *testing.T) {
			u := psyMustUnits(t, c.Units)
			basis, err := ParseFlowBasis(c.Basis)
			if err != nil {
				t.Fatal(err)
			}
			e := psyMustState(t, u, c.Pressure, AirSpec{c.EnterDryBulb, WetBulb, c.EnterWetBulb})
			l := psyMustState(t, u, c.Pressure, AirSpec{c.LeaveDryBulb, WetBulb, c.LeaveWetBulb})
			r := psyMustCoil(t, AirFlowIn(u, c.Flow), basis, e, l)
			if r.Process != c.Process {
				t.Errorf("Process = %q, PsychroLib arithmetic %q", r.Process, c.Process)
			}
			if dh := e.Enthalpy - l.Enthalpy; !psyRelClose(dh, c.DeltaH, 1e-5) {
				t.Errorf("Δh = %.8g, PsychroLib %.8g", dh, c.DeltaH)
			}
			if got := r.MassFlow.In(u); !psyRelClose(got, c.MassFlow, 1e-5) {
				t.Errorf("mass flow = %.8g, PsychroLib arithmetic %.8g", got, c.MassFlow)
			}
			if got := psyCapIn(u, r.Total); !psyRelClose(got, c.Total, 1e-5) {
				t.Errorf("total = %.8g, PsychroLib arithmetic %.8g", got, c.Total)
			}
			if got := psyCapIn(u, r.Sensible); !psyRelClose(got, c.Sensible, 1e-5) {
				t.Errorf("sensible = %.8g, PsychroLib arithmetic %.8g", got, c.Sensible)
			}
			if got := psyCapIn(u, r.Latent); math.Abs(got-c.Latent) > 1e-5*c.Total {
				t.Errorf("latent = %.8g, PsychroLib arithmetic %.8g", got, c.Latent)
			}
			if want := c.Sensible / c.Total; math.Abs(r.SHR-want) > 1e-5 {
				t.Errorf("SHR = %.6f, want %.6f", r.SHR, want)
			}
		})
	}
}

// The trade's sensible shortcut (common practice): Q = 1.08 · cfm · ΔT Btu/h, where
// 1.08 = 0.075 lb/ft³ × 60 min/h × 0.24 Btu/(lb·°F); SI Q = 1.2 · L/s · ΔT W. On the
// standard-air basis the exact method differs only by the vapour's heat capacity,
// the factor (cp_a + cp_v W)/cp_a: 1 + 0.444·W/0.240 (IP), 1 + 1.86·W/1.006 (SI)
// on top of SI's 1.006 vs 1.0: so +1.5 % at W = 0.008 in IP, +2.1 % in SI. We
// expect agreement within 3 %, and the ratio to equal that factor to 1e-9.
func TestAirCoilCapacitySensibleShortcut(t *testing.T) {
	const w = 0.008
	for _, c := range []struct {
		name     string
		u        UnitSystem
		p        float64
		flow     float64 // cfm or L/s
		te, tl   float64
		shortcut float64 // Btu/h or kW
		factor   float64 // exact / shortcut
	}{
		{"IPHeating1000cfm", IP, 14.696, 1000, 55, 95, 1.08 * 1000 * 40, 1 + 0.444*w/0.240},
		{"IPCooling2000cfm", IP, 14.696, 2000, 75, 58, 1.08 * 2000 * 17, 1 + 0.444*w/0.240},
		{"SIHeating500Lps", SI, 101.325, 500, 13, 35, 1.2 * 500 * 22 / 1000, (1.006 + 1.86*w) / 1.0},
	} {
		t.Run(c.name, func(t *testing.T) {
			e := psyMustState(t, c.u, c.p, AirSpec{c.te, HumRatio, w})
			l := psyMustState(t, c.u, c.p, AirSpec{c.tl, HumRatio, w})
			r := psyMustCoil(t, AirFlowIn(c.u, c.flow), FlowStandard, e, l)
			got := psyCapIn(c.u, r.Sensible)
			if !psyRelClose(got, c.shortcut, 0.03) {
				t.Errorf("exact sensible %.6g vs shortcut %.6g: more than 3 %% apart", got, c.shortcut)
			}
			if !psyRelClose(got/c.shortcut, c.factor, 1e-9) {
				t.Errorf("exact/shortcut = %.9f, want the vapour factor %.9f", got/c.shortcut, c.factor)
			}
			if math.Abs(psyCapIn(c.u, r.Latent)) > 1e-9*got || math.Abs(r.SHR-1) > 1e-9 {
				t.Errorf("constant W: latent %g, SHR %g; want 0 and 1", psyCapIn(c.u, r.Latent), r.SHR)
			}
		})
	}
}

// The trade's total shortcut (common practice): Q = 4.5 · cfm · Δh Btu/h, 4.5 =
// 0.075 lb/ft³ × 60; SI Q = 1.2 · L/s · Δh W with Δh in kJ/kg. On the standard basis
// this is the exact method by definition (to rounding, 1e-9). With flow read at the
// entering state the exact method uses the real dry-air density 1/v: at 80 °F db /
// 67 °F wb, sea level, v ≈ 13.85 ft³/lb (ASHRAE chart region; from memory), so the
// shortcut overstates by about 4 %; we expect the exact figure 2–6 % below it.
func TestAirCoilCapacityTotalShortcut(t *testing.T) {
	for _, c := range []struct {
		name       string
		u          UnitSystem
		p, flow    float64
		enter      AirSpec
		leave      AirSpec
		shortcutBy float64 // shortcut factor: 4.5 Btu/h per cfm·Btu/lb, or 1.2e-3 kW per L/s·kJ/kg
	}{
		{"IP", IP, 14.696, 2000, AirSpec{80, WetBulb, 67}, AirSpec{55, WetBulb, 54}, 4.5},
		{"SI", SI, 101.325, 1000, AirSpec{27, WetBulb, 19.5}, AirSpec{13, WetBulb, 12.2}, 1.2e-3},
	} {
		t.Run(c.name, func(t *testing.T) {
			e := psyMustState(t, c.u, c.p, c.enter)
			l := psyMustState(t, c.u, c.p, c.leave)
			shortcut := c.shortcutBy * c.flow * (e.Enthalpy - l.Enthalpy)
			std := psyCapIn(c.u, psyMustCoil(t, AirFlowIn(c.u, c.flow), FlowStandard, e, l).Total)
			if !psyRelClose(std, shortcut, 1e-9) {
				t.Errorf("standard basis %.9g vs shortcut %.9g", std, shortcut)
			}
			act := psyCapIn(c.u, psyMustCoil(t, AirFlowIn(c.u, c.flow), FlowAtEnter, e, l).Total)
			if ratio := act / shortcut; ratio < 0.94 || ratio > 0.98 {
				t.Errorf("at entering density: exact/shortcut = %.4f, want 0.94–0.98", ratio)
			}
		})
	}
}

// At altitude the same volume flow carries less air: ideal gas, ρ ∝ p, so with the
// flow read at entering conditions and the same dry bulbs and humidity ratios, the
// capacity scales exactly as p(5,000 ft)/p(0) = (1 − 6.8754e−6·5000)^5.2559 = 0.832
// (ASHRAE 2017 ch. 1 eq. 3): about 17 % below sea level, which the 1.08 and 4.5
// factors miss entirely.
func TestAirCoilCapacityAltitude(t *testing.T) {
	p0, _ := StandardPressure(IP, 0)
	p5, _ := StandardPressure(IP, 5000)
	want := math.Pow(1-6.8754e-6*5000, 5.2559)
	cap := func(p float64) float64 {
		e := psyMustState(t, IP, p, AirSpec{80, HumRatio, 0.011})
		l := psyMustState(t, IP, p, AirSpec{55, HumRatio, 0.0088})
		return psyMustCoil(t, CFM(4000), FlowAtEnter, e, l).Total.BtuH()
	}
	ratio := cap(p5) / cap(p0)
	if !psyRelClose(ratio, want, 1e-9) {
		t.Errorf("capacity at 5,000 ft / sea level = %.9f, want p ratio %.9f", ratio, want)
	}
	if drop := 1 - ratio; drop < 0.16 || drop > 0.18 {
		t.Errorf("drop at 5,000 ft = %.1f %%, want about 17 %%", 100*drop)
	}
	// SI: 1,500 m, (1 − 2.25577e−5·1500)^5.2559 = 0.837.
	e0 := psyMustState(t, SI, 101.325, AirSpec{27, HumRatio, 0.011})
	l0 := psyMustState(t, SI, 101.325, AirSpec{13, HumRatio, 0.0088})
	p15, _ := StandardPressure(SI, 1500)
	e1 := psyMustState(t, SI, p15, AirSpec{27, HumRatio, 0.011})
	l1 := psyMustState(t, SI, p15, AirSpec{13, HumRatio, 0.0088})
	r := psyMustCoil(t, LitersPerSecond(1000), FlowAtEnter, e1, l1).Total.KW() /
		psyMustCoil(t, LitersPerSecond(1000), FlowAtEnter, e0, l0).Total.KW()
	if w := math.Pow(1-2.25577e-5*1500, 5.2559); !psyRelClose(r, w, 1e-9) {
		t.Errorf("SI capacity at 1,500 m / sea level = %.9f, want %.9f", r, w)
	}
}

// Process and sign conventions, worked by hand from ASHRAE 2017 ch. 1 eq. 30.
func TestAirCoilCapacitySigns(t *testing.T) {
	t.Run("Heating", func(t *testing.T) {
		e := psyMustState(t, IP, 14.696, AirSpec{60, HumRatio, 0.006})
		l := psyMustState(t, IP, 14.696, AirSpec{100, HumRatio, 0.006})
		r := psyMustCoil(t, CFM(1000), FlowStandard, e, l)
		// 1000 cfm × 60 × 0.075 = 4500 lb/h; Δh = (0.240 + 0.444·0.006)·40 Btu/lb.
		want := 4500 * (0.240 + 0.444*0.006) * 40
		if r.Process != "heating" || !psyRelClose(r.Total.BtuH(), want, 1e-12) || !psyRelClose(r.Sensible.BtuH(), want, 1e-12) {
			t.Errorf("got %+v (total %.6g Btu/h), want heating %.6g Btu/h all sensible", r, r.Total.BtuH(), want)
		}
		if !psyRelClose(r.MassFlow.LbH(), 4500, 1e-12) {
			t.Errorf("mass flow %.9g lb/h, want 4500", r.MassFlow.LbH())
		}
	})
	t.Run("CoolingThatAddsMoisture", func(t *testing.T) {
		// An evaporative cooler: enthalpy falls a little, W rises: latent negative.
		e := psyMustState(t, SI, 101.325, AirSpec{35, HumRatio, 0.006})
		l := psyMustState(t, SI, 101.325, AirSpec{22, HumRatio, 0.0105})
		r := psyMustCoil(t, LitersPerSecond(1000), FlowStandard, e, l)
		// 1.2 kg/s; h = 1.006 t + W (2501 + 1.86 t).
		h := func(t, w float64) float64 { return 1.006*t + w*(2501+1.86*t) }
		total := 1.2 * (h(35, 0.006) - h(22, 0.0105))
		sens := 1.2 * (h(35, 0.0105) - h(22, 0.0105))
		if r.Process != "cooling" || !psyRelClose(r.Total.KW(), total, 1e-12) || !psyRelClose(r.Sensible.KW(), sens, 1e-12) {
			t.Errorf("got %s total %.6g sensible %.6g kW, want cooling %.6g / %.6g", r.Process, r.Total.KW(), r.Sensible.KW(), total, sens)
		}
		if r.Latent >= 0 || r.SHR <= 1 {
			t.Errorf("latent %.6g kW, SHR %.4f: want latent < 0, SHR > 1", r.Latent.KW(), r.SHR)
		}
	})
	t.Run("NoChange", func(t *testing.T) {
		e := psyMustState(t, IP, 14.696, AirSpec{70, RelHum, 50})
		r := psyMustCoil(t, CFM(1000), FlowAtLeave, e, e)
		if r.Total != 0 || r.SHR != 0 {
			t.Errorf("identical states: %+v", r)
		}
	})
}

func TestAirCoilCapacityErrors(t *testing.T) {
	ip := psyMustState(t, IP, 14.696, AirSpec{80, WetBulb, 67})
	ip2 := psyMustState(t, IP, 14.696, AirSpec{55, WetBulb, 54})
	ipHigh := psyMustState(t, IP, 12.2, AirSpec{55, WetBulb, 54})
	si := psyMustState(t, SI, 101.325, AirSpec{13, WetBulb, 12})
	bad := ip2
	bad.HumRatio = math.NaN()
	hot := ip2
	hot.DryBulb = 250
	cases := []struct {
		name  string
		q     VolumeFlow
		b     FlowBasis
		e, l  AirState
		input string
	}{
		{"ErrUnitsZero", CFM(1000), FlowStandard, AirState{}, ip2, "enter_units"},
		{"ErrUnitsMismatch", CFM(1000), FlowStandard, ip, si, "leave_units"},
		{"ErrPressureMismatch", CFM(1000), FlowStandard, ip, ipHigh, "leave_pressure"},
		{"ErrFlowZero", CFM(0), FlowStandard, ip, ip2, "flow"},
		{"ErrFlowNegative", CFM(-10), FlowStandard, ip, ip2, "flow"},
		{"ErrFlowNaN", VolumeFlow(math.NaN()), FlowStandard, ip, ip2, "flow"},
		{"ErrFlowHuge", CFM(3e6), FlowStandard, ip, ip2, "flow"},
		{"ErrBasisZero", CFM(1000), 0, ip, ip2, "flow_basis"},
		{"ErrLeaveHumRatioNaN", CFM(1000), FlowStandard, ip, bad, "leave_hum_ratio"},
		{"ErrLeaveBoiling", CFM(1000), FlowStandard, ip, hot, "leave_dry_bulb"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r, err := CoilCapacity(c.q, c.b, c.e, c.l)
			var ie *InputError
			if !errors.As(err, &ie) {
				t.Fatalf("CoilCapacity = %+v, %v; want *InputError", r, err)
			}
			if ie.Input != c.input {
				t.Errorf("Input = %q, want %q (%v)", ie.Input, c.input, err)
			}
		})
	}
}

func TestAirCoilParseFlowBasis(t *testing.T) {
	for _, c := range []struct {
		in   string
		want FlowBasis
	}{{"standard", FlowStandard}, {" Enter", FlowAtEnter}, {"LEAVE ", FlowAtLeave}} {
		got, err := ParseFlowBasis(c.in)
		if err != nil || got != c.want || got.String() != c.want.String() {
			t.Errorf("ParseFlowBasis(%q) = %v, %v; want %v", c.in, got, err, c.want)
		}
	}
	if _, err := ParseFlowBasis("actual"); err == nil {
		t.Error(`ParseFlowBasis("actual") accepted`)
	}
}

// CoilUncertainty against cases worked analytically from the propagation formula
// u² = Σ (∂Q/∂x_i · a_i)² (ISO GUM, JCGM 100:2008 eq. 10) and the enthalpy equation
// h = cp_a t + W (h_g0 + cp_v t) (ASHRAE 2017 ch. 1 eq. 30).
func TestAirCoilUncertaintyAnalytic(t *testing.T) {
	type sys struct {
		u              UnitSystem
		p, flow        float64
		cpa, hg0, cpv  float64
		massPerFlow    float64 // standard basis: lb/h per cfm or kg/s per L/s
		tAcc           TempDiff
		te, tl, we, wl float64
	}
	for _, s := range []sys{
		{IP, 14.696, 2000, 0.240, 1061, 0.444, 60 * 0.075, DeltaF(0.5), 80, 55, 0.011, 0.0088},
		{SI, 101.325, 1000, 1.006, 2501, 1.86, 1.2 / 1000, DeltaC(0.3), 27, 13, 0.011, 0.0088},
	} {
		m := s.massPerFlow * s.flow
		q := AirFlowIn(s.u, s.flow)
		e, l := AirSpec{s.te, HumRatio, s.we}, AirSpec{s.tl, HumRatio, s.wl}
		es, ls := psyMustState(t, s.u, s.p, e), psyMustState(t, s.u, s.p, l)
		nominal := psyMustCoil(t, q, FlowStandard, es, ls)
		run := func(t *testing.T, b FlowBasis, e, l AirSpec, acc AirAccuracy) (float64, float64) {
			t.Helper()
			r, err := CoilUncertainty(s.u, s.p, q, b, e, l, acc)
			if err != nil {
				t.Fatal(err)
			}
			return psyCapIn(s.u, r.Total), psyCapIn(s.u, r.Sensible)
		}
		t.Run(s.u.String()+"_FlowOnly", func(t *testing.T) {
			// Capacity ∝ flow: ± is FlowPct % of the result exactly, on every basis.
			for _, b := range []FlowBasis{FlowStandard, FlowAtEnter, FlowAtLeave} {
				r := psyMustCoil(t, q, b, es, ls)
				uT, uS := run(t, b, e, l, AirAccuracy{FlowPct: 5})
				if !psyRelClose(uT, 0.05*psyCapIn(s.u, r.Total), 1e-7) || !psyRelClose(uS, 0.05*psyCapIn(s.u, r.Sensible), 1e-7) {
					t.Errorf("%s: ± total %.8g sensible %.8g, want 5 %% of %.8g, %.8g", b, uT, uS,
						psyCapIn(s.u, r.Total), psyCapIn(s.u, r.Sensible))
				}
			}
		})
		t.Run(s.u.String()+"_TempOnly", func(t *testing.T) {
			// W given directly, standard basis: ∂S/∂t_e = −∂S/∂t_l = ṁ (cp_a + cp_v W_l),
			// ∂T/∂t_e = ṁ (cp_a + cp_v W_e), ∂T/∂t_l = −ṁ (cp_a + cp_v W_l).
			a := s.tAcc.In(s.u)
			ce, cl := m*(s.cpa+s.cpv*s.we), m*(s.cpa+s.cpv*s.wl)
			uT, uS := run(t, FlowStandard, e, l, AirAccuracy{Temp: s.tAcc})
			if want := a * math.Hypot(ce, cl); !psyRelClose(uT, want, 1e-7) {
				t.Errorf("± total %.8g, want %.8g", uT, want)
			}
			if want := a * cl * math.Sqrt2; !psyRelClose(uS, want, 1e-7) {
				t.Errorf("± sensible %.8g, want %.8g", uS, want)
			}
		})
		t.Run(s.u.String()+"_EnterRHOnly", func(t *testing.T) {
			// Entering RH: W_e = 0.621945 pw/(p − pw), pw = RH/100 · pws, so
			// ∂W_e/∂RH = 0.621945 p pws / (100 (p − pw)²) and ∂T/∂RH = ṁ (h_g0 + cp_v t_e) ∂W_e/∂RH;
			// sensible depends on W_l only, so its ± is zero.
			const rh, pts = 45.0, 3.0
			pws, _ := SatVapPres(s.u, s.te)
			pw := rh / 100 * pws
			dW := mwRatio * s.p * pws / (100 * (s.p - pw) * (s.p - pw))
			eRH := AirSpec{s.te, RelHum, rh}
			uT, uS := run(t, FlowStandard, eRH, l, AirAccuracy{RHPoints: pts})
			if want := m * (s.hg0 + s.cpv*s.te) * dW * pts; !psyRelClose(uT, want, 1e-6) {
				t.Errorf("± total %.8g, want %.8g", uT, want)
			}
			if uS > 1e-9*psyCapIn(s.u, nominal.Total) {
				t.Errorf("± sensible %.3g, want 0", uS)
			}
		})
		t.Run(s.u.String()+"_RSS", func(t *testing.T) {
			// All inputs together: the root-sum-square of each alone.
			eWB := psyMustState(t, s.u, s.p, e)
			eSpec := AirSpec{s.te, WetBulb, eWB.WetBulb}
			lSpec := AirSpec{s.tl, RelHum, psyMustState(t, s.u, s.p, l).RelHum}
			full := AirAccuracy{FlowPct: 4, Temp: s.tAcc, RHPoints: 2}
			uT, uS := run(t, FlowAtEnter, eSpec, lSpec, full)
			var sT, sS float64
			for _, a := range []AirAccuracy{{FlowPct: 4}, {Temp: s.tAcc}, {RHPoints: 2}} {
				x, y := run(t, FlowAtEnter, eSpec, lSpec, a)
				sT += x * x
				sS += y * y
			}
			if !psyRelClose(uT, math.Sqrt(sT), 1e-9) || !psyRelClose(uS, math.Sqrt(sS), 1e-9) {
				t.Errorf("combined ± %.8g / %.8g, RSS of parts %.8g / %.8g", uT, uS, math.Sqrt(sT), math.Sqrt(sS))
			}
		})
	}
}

// A reading on its limit (RH 100 %) is differenced one-sided; the result still
// agrees with the analytic sensitivity to the order of the step.
func TestAirCoilUncertaintyAtSaturation(t *testing.T) {
	const p, te, tl = 14.696, 80.0, 55.0
	e := AirSpec{te, HumRatio, 0.011}
	l := AirSpec{tl, RelHum, 100}
	r, err := CoilUncertainty(IP, p, CFM(2000), FlowStandard, e, l, AirAccuracy{RHPoints: 2})
	if err != nil {
		t.Fatal(err)
	}
	pws, _ := SatVapPres(IP, tl)
	dW := mwRatio * p * pws / (100 * (p - pws) * (p - pws))
	m := 2000 * 60 * 0.075
	// T = ṁ [h_e − cp_a t_l − W_l (h_g0 + cp_v t_l)]: ∂T/∂RH_l = −ṁ (1061 + 0.444 t_l) ∂W_l/∂RH.
	if want := m * (1061 + 0.444*tl) * dW * 2; !psyRelClose(r.Total.BtuH(), want, 1e-3) {
		t.Errorf("± total %.6g Btu/h, want %.6g", r.Total.BtuH(), want)
	}
}

func TestAirCoilUncertaintyErrors(t *testing.T) {
	e, l := AirSpec{80, WetBulb, 67}, AirSpec{55, WetBulb, 54}
	for _, c := range []struct {
		name  string
		u     UnitSystem
		e, l  AirSpec
		q     VolumeFlow
		acc   AirAccuracy
		input string
	}{
		{"ErrFlowAccuracyNegative", IP, e, l, CFM(1000), AirAccuracy{FlowPct: -1}, "flow_accuracy"},
		{"ErrTempAccuracyNaN", IP, e, l, CFM(1000), AirAccuracy{Temp: TempDiff(math.NaN())}, "temp_accuracy"},
		{"ErrRHAccuracyHigh", IP, e, l, CFM(1000), AirAccuracy{RHPoints: 60}, "rh_accuracy"},
		{"ErrEnterRH", IP, AirSpec{80, RelHum, 120}, l, CFM(1000), AirAccuracy{}, "enter_rel_hum"},
		{"ErrLeaveWetBulb", IP, e, AirSpec{55, WetBulb, 56}, CFM(1000), AirAccuracy{}, "leave_wet_bulb"},
		{"ErrFlow", IP, e, l, CFM(-1), AirAccuracy{}, "flow"},
		{"ErrUnits", 0, e, l, CFM(1000), AirAccuracy{}, "units"},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := CoilUncertainty(c.u, 14.696, c.q, FlowStandard, c.e, c.l, c.acc)
			var ie *InputError
			if !errors.As(err, &ie) || ie.Input != c.input {
				t.Errorf("err = %v, want *InputError for %s", err, c.input)
			}
		})
	}
}

// Processes a cooling coil does not make carry a warning; an ordinary wet coil none.
// Values are chosen to put the process on each side (no external source needed: the
// signs follow from the enthalpy equation).
func TestAirCoilWarnings(t *testing.T) {
	p := 14.696
	state := func(db, wb float64) AirState {
		st, err := AirSpec{DryBulb: db, Kind: WetBulb, Humidity: wb}.State(IP, p)
		if err != nil {
			t.Fatal(err)
		}
		return st
	}
	for _, tc := range []struct {
		name         string
		enter, leave AirState
		want         string
	}{
		{"WetCoil", state(80, 67), state(55, 54), ""},
		// Evaporative cooling: the wet bulb stays put while the dry bulb falls.
		{"Adiabatic", state(95, 60), state(70, 60), "near-adiabatic"},
		// Leaving air cooler but wetter (dew point up).
		{"MoistureAdded", state(85, 62), state(70, 61), "more moisture"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			r, err := CoilCapacity(CFM(2000), FlowStandard, tc.enter, tc.leave)
			if err != nil {
				t.Fatal(err)
			}
			got := strings.Join(r.Warnings, " | ")
			if tc.want == "" && got != "" || !strings.Contains(got, tc.want) {
				t.Errorf("warnings %q, want one containing %q", got, tc.want)
			}
		})
	}
}
