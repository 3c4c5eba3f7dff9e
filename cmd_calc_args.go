package main

import (
	"errors"
	"fmt"
	"math"
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
	def   string // default value, "" for none
	bool  bool   // a switch that takes no value
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

// inUserUnits restates a temperature error in °F for an IP user: some measure
// functions take typed temperatures and report their ranges in °C or K.
func inUserUnits(err error, u measure.UnitSystem) error {
	var fe *flagError
	if u != measure.IP || !errors.As(err, &fe) || fe.input == nil {
		return err
	}
	ie := *fe.input
	var toF func(float64) float64
	switch ie.Unit {
	case "°C":
		toF = func(v float64) float64 { return measure.DegC(v).F() }
	case "K":
		toF = func(v float64) float64 { return measure.Kelvin(v).F() }
	default:
		return err
	}
	ie.Value, ie.Min, ie.Max, ie.Unit = toF(ie.Value), toF(ie.Min), toF(ie.Max), "°F"
	return &flagError{flag: fe.flag, msg: inputErrorText(&ie), input: &ie}
}
