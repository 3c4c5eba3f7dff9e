package measure

import (
	"math"
	"testing"
)

func TestFanLaws(t *testing.T) {
	// Fan laws (AMCA; ASHRAE Handbook—HVAC Systems and Equipment, fans chapter;
	// shared/REFERENCES.md): flow ∝ rpm, pressure ∝ rpm², power ∝ rpm³.
	tests := []struct {
		name           string
		now            FanPoint
		target         VolumeFlow
		rpm, inwg, bhp float64
		wantSPZero     bool
	}{
		// Doubling the flow doubles rpm, quadruples pressure, multiplies power by 8.
		{"DoubleSpeed", FanPoint{CFM(5000), 600, InWG(1), Horsepower(3)}, CFM(10000), 1200, 4, 24, false},
		// Worked by hand: 4000 → 4400 cfm is ratio 1.1: 900 → 990 rpm,
		// 1.5 × 1.21 = 1.815 in. w.g., 2.0 × 1.331 = 2.662 bhp.
		{"WorkedExample", FanPoint{CFM(4000), 900, InWG(1.5), Horsepower(2)}, CFM(4400), 990, 1.815, 2.662, false},
		// Slowing down: ratio 0.8: 1000 → 800 rpm, 2 × 0.64 = 1.28 in., 5 × 0.512 = 2.56 bhp.
		{"SlowDown", FanPoint{CFM(10000), 1000, InWG(2), Horsepower(5)}, CFM(8000), 800, 1.28, 2.56, false},
		// Pressure and power not given stay zero.
		{"OnlyFlowAndRPM", FanPoint{Flow: CFM(3000), RPM: 1100}, CFM(3300), 1210, 0, 0, true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			p, err := FanLawsToFlow(tc.now, tc.target)
			if err != nil {
				t.Fatal(err)
			}
			if p.Flow != tc.target {
				t.Errorf("Flow = %g cfm, want %g", p.Flow.CFM(), tc.target.CFM())
			}
			balRel(t, "rpm", p.RPM, tc.rpm, 1e-12)
			if tc.wantSPZero {
				if p.StaticPressure != 0 || p.Power != 0 {
					t.Errorf("StaticPressure, Power = %g, %g; want 0, 0", p.StaticPressure, p.Power)
				}
				return
			}
			balRel(t, "in. w.g.", p.StaticPressure.InWG(), tc.inwg, 1e-12)
			balRel(t, "bhp", p.Power.HP(), tc.bhp, 1e-12)
		})
	}
}

func TestFanLawsErrors(t *testing.T) {
	ok := FanPoint{CFM(4000), 900, InWG(1.5), Horsepower(2)}
	with := func(f func(*FanPoint)) FanPoint { p := ok; f(&p); return p }
	tests := []struct {
		name   string
		now    FanPoint
		target VolumeFlow
		input  string
	}{
		{"ErrFlowZero", with(func(p *FanPoint) { p.Flow = 0 }), CFM(4400), "flow"},
		{"ErrFlowNaN", with(func(p *FanPoint) { p.Flow = VolumeFlow(math.NaN()) }), CFM(4400), "flow"},
		{"ErrRPMZero", with(func(p *FanPoint) { p.RPM = 0 }), CFM(4400), "rpm"},
		{"ErrRPMTooHigh", with(func(p *FanPoint) { p.RPM = 25000 }), CFM(4400), "rpm"},
		{"ErrStaticPressureNegative", with(func(p *FanPoint) { p.StaticPressure = InWG(-1) }), CFM(4400), "static_pressure"},
		{"ErrPowerInf", with(func(p *FanPoint) { p.Power = Power(math.Inf(1)) }), CFM(4400), "power"},
		{"ErrTargetZero", ok, 0, "target_flow"},
		// 900 rpm × 25 = 22 500 rpm, above 20 000.
		{"ErrTargetNeedsTooFastFan", ok, CFM(100000), "target_flow"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := FanLawsToFlow(tc.now, tc.target)
			balInputErr(t, err, tc.input)
		})
	}
}

func TestFanDrive(t *testing.T) {
	// Belt drive ratio: fan rpm = motor rpm × motor sheave ÷ fan sheave (hand
	// computation): a 1750 rpm motor with a 5.0 in sheave on a 10.0 in fan sheave → 875 rpm.
	t.Run("DriveFanRPM", func(t *testing.T) {
		rpm, err := DriveFanRPM(1750, Inches(5), Inches(10))
		if err != nil {
			t.Fatal(err)
		}
		balRel(t, "fan rpm", rpm, 875, 1e-12)
	})
	t.Run("FanSheaveFromDrive", func(t *testing.T) {
		d, err := FanSheaveFromDrive(1750, Inches(5), 875)
		if err != nil {
			t.Fatal(err)
		}
		balRel(t, "fan sheave in", d.Inch(), 10, 1e-12)
	})
	t.Run("MotorSheaveFor", func(t *testing.T) {
		// 875 → 962.5 rpm is ratio 1.1: the 5.0 in motor sheave becomes 5.5 in.
		d, err := MotorSheaveFor(Inches(5), 875, 962.5)
		if err != nil {
			t.Fatal(err)
		}
		balRel(t, "motor sheave in", d.Inch(), 5.5, 1e-12)
		rpm, err := DriveFanRPM(1750, d, Inches(10))
		if err != nil {
			t.Fatal(err)
		}
		balRel(t, "fan rpm with new sheave", rpm, 962.5, 1e-12)
	})
	t.Run("SI", func(t *testing.T) {
		// 1450 rpm (50 Hz 4-pole) × 125 mm ÷ 250 mm = 725 rpm.
		rpm, err := DriveFanRPM(1450, Millimeters(125), Millimeters(250))
		if err != nil {
			t.Fatal(err)
		}
		balRel(t, "fan rpm", rpm, 725, 1e-12)
	})
}

func TestFanMotor(t *testing.T) {
	t.Run("ThreePhasePower", func(t *testing.T) {
		// P = √3·V·I·PF: √3 × 460 × 10 × 0.85 = 6772.3 W (hand computation).
		p, err := ThreePhasePower(460, 10, 0.85)
		if err != nil {
			t.Fatal(err)
		}
		balRel(t, "kW", p.KW(), 6.772, 1e-4)
		balRel(t, "W", p.W(), math.Sqrt(3)*3910, 1e-12)
	})
	t.Run("PercentFLA", func(t *testing.T) {
		// 8.5 A of a 10 A nameplate = 85 %.
		p, err := PercentFLA(8.5, 10)
		if err != nil {
			t.Fatal(err)
		}
		balRel(t, "percent", p, 85, 1e-12)
	})
	t.Run("VoltageImbalanceNEMA", func(t *testing.T) {
		// NEMA MG 1 worked example (from memory): 460, 467, 450 V → average 459,
		// largest deviation 9 V, 9/459 = 1.96 %.
		p, err := VoltageImbalance(460, 467, 450)
		if err != nil {
			t.Fatal(err)
		}
		balRel(t, "percent", p, 1.96, 2e-3)
		balRel(t, "percent exact", p, 900.0/459, 1e-12)
	})
	t.Run("VoltageBalanced", func(t *testing.T) {
		p, err := VoltageImbalance(480, 480, 480)
		if err != nil {
			t.Fatal(err)
		}
		if p != 0 {
			t.Errorf("imbalance = %g, want 0", p)
		}
	})
	t.Run("CurrentImbalance", func(t *testing.T) {
		// Hand computation: 10, 11, 9.5 A → average 10.1667, largest deviation
		// 0.8333 A → 8.197 %.
		p, err := CurrentImbalance(10, 11, 9.5)
		if err != nil {
			t.Fatal(err)
		}
		balRel(t, "percent", p, 8.197, 1e-4)
	})
	t.Run("CurrentLostPhase", func(t *testing.T) {
		// 10, 10, 0 A → average 6.667, deviation 6.667 → 100 %.
		p, err := CurrentImbalance(10, 10, 0)
		if err != nil {
			t.Fatal(err)
		}
		balRel(t, "percent", p, 100, 1e-12)
	})
}

func TestFanErrors(t *testing.T) {
	nan := math.NaN()
	tests := []struct {
		name  string
		call  func() error
		input string
	}{
		{"ErrMotorRPMZero", func() error { _, err := DriveFanRPM(0, Inches(5), Inches(10)); return err }, "motor_rpm"},
		{"ErrMotorSheaveZero", func() error { _, err := DriveFanRPM(1750, 0, Inches(10)); return err }, "motor_sheave"},
		{"ErrFanSheaveTiny", func() error { _, err := DriveFanRPM(1750, Inches(5), Length(1e-300)); return err }, "fan_sheave"},
		{"ErrSheaveForNaN", func() error { _, err := MotorSheaveFor(Length(nan), 875, 900); return err }, "motor_sheave"},
		{"ErrSheaveForFanRPM", func() error { _, err := MotorSheaveFor(Inches(5), 0, 900); return err }, "fan_rpm"},
		{"ErrSheaveForTarget", func() error { _, err := MotorSheaveFor(Inches(5), 875, 30000); return err }, "target_rpm"},
		{"ErrFanSheaveFanRPM", func() error { _, err := FanSheaveFromDrive(1750, Inches(5), -1); return err }, "fan_rpm"},
		{"ErrVoltsZero", func() error { _, err := ThreePhasePower(0, 10, 0.85); return err }, "volts"},
		{"ErrAmpsNegative", func() error { _, err := ThreePhasePower(460, -1, 0.85); return err }, "amps"},
		{"ErrPowerFactorAboveOne", func() error { _, err := ThreePhasePower(460, 10, 1.2); return err }, "power_factor"},
		{"ErrPowerFactorTiny", func() error { _, err := ThreePhasePower(460, 10, 0.01); return err }, "power_factor"},
		{"ErrFLAZero", func() error { _, err := PercentFLA(8, 0); return err }, "fla"},
		{"ErrAmpsNaN", func() error { _, err := PercentFLA(nan, 10); return err }, "amps"},
		{"ErrVolts2", func() error { _, err := VoltageImbalance(460, 0, 460); return err }, "volts_2"},
		{"ErrVolts3Inf", func() error { _, err := VoltageImbalance(460, 460, math.Inf(1)); return err }, "volts_3"},
		{"ErrAmps1Negative", func() error { _, err := CurrentImbalance(-1, 10, 10); return err }, "amps_1"},
		{"ErrAmpsAllZero", func() error { _, err := CurrentImbalance(0, 0, 0); return err }, "amps_1"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			balInputErr(t, tc.call(), tc.input)
		})
	}
}
