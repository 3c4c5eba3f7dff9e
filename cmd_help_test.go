package main

import (
	"os/exec"
	"strings"
	"testing"
)

// Every command's help goes to stdout with exit status 0, naming the command;
// a bad flag still goes to stderr with status 2.
func TestHelp(t *testing.T) {
	for _, args := range [][]string{
		{"help"}, {"--help"}, {"-h"},
		{"serve", "--help"}, {"serve", "-h"}, {"demo", "--help"},
		{"job", "--help"}, {"job", "new", "--help"}, {"job", "list", "--help"},
		{"join-code", "--help"},
		{"device", "--help"}, {"device", "add", "--help"},
		{"backup", "--help"},
		{"calc", "--help"}, {"calc", "psychro", "--help"}, {"calc", "help", "air"},
		{"report", "--help"}, {"report", "--job", "x", "--help"}, {"verify", "--help"},
		{"signer", "--help"}, {"signer", "init", "--help"}, {"signer", "import", "--help"}, {"signer", "show", "--help"},
	} {
		code, out, errOut := runCmd(t, args...)
		name := "fieldtab"
		for _, a := range args {
			if strings.HasPrefix(a, "-") || a == "help" {
				break
			}
			name += " " + a
		}
		if name == "fieldtab" {
			name = "fieldtab <command>"
		}
		if code != 0 || errOut != "" || !strings.Contains(out, "usage") || !strings.Contains(out, name) {
			t.Errorf("%s: exit %d, stderr %q, stdout:\n%s\nwant usage naming %q on stdout, exit 0", strings.Join(args, " "), code, errOut, out, name)
		}
	}
	for _, args := range [][]string{
		{}, {"nonesuch"}, {"serve", "--bogus"}, {"job"}, {"job", "new", "--nope"}, {"job", "old"},
		{"join-code", "--colour", "red"}, {"signer", "init", "--zzz"}, {"device", "add", "--zzz"},
		{"calc", "psychro", "--zzz", "1"}, {"verify", "--zzz"}, {"report", "--zzz"}, {"backup"},
	} {
		code, out, errOut := runCmd(t, args...)
		if code != 2 || out != "" || errOut == "" {
			t.Errorf("%q: exit %d, stdout %q, stderr %q; want the usage error on stderr, exit 2", args, code, out, errOut)
		}
	}
}

// The built binary answers `demo --help` on stdout with status 0.
func TestHelpBinary(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the binary")
	}
	bin := buildBinary(t)
	cmd := exec.Command(bin, "demo", "--help")
	var stderr strings.Builder
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil || stderr.Len() != 0 || !strings.Contains(string(out), "usage: fieldtab demo") {
		t.Errorf("fieldtab demo --help: %v, stderr %q, stdout:\n%s", err, stderr.String(), out)
	}
}
