package measure

import "math"

// Accepted ranges for fans, drives and motors. Sanity limits, not ratings: wide
// enough for any HVAC fan, tight enough that no result overflows. Errors on typed
// quantities report SI base units, as the functions take no unit system.
const (
	fanMinRPM      = 1.0
	fanMaxRPM      = 20000.0
	fanMaxFlow     = 1000.0 // m³/s
	fanMaxPressure = 1e5    // Pa (about 400 in. w.g.)
	fanMaxPower    = 1e7    // W
	fanMinSheave   = 0.001  // m pitch diameter
	fanMaxSheave   = 10.0   // m
	fanMinVolts    = 1.0
	fanMaxVolts    = 15000.0
	fanMaxAmps     = 20000.0
	fanMinFLA      = 0.01
	fanMinPF       = 0.05
)

// FanPoint is a fan's operating point. StaticPressure and Power are optional:
// zero means not given. Power is the fan's shaft (brake) power; a motor's input
// power follows it only while the motor's efficiency stays the same.
type FanPoint struct {
	Flow           VolumeFlow
	RPM            float64 // fan speed, rev/min
	StaticPressure Pressure
	Power          Power
}

// FanLawsToFlow returns the operating point that delivers target flow on the same
// system, by the fan laws (AMCA; ASHRAE Handbook—HVAC Systems and Equipment, fans
// chapter) at constant density: flow ∝ rpm, pressure ∝ rpm², power ∝ rpm³. The
// laws assume the system curve does not change (no damper moved) and the fan
// stays on the same point of its own curve. A zero StaticPressure or Power stays
// zero.
//
// Errors: *InputError for "flow" and "target_flow" (above 0, at most 1000 m³/s),
// "rpm" (1 to 20000), "static_pressure" (0 to 1e5 Pa), "power" (0 to 1e7 W), and
// "target_flow" when the new speed would fall outside 1 to 20000 rpm.
func FanLawsToFlow(now FanPoint, target VolumeFlow) (FanPoint, error) {
	if err := fanCheckPositive("flow", float64(now.Flow), fanMaxFlow, "m³/s"); err != nil {
		return FanPoint{}, err
	}
	if err := checkRange("rpm", now.RPM, fanMinRPM, fanMaxRPM, "rpm"); err != nil {
		return FanPoint{}, err
	}
	if err := checkRange("static_pressure", float64(now.StaticPressure), 0, fanMaxPressure, "Pa"); err != nil {
		return FanPoint{}, err
	}
	if err := checkRange("power", float64(now.Power), 0, fanMaxPower, "W"); err != nil {
		return FanPoint{}, err
	}
	if err := fanCheckPositive("target_flow", float64(target), fanMaxFlow, "m³/s"); err != nil {
		return FanPoint{}, err
	}
	r := float64(target) / float64(now.Flow)
	rpm := now.RPM * r
	if rpm < fanMinRPM || rpm > fanMaxRPM {
		perRPM := float64(now.Flow) / now.RPM
		return FanPoint{}, &InputError{Input: "target_flow", Value: float64(target), Unit: "m³/s",
			Min: perRPM * fanMinRPM, Max: perRPM * fanMaxRPM,
			Reason: "needs " + formatNum(rpm) + " rpm, outside 1 to 20000 rpm"}
	}
	return FanPoint{
		Flow:           target,
		RPM:            rpm,
		StaticPressure: Pressure(float64(now.StaticPressure) * r * r),
		Power:          Power(float64(now.Power) * r * r * r),
	}, nil
}

// DriveFanRPM returns the fan speed of a belt drive, rpm, from the motor speed and
// the pitch diameters of the two sheaves: fan rpm = motor rpm × motor sheave ÷ fan
// sheave (belt slip ignored; it lowers the real speed by a few percent).
//
// Errors: *InputError for "motor_rpm" (1 to 20000) and "motor_sheave",
// "fan_sheave" (0.001 to 10 m).
func DriveFanRPM(motorRPM float64, motorSheave, fanSheave Length) (float64, error) {
	if err := checkRange("motor_rpm", motorRPM, fanMinRPM, fanMaxRPM, "rpm"); err != nil {
		return 0, err
	}
	if err := checkRange("motor_sheave", float64(motorSheave), fanMinSheave, fanMaxSheave, "m"); err != nil {
		return 0, err
	}
	if err := checkRange("fan_sheave", float64(fanSheave), fanMinSheave, fanMaxSheave, "m"); err != nil {
		return 0, err
	}
	return motorRPM * float64(motorSheave) / float64(fanSheave), nil
}

// MotorSheaveFor returns the motor sheave pitch diameter that changes the fan from
// fanRPMNow to fanRPMTarget with the same fan sheave and motor speed: the
// diameter scales with the speed ratio (fan rpm = motor rpm × motor sheave ÷ fan
// sheave). Belt slip is taken as unchanged.
//
// Errors: *InputError for "motor_sheave" (0.001 to 10 m) and "fan_rpm",
// "target_rpm" (1 to 20000).
func MotorSheaveFor(motorSheave Length, fanRPMNow, fanRPMTarget float64) (Length, error) {
	if err := checkRange("motor_sheave", float64(motorSheave), fanMinSheave, fanMaxSheave, "m"); err != nil {
		return 0, err
	}
	if err := checkRange("fan_rpm", fanRPMNow, fanMinRPM, fanMaxRPM, "rpm"); err != nil {
		return 0, err
	}
	if err := checkRange("target_rpm", fanRPMTarget, fanMinRPM, fanMaxRPM, "rpm"); err != nil {
		return 0, err
	}
	return Length(float64(motorSheave) * fanRPMTarget / fanRPMNow), nil
}

// FanSheaveFromDrive returns the fan sheave pitch diameter that gives fanRPM from
// a motor at motorRPM with the given motor sheave: fan sheave = motor sheave ×
// motor rpm ÷ fan rpm (belt slip ignored).
//
// Errors: *InputError for "motor_rpm", "fan_rpm" (1 to 20000) and "motor_sheave"
// (0.001 to 10 m).
func FanSheaveFromDrive(motorRPM float64, motorSheave Length, fanRPM float64) (Length, error) {
	if err := checkRange("motor_rpm", motorRPM, fanMinRPM, fanMaxRPM, "rpm"); err != nil {
		return 0, err
	}
	if err := checkRange("motor_sheave", float64(motorSheave), fanMinSheave, fanMaxSheave, "m"); err != nil {
		return 0, err
	}
	if err := checkRange("fan_rpm", fanRPM, fanMinRPM, fanMaxRPM, "rpm"); err != nil {
		return 0, err
	}
	return Length(float64(motorSheave) * motorRPM / fanRPM), nil
}

// ThreePhasePower returns a balanced three-phase motor's electrical input power,
// P = √3 · V · I · PF, from the line-to-line volts, the line amps and the power
// factor (e.g. 460 V, 10 A, PF 0.85 → 6.772 kW).
//
// Errors: *InputError for "volts" (1 to 15000 V), "amps" (0 to 20000 A) and
// "power_factor" (0.05 to 1).
func ThreePhasePower(volts, amps, powerFactor float64) (Power, error) {
	if err := checkRange("volts", volts, fanMinVolts, fanMaxVolts, "V"); err != nil {
		return 0, err
	}
	if err := checkRange("amps", amps, 0, fanMaxAmps, "A"); err != nil {
		return 0, err
	}
	if err := checkRange("power_factor", powerFactor, fanMinPF, 1, ""); err != nil {
		return 0, err
	}
	return Power(math.Sqrt(3) * volts * amps * powerFactor), nil
}

// PercentFLA returns measured amps as a percentage of the motor's nameplate
// full-load amps.
//
// Errors: *InputError for "amps" (0 to 20000 A) and "fla" (0.01 to 20000 A).
func PercentFLA(amps, fla float64) (float64, error) {
	if err := checkRange("amps", amps, 0, fanMaxAmps, "A"); err != nil {
		return 0, err
	}
	if err := checkRange("fla", fla, fanMinFLA, fanMaxAmps, "A"); err != nil {
		return 0, err
	}
	return amps / fla * 100, nil
}

// VoltageUnbalanceDeratePct is the voltage unbalance, in percent, above which
// NEMA MG 1 §14.35 has a motor derated (from memory, not confirmed against the
// text).
const VoltageUnbalanceDeratePct = 1.0

// CurrentUnbalanceNotePct is the current unbalance, in percent, above which a
// motor's supply, windings or connections deserve a look. Common practice,
// from memory: NEMA MG 1 sets no limit on current, which runs several times the
// voltage unbalance.
const CurrentUnbalanceNotePct = 10.0

// FullLoadPct is 100 % of nameplate full-load amps: a motor drawing more runs
// into its service factor, which wants its load and drive checked.
const FullLoadPct = 100.0

// VoltageImbalance returns the voltage unbalance of three line-to-line voltages in
// percent, as NEMA MG 1 defines it: the largest deviation from the average ÷ the
// average × 100 (460, 467, 450 V → 1.96 %). NEMA MG 1 §14.35 has motors derated
// above 1 % unbalance (from memory).
//
// Errors: *InputError for "volts_1", "volts_2", "volts_3" (1 to 15000 V).
func VoltageImbalance(v1, v2, v3 float64) (float64, error) {
	for i, v := range [3]float64{v1, v2, v3} {
		if err := checkRange(fanPhaseName("volts", i), v, fanMinVolts, fanMaxVolts, "V"); err != nil {
			return 0, err
		}
	}
	return fanImbalance(v1, v2, v3), nil
}

// CurrentImbalance returns the current unbalance of three line currents in
// percent, by the same definition as VoltageImbalance: the largest deviation from
// the average ÷ the average × 100.
//
// Errors: *InputError for "amps_1", "amps_2", "amps_3" (0 to 20000 A), and for
// "amps_1" when all three are zero.
func CurrentImbalance(a1, a2, a3 float64) (float64, error) {
	for i, a := range [3]float64{a1, a2, a3} {
		if err := checkRange(fanPhaseName("amps", i), a, 0, fanMaxAmps, "A"); err != nil {
			return 0, err
		}
	}
	if a1 == 0 && a2 == 0 && a3 == 0 {
		return 0, invalid("amps_1", a1, "A", "all three currents are zero, so the imbalance is undefined")
	}
	return fanImbalance(a1, a2, a3), nil
}

// fanImbalance is max |x − avg| ÷ avg × 100; the caller ensures avg > 0.
func fanImbalance(a, b, c float64) float64 {
	avg := (a + b + c) / 3
	dev := math.Max(math.Abs(a-avg), math.Max(math.Abs(b-avg), math.Abs(c-avg)))
	return dev / avg * 100
}

func fanPhaseName(base string, i int) string {
	return base + "_" + string(rune('1'+i))
}

// fanCheckPositive accepts a finite v with 0 < v ≤ hi.
func fanCheckPositive(input string, v, hi float64, unit string) error {
	if err := checkPositive(input, v, unit); err != nil {
		return err
	}
	return checkRange(input, v, 0, hi, unit)
}
