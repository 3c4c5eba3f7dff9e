package main

import (
	"bufio"
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"slices"
	"strings"
	"sync"

	"fieldtab/measure"
)

// calcCommand is one `fieldtab calc` subcommand: its flags and the computation
// that turns them into one JSON object.
type calcCommand struct {
	name    string
	summary string
	flags   []flagSpec
	run     func(p *params) (*obj, error)

	once   sync.Once
	byName map[string]flagSpec
}

// specIndex returns the command's flags by name, built once.
func (c *calcCommand) specIndex() map[string]flagSpec {
	c.once.Do(func() { c.byName = specIndex(append(append([]flagSpec{}, commonFlags...), c.flags...)) })
	return c.byName
}

// commonFlags are accepted by every calc subcommand.
var commonFlags = []flagSpec{
	{name: "units", usage: "ip or si", def: "ip"},
	{name: "batch", usage: "read JSON lines of flags on stdin, write one JSON line each", bool: true},
}

func calcCommands() []*calcCommand {
	return []*calcCommand{
		psychroCommand(), airCommand(), waterCommand(), valveCommand(),
		traverseCommand(), outletCommand(), fanCommand(), motorCommand(), expectedCommand(),
	}
}

func (m *Main) runCalc(ctx context.Context, args []string) error {
	cmds := calcCommands()
	if len(args) == 0 {
		m.calcUsage(m.Stderr, cmds, args)
		return errUsage
	}
	if isHelp(args[0]) {
		m.calcUsage(m.Stdout, cmds, args)
		return nil
	}
	// `calc psychro --help` is `calc help psychro`.
	if len(args) > 1 && slices.ContainsFunc(args[1:], func(a string) bool { return isHelp(a) && a != "help" }) {
		m.calcUsage(m.Stdout, cmds, []string{"help", args[0]})
		return nil
	}
	var cmd *calcCommand
	for _, c := range cmds {
		if c.name == args[0] {
			cmd = c
		}
	}
	if cmd == nil {
		fmt.Fprintf(m.Stderr, "fieldtab calc: unknown calculation %q\n", args[0])
		m.calcUsage(m.Stderr, cmds, nil)
		return errUsage
	}
	specs := append(append([]flagSpec{}, commonFlags...), cmd.flags...)
	base, err := parseFlags(specs, args[1:])
	if err != nil {
		fmt.Fprintf(m.Stderr, "fieldtab calc %s: %v\n", cmd.name, err)
		return exitError{code: 2}
	}
	if base["batch"] == "true" {
		delete(base, "batch")
		return m.runCalcBatch(ctx, cmd, specs, base)
	}
	out, err := evalCalc(cmd, base)
	if err != nil {
		fmt.Fprintf(m.Stderr, "fieldtab calc %s: %v\n", cmd.name, err)
		return exitError{code: 1}
	}
	var buf bytes.Buffer
	if err := json.Indent(&buf, appendJSON(nil, out), "", "  "); err != nil {
		return fmt.Errorf("calc %s: formatting output: %w", cmd.name, err)
	}
	buf.WriteByte('\n')
	_, err = m.Stdout.Write(buf.Bytes())
	return err
}

// evalCalc runs cmd on one set of flag values.
func evalCalc(cmd *calcCommand, vals map[string]string) (*obj, error) {
	u, err := measure.ParseUnitSystem(valueOr(vals, "units", "ip"))
	if err != nil {
		return nil, &flagError{flag: "--units", msg: "accepted values are ip and si"}
	}
	out, err := cmd.run(&params{units: u, vals: vals})
	return out, inUserUnits(err, u, cmd.specIndex())
}

func valueOr(m map[string]string, k, def string) string {
	if v, ok := m[k]; ok {
		return v
	}
	return def
}

// maxBatchLine bounds one --batch line; a longer line is reported, not read.
const maxBatchLine = 1 << 20

// runCalcBatch reads one JSON object of flags per line on stdin and writes one
// JSON line per input line, so output line k answers input line k. Flags given
// on the command line apply to every line; a line's own keys override them. A
// bad line (blank, not JSON, too long, or failing its calculation) yields an
// error object and the run goes on; the exit status is 1 if any line failed.
func (m *Main) runCalcBatch(ctx context.Context, cmd *calcCommand, specs []flagSpec, base map[string]string) error {
	byName := specIndex(specs)
	r := bufio.NewReaderSize(m.Stdin, 64*1024)
	w := bufio.NewWriterSize(m.Stdout, 64*1024)
	failed := 0
	vals := make(map[string]string, len(base)+8)
	var in, out []byte
	for n := 1; ; n++ {
		if n%4096 == 0 && ctx.Err() != nil {
			break
		}
		var tooLong bool
		var readErr error
		in, tooLong, readErr = readBatchLine(r, in)
		if readErr != nil && readErr != io.EOF {
			w.Flush()
			return fmt.Errorf("calc %s --batch: reading line %d: %w", cmd.name, n, readErr)
		}
		if readErr == io.EOF && len(in) == 0 && !tooLong {
			break
		}
		var res *obj
		var err error
		switch text := bytes.TrimSpace(in); {
		case tooLong:
			err = &flagError{flag: "(line)", msg: fmt.Sprintf("longer than %d bytes", maxBatchLine)}
		case len(text) == 0:
			err = &flagError{flag: "(line)", msg: "empty line; each line is one JSON object of flags"}
		default:
			clear(vals)
			for k, v := range base {
				vals[k] = v
			}
			if err = batchLineFlags(text, byName, vals); err == nil {
				res, err = evalCalc(cmd, vals)
			}
		}
		if err != nil {
			failed++
			res = batchError(n, err)
		}
		out = appendJSON(out[:0], res)
		out = append(out, '\n')
		if _, err := w.Write(out); err != nil {
			return err
		}
		if readErr == io.EOF {
			break
		}
	}
	if err := w.Flush(); err != nil {
		return err
	}
	if failed > 0 {
		fmt.Fprintf(m.Stderr, "fieldtab calc %s: %d line(s) had errors\n", cmd.name, failed)
		return exitError{code: 1}
	}
	return nil
}

// readBatchLine reads one line into buf (without its newline). A line longer
// than maxBatchLine is consumed and reported as tooLong with no content.
func readBatchLine(r *bufio.Reader, buf []byte) (line []byte, tooLong bool, err error) {
	buf = buf[:0]
	for {
		chunk, err := r.ReadSlice('\n')
		if !tooLong {
			if len(buf)+len(chunk) > maxBatchLine+1 {
				tooLong, buf = true, buf[:0]
			} else {
				buf = append(buf, chunk...)
			}
		}
		if err == bufio.ErrBufferFull {
			continue
		}
		return bytes.TrimSuffix(buf, []byte("\n")), tooLong, err
	}
}

// exclusiveFlags are groups of which a calculation takes one; a --batch line
// that sets one member replaces a member given on the command line.
var exclusiveFlags = [][]string{
	{"rh", "wb", "dp"}, {"enter-rh", "enter-wb", "enter-dp"}, {"leave-rh", "leave-wb", "leave-dp"},
	{"elevation", "pressure"}, {"vp", "velocity"}, {"reading", "velocity"}, {"cv", "kv"},
}

// batchLineFlags decodes one JSON line into flag values over the command
// line's. Numbers keep their text exactly; arrays become comma-separated lists.
func batchLineFlags(text []byte, byName map[string]flagSpec, vals map[string]string) error {
	dec := json.NewDecoder(bytes.NewReader(text))
	dec.UseNumber()
	var raw map[string]any
	if err := dec.Decode(&raw); err != nil {
		return &flagError{flag: "(line)", msg: "not a JSON object of flags: " + err.Error()}
	}
	if dec.More() {
		return &flagError{flag: "(line)", msg: "more than one JSON value on the line"}
	}
	for k := range raw {
		for _, group := range exclusiveFlags {
			if slices.Contains(group, k) {
				for _, other := range group {
					if _, own := raw[other]; !own {
						delete(vals, other)
					}
				}
			}
		}
	}
	for k, v := range raw {
		spec, ok := byName[k]
		if !ok || k == "batch" {
			return &flagError{flag: "--" + k, msg: "unknown flag for this calculation"}
		}
		s, err := batchValue(v)
		if err != nil {
			return &flagError{flag: "--" + k, msg: err.Error()}
		}
		if v == nil {
			delete(vals, k)
			continue
		}
		if spec.bool && s != "true" && s != "false" {
			return &flagError{flag: "--" + k, msg: "takes true or false"}
		}
		vals[k] = s
	}
	return nil
}

func batchValue(v any) (string, error) {
	switch v := v.(type) {
	case nil:
		return "", nil
	case json.Number:
		return v.String(), nil
	case string:
		return v, nil
	case bool:
		if v {
			return "true", nil
		}
		return "false", nil
	case []any:
		parts := make([]string, len(v))
		for i, x := range v {
			n, ok := x.(json.Number)
			if !ok {
				return "", fmt.Errorf("item %d of the list is not a number", i+1)
			}
			parts[i] = n.String()
		}
		return strings.Join(parts, ","), nil
	}
	return "", errors.New("takes a number, a string, true/false or a list of numbers")
}

func batchError(line int, err error) *obj {
	o := newObj(12)
	o.integer("line", line).str("error", err.Error())
	var fe *flagError
	if errors.As(err, &fe) {
		o.str("flag", fe.flag)
	}
	return o
}

func (m *Main) calcUsage(w io.Writer, cmds []*calcCommand, args []string) {
	if len(args) > 1 {
		for _, c := range cmds {
			if c.name == args[1] {
				fmt.Fprintf(w, "usage: fieldtab calc %s [flags]\n%s\n\nflags:\n", c.name, c.summary)
				printFlags(w, append(append([]flagSpec{}, c.flags...), commonFlags...))
				return
			}
		}
	}
	fmt.Fprint(w, "usage: fieldtab calc <calculation> [flags]   (fieldtab calc help <calculation> for its flags)\n\ncalculations:\n")
	for _, c := range cmds {
		fmt.Fprintf(w, "  %-10s %s\n", c.name, c.summary)
	}
}

func printFlags(w io.Writer, specs []flagSpec) {
	for _, s := range specs {
		def := ""
		if s.def != "" {
			def = " (default " + s.def + ")"
		}
		fmt.Fprintf(w, "  --%-16s %s%s\n", s.name, s.usage, def)
	}
}
