package report

import (
	"strconv"

	"fieldtab/schema"
)

// quantityNames are the reading log's words for each quantity, by subject
// kind: the trade's terms, not the store's codes.
var quantityNames = map[string]map[string]string{
	schema.SubjectOutlet: {"flow": "hood reading", "velocity": "anemometer velocity"},
	// "VP", as the trade writes it, keeps a traverse point's row on one line.
	schema.SubjectTraverse: {"vp": "VP", "velocity": "velocity", "air_db": "duct dry bulb",
		"air_rh": "duct relative humidity", "air_wb": "duct wet bulb", "static": "duct static pressure"},
	schema.SubjectCapacityTest: {"flow": "airflow", "enter_db": "entering dry bulb", "enter_wb": "entering wet bulb",
		"enter_rh": "entering relative humidity", "enter_dp": "entering dew point", "leave_db": "leaving dry bulb",
		"leave_wb": "leaving wet bulb", "leave_rh": "leaving relative humidity", "leave_dp": "leaving dew point",
		"outdoor_db": "outdoor dry bulb"},
	schema.SubjectWaterTest: {"dp": "pressure drop (ΔP)", "flow": "water flow (meter)", "enter_temp": "entering water",
		"leave_temp": "leaving water"},
	schema.SubjectSystem: {"fan_rpm": "fan speed", "motor_rpm": "motor speed", "volts": "volts", "amps": "amps",
		"static_supply": "fan discharge static", "static_return": "fan inlet static", "static_external": "external static",
		"static_filter": "filter pressure drop", "static_coil": "coil pressure drop", "motor_sheave": "motor sheave pitch diameter",
		"fan_sheave": "fan sheave pitch diameter", "power_factor": "power factor"},
}

// voltLegs and ampLegs name a motor reading's leg: volts are read line to
// line, amps on each line.
var (
	voltLegs = [...]string{"", "L1–L2", "L2–L3", "L3–L1"}
	ampLegs  = [...]string{"", "L1", "L2", "L3"}
)

// quantityName is a reading's quantity and point in words: "VP, point 26",
// "volts, L1–L2", "valve ΔP".
func quantityName(kind, q string, point int, valve bool) string {
	name, ok := quantityNames[kind][q]
	if !ok {
		name = label(q)
	}
	if kind == schema.SubjectWaterTest && q == "dp" && valve {
		name = "valve ΔP"
	}
	if point <= 0 {
		return name
	}
	switch {
	case kind == schema.SubjectSystem && q == "volts" && point < len(voltLegs):
		return name + ", " + voltLegs[point]
	case kind == schema.SubjectSystem && q == "amps" && point < len(ampLegs):
		return name + ", " + ampLegs[point]
	}
	return name + ", point " + strconv.Itoa(point)
}
