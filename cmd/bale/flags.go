package main

import (
	"flag"
	"io"
	"slices"
	"strings"
)

// newFlags returns a flag set for a sub-command that reports errors as
// values and prints nothing by itself.
func newFlags(name string) *flag.FlagSet {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	return fs
}

// parseArgs parses flags that may come before, between or after the
// positional arguments ("bale assess pulls.csv --bale-kg 540") and
// returns the positional ones. "--" ends flag parsing. Errors are usage
// errors.
func parseArgs(fs *flag.FlagSet, args []string) ([]string, error) {
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			return nil, usageError{err.Error()}
		}
		rest := fs.Args()
		if len(rest) == 0 {
			return pos, nil
		}
		if len(args) > 0 && len(rest) < len(args) && args[len(args)-len(rest)-1] == "--" {
			return append(pos, rest...), nil
		}
		pos = append(pos, rest[0])
		args = rest[1:]
	}
}

// subcommand is one word of a command with sub-commands ("bale sites add").
type subcommand struct {
	names []string // the word, or several words that share a handler
	run   func(sub string, args []string, stdout io.Writer) error
}

// dispatch runs the sub-command that args[0] names, or returns a usage
// error that lists the choices.
func dispatch(args []string, stdout io.Writer, subs ...subcommand) error {
	var all []string
	for _, s := range subs {
		all = append(all, s.names...)
	}
	choices := strings.Join(all[:len(all)-1], ", ") + " or " + all[len(all)-1]
	if len(args) == 0 {
		return usagef("give a sub-command: %s", choices)
	}
	for _, s := range subs {
		if slices.Contains(s.names, args[0]) {
			return s.run(args[0], args[1:], stdout)
		}
	}
	return usagef("unknown sub-command %q: use %s", args[0], choices)
}

// sub adapts a handler that needs no sub-command word.
func sub(name string, run func(args []string, stdout io.Writer) error) subcommand {
	return subcommand{[]string{name}, func(_ string, args []string, stdout io.Writer) error { return run(args, stdout) }}
}
