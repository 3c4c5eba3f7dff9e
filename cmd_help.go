package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"slices"
)

// errHelp marks usage printed on stdout because the user asked for it
// (-h, --help): Run answers nil, so the exit status is 0.
var errHelp = errors.New("help")

// isHelp reports whether arg asks for help.
func isHelp(arg string) bool {
	return arg == "-h" || arg == "-help" || arg == "--help" || arg == "help"
}

// wantsHelp reports whether a subcommand group's first argument asks for help.
func wantsHelp(args []string) bool { return len(args) > 0 && isHelp(args[0]) }

// parseFlags parses args into fs. -h or --help prints the usage on stdout
// and returns errHelp; a bad flag prints flag's message and the usage on
// stderr and returns errUsage. synopsis follows "usage: fieldtab ", about
// (may be "") is a paragraph under it.
func (m *Main) parseFlags(fs *flag.FlagSet, synopsis, about string, args []string) error {
	fs.Usage = func() {} // printed below, on the stream that fits
	err := fs.Parse(args)
	switch {
	case errors.Is(err, flag.ErrHelp):
		printUsage(m.Stdout, fs, synopsis, about)
		return errHelp
	case err != nil:
		printUsage(m.Stderr, fs, synopsis, about)
		return errUsage
	}
	return nil
}

// parseFlagsInterleaved is parseFlags for commands that take positional
// arguments among their flags; it returns the positional ones.
func (m *Main) parseFlagsInterleaved(fs *flag.FlagSet, synopsis, about string, args []string) ([]string, error) {
	var pos []string
	for {
		if err := m.parseFlags(fs, synopsis, about, args); err != nil {
			return nil, err
		}
		args = fs.Args()
		if len(args) == 0 {
			return pos, nil
		}
		pos = append(pos, args[0])
		args = args[1:]
	}
}

// printUsage writes a command's usage and its flags, spelled with two
// dashes as the rest of fieldtab's help spells them.
func printUsage(w io.Writer, fs *flag.FlagSet, synopsis, about string) {
	fmt.Fprintf(w, "usage: fieldtab %s\n", synopsis)
	if about != "" {
		fmt.Fprintf(w, "\n%s\n", about)
	}
	var names []string
	fs.VisitAll(func(f *flag.Flag) { names = append(names, f.Name) })
	if len(names) == 0 {
		return
	}
	fmt.Fprintln(w, "\nflags:")
	slices.Sort(names)
	for _, n := range names {
		f := fs.Lookup(n)
		arg, usage := flag.UnquoteUsage(f)
		if arg != "" {
			arg = " " + arg
		}
		fmt.Fprintf(w, "  --%s%s\n        %s", f.Name, arg, usage)
		if f.DefValue != "" && f.DefValue != "false" {
			fmt.Fprintf(w, " (default %s)", f.DefValue)
		}
		fmt.Fprintln(w)
	}
}
