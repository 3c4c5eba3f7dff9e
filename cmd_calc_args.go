package main

import (
	"errors"
	"fmt"
	"math"
	"regexp"
	"sort"
	"strconv"
	"strings"

	"fieldtab/measure"
)

// flagSpec declares one flag of a calc command. Flags are kept as strings until a
// command asks for them typed, so command-line and --batch values share one path.
type flagSpec struct {
	name  string // without the leading dashes
	usage string
	def   string   // default value, "" for none
	bool  bool     // a switch that takes no value
	qty   quantity // what the value measures, for errors in the user's units
}

// flagError is an error about one flag; its message starts with the flag's name.
type flagError struct {
	flag  string // with the leading dashes
	msg   string
	input *measure.InputError // the measure error behind msg, if any
}

func (e *flagError) Error() string { return e.flag + ": " + e.msg }

// params holds the flag values of one invocation (or one --batch line).
type params struct {
	units measure.UnitSystem
	vals  map[string]string
}

// parseFlags reads --name value, --name=value and switches against specs.
func parseFlags(specs []flagSpec, args []string) (map[string]string, error) {
	byName := specIndex(specs)
	vals := map[string]string{}
	for i := 0; i < len(args); i++ {
		a := args[i]
		if !strings.HasPrefix(a, "-") {
			return nil, &flagError{flag: a, msg: "unexpected argument; flags look like --name value"}
		}
		name := strings.TrimLeft(a, "-")
		value, hasValue := "", false
		if k, v, ok := strings.Cut(name, "="); ok {
			name, value, hasValue = k, v, true
		}
		spec, ok := byName[name]
		if !ok {
			return nil, &flagError{flag: "--" + name, msg: "unknown flag" + suggest(name, specs)}
		}
		switch {
		case spec.bool && !hasValue:
			value = "true"
		case !hasValue:
			if i+1 >= len(args) {
				return nil, &flagError{flag: "--" + name, msg: "needs a value (" + spec.usage + ")"}
			}
			i++
			value = args[i]
		}
		vals[name] = value
	}
	return vals, nil
}

func specIndex(specs []flagSpec) map[string]flagSpec {
	m := make(map[string]flagSpec, len(specs))
	for _, s := range specs {
		m[s.name] = s
	}
	return m
}

func suggest(name string, specs []flagSpec) string {
	var near []string
	for _, s := range specs {
		if strings.Contains(s.name, name) || strings.Contains(name, s.name) {
			near = append(near, "--"+s.name)
		}
	}
	if len(near) == 0 {
		return ""
	}
	sort.Strings(near)
	return "; did you mean " + strings.Join(near, " or ") + "?"
}

func (p *params) has(name string) bool { _, ok := p.vals[name]; return ok }

func (p *params) str(name, def string) string {
	if v, ok := p.vals[name]; ok {
		return v
	}
	return def
}

// float returns a required number.
func (p *params) float(name string) (float64, error) {
	v, ok, err := p.optFloat(name)
	if err == nil && !ok {
		err = &flagError{flag: "--" + name, msg: "is required"}
	}
	return v, err
}

// optFloat returns a number if the flag was given.
func (p *params) optFloat(name string) (float64, bool, error) {
	s, ok := p.vals[name]
	if !ok {
		return 0, false, nil
	}
	v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, true, &flagError{flag: "--" + name, msg: fmt.Sprintf("%q is not a number", s)}
	}
	return v, true, nil
}

// floatOr returns the number or def when the flag is absent.
func (p *params) floatOr(name string, def float64) (float64, error) {
	v, ok, err := p.optFloat(name)
	if !ok {
		return def, err
	}
	return v, err
}

// intOr returns a whole number or def when the flag is absent.
func (p *params) intOr(name string, def int) (int, error) {
	s, ok := p.vals[name]
	if !ok {
		return def, nil
	}
	v, err := strconv.Atoi(strings.TrimSpace(s))
	if err != nil {
		return 0, &flagError{flag: "--" + name, msg: fmt.Sprintf("%q is not a whole number", s)}
	}
	return v, nil
}

// floats returns a comma-separated list of numbers (nil when absent).
func (p *params) floats(name string) ([]float64, error) {
	s, ok := p.vals[name]
	if !ok {
		return nil, nil
	}
	parts := strings.Split(s, ",")
	out := make([]float64, 0, len(parts))
	for i, part := range parts {
		v, err := strconv.ParseFloat(strings.TrimSpace(part), 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, &flagError{flag: "--" + name, msg: fmt.Sprintf("item %d %q is not a number", i+1, strings.TrimSpace(part))}
		}
		out = append(out, v)
	}
	return out, nil
}

// oneOf returns the name of the single flag given among names, "" if none, and
// an error if more than one was given.
func (p *params) oneOf(names ...string) (string, error) {
	found := ""
	for _, n := range names {
		if p.has(n) {
			if found != "" {
				return "", &flagError{flag: "--" + n, msg: "give only one of --" + strings.Join(names, ", --")}
			}
			found = n
		}
	}
	return found, nil
}

// inputFlags maps a measure input name to the flag that carried it.
type inputFlags map[string]string

// flagErr turns a measure.InputError into a flagError naming the flag the user
// typed; other errors pass through.
func flagErr(err error, names inputFlags) error {
	var ie *measure.InputError
	if err == nil || !errors.As(err, &ie) {
		return err
	}
	flag, ok := names[ie.Input]
	if !ok {
		flag = strings.ReplaceAll(ie.Input, "_", "-")
	}
	return &flagError{flag: "--" + flag, msg: inputErrorText(ie), input: ie}
}

func inputErrorText(ie *measure.InputError) string {
	msg := ie.Error()
	if rest, ok := strings.CutPrefix(msg, ie.Input+" = "); ok {
		msg = rest
	}
	return msg
}

// quantity says what a flag measures, so an error from measure (which reports
// typed quantities in SI) can be restated in the units the user typed.
type quantity uint8

const (
	qtyNone quantity = iota
	qtyTemp
	qtyAirFlow
	qtyWaterFlow
	qtyDuctPressure
	qtyDuctSize
	qtyVelocity
	qtyArea
	qtyFanPower
)

// siScale is the factor from an SI unit that measure reports in to its base unit.
func siScale(unit string) (float64, bool) {
	switch unit {
	case "m³/s", "Pa", "m", "m/s", "m²", "W":
		return 1, true
	case "L/s", "mm":
		return 1e-3, true
	case "kPa":
		return 1e3, true
	case "MPa":
		return 1e6, true
	}
	return 0, false
}

// userValue converts v from the SI base unit of q to the user's unit.
func (q quantity) userValue(u measure.UnitSystem, v float64) (float64, string) {
	ip := u == measure.IP
	pick := func(ipUnit, siUnit string) string {
		if ip {
			return ipUnit
		}
		return siUnit
	}
	switch q {
	case qtyAirFlow:
		return measure.VolumeFlow(v).AirIn(u), pick("cfm", "L/s")
	case qtyWaterFlow:
		return measure.VolumeFlow(v).WaterIn(u), pick("gpm", "L/s")
	case qtyDuctPressure:
		return measure.Pressure(v).DuctIn(u), pick("in. w.g.", "Pa")
	case qtyDuctSize:
		return measure.Length(v).DuctSizeIn(u), pick("in", "mm")
	case qtyVelocity:
		return measure.Velocity(v).In(u), pick("fpm", "m/s")
	case qtyArea:
		return measure.Area(v).In(u), pick("ft²", "m²")
	case qtyFanPower:
		if ip {
			return measure.Power(v).HP(), "hp"
		}
		return v, "W"
	}
	return v, ""
}

// temperatureIn converts v in unit (°F, °C or K) to the user's scale.
func temperatureIn(unit string, u measure.UnitSystem, v float64) (float64, bool) {
	var t measure.Temperature
	switch unit {
	case "°F":
		t = measure.DegF(v)
	case "°C":
		t = measure.DegC(v)
	case "K":
		t = measure.Kelvin(v)
	default:
		return 0, false
	}
	return t.In(u), true
}

// convertInText rewrites the figures in text that carry unit from (“-10 °C”,
// “-10 to 100 °C”) into unit to.
func convertInText(text, from, to string, conv func(float64) float64) string {
	if text == "" || from == to {
		return text
	}
	num := `(-?\d+(?:\.\d+)?(?:e[-+]?\d+)?)`
	re := regexp.MustCompile(num + `(?: to ` + num + `)? ` + regexp.QuoteMeta(from))
	format := func(s string) string {
		v, _ := strconv.ParseFloat(s, 64)
		return strconv.FormatFloat(conv(v), 'g', 6, 64)
	}
	return re.ReplaceAllStringFunc(text, func(m string) string {
		sub := re.FindStringSubmatch(m)
		if sub[2] != "" {
			return format(sub[1]) + " to " + format(sub[2]) + " " + to
		}
		return format(sub[1]) + " " + to
	})
}

// inUserUnits restates a measure error in the units of the flag that carried
// it: measure reports typed quantities in SI (m³/s, Pa, mm, °C), a technician
// typed cfm, in. w.g., inches and °F.
func inUserUnits(err error, u measure.UnitSystem, specs map[string]flagSpec) error {
	var fe *flagError
	if !errors.As(err, &fe) || fe.input == nil {
		return err
	}
	q := specs[strings.TrimPrefix(fe.flag, "--")].qty
	ie := *fe.input
	conv := func(v float64) float64 { return v }
	unit := ie.Unit
	switch {
	case q == qtyTemp:
		if _, ok := temperatureIn(ie.Unit, u, 0); !ok {
			return err
		}
		conv = func(v float64) float64 { t, _ := temperatureIn(ie.Unit, u, v); return t }
		unit = "°F"
		if u == measure.SI {
			unit = "°C"
		}
	case q != qtyNone:
		scale, ok := siScale(ie.Unit)
		if !ok {
			return err
		}
		_, unit = q.userValue(u, 0)
		conv = func(v float64) float64 { x, _ := q.userValue(u, v*scale); return x }
	default:
		return err
	}
	ie.Reason = convertInText(ie.Reason, ie.Unit, unit, conv)
	ie.Value, ie.Min, ie.Max, ie.Unit = conv(ie.Value), conv(ie.Min), conv(ie.Max), unit
	return &flagError{flag: fe.flag, msg: inputErrorText(&ie), input: &ie}
}
