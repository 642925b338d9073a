package main

import (
	"baleassay/assess"
	"errors"
	"flag"
	"fmt"
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
	strictFlags(fs)
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

// strictValue wraps a flag's value: a flag given twice is refused (which
// of two values was meant is a guess) unless its help says "repeat for
// each" (--polyol, --stream), and a number must be a plain
// decimal (no hexadecimal floats such as 0x1p4, digit separators such as
// 1_0, Inf or NaN), as in files.
type strictValue struct {
	flag.Value
	name   string
	set    bool
	repeat bool // the flag's help says "repeat for each" (--polyol, --stream)
}

func (v *strictValue) Set(s string) error {
	if v.set && !v.repeat {
		return fmt.Errorf("given twice; give --%s once", v.name)
	}
	v.set = true
	if g, ok := v.Value.(flag.Getter); ok {
		switch g.Get().(type) {
		case float64:
			if _, err := assess.ParseDecimal(s); err != nil {
				return errors.New("give a plain decimal number, e.g. 548 or 0.9")
			}
		case int, int64, uint, uint64:
			if _, err := assess.ParseWhole(s); err != nil {
				return errors.New("give a whole number")
			}
		}
	}
	return v.Value.Set(s)
}

// IsBoolFlag keeps --yes and --json working without a value.
func (v *strictValue) IsBoolFlag() bool {
	b, ok := v.Value.(interface{ IsBoolFlag() bool })
	return ok && b.IsBoolFlag()
}

// Get passes the wrapped value on.
func (v *strictValue) Get() any {
	if g, ok := v.Value.(flag.Getter); ok {
		return g.Get()
	}
	return v.Value.String()
}

// strictFlags wraps every flag of fs in a strictValue, once.
func strictFlags(fs *flag.FlagSet) {
	fs.VisitAll(func(f *flag.Flag) {
		if _, done := f.Value.(*strictValue); !done {
			f.Value = &strictValue{Value: f.Value, name: f.Name, repeat: strings.Contains(f.Usage, "repeat for each")}
		}
	})
}
