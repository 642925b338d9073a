package main

import (
	"baleassay/assess"
	"baleassay/data/desk"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"strings"
	"time"
)

// demoMarker is the value storeFlag puts in the flag for --demo.
const demoMarker = "\x00demo"

// storeFlag registers --store DIR and --demo (use the demo store) on a
// command's flag set. Pass the result to openDesk.
func storeFlag(fs *flag.FlagSet) *string {
	dir := new(string)
	fs.StringVar(dir, "store", "", "records store `folder` (default: the user data folder, see README)")
	fs.BoolFunc("demo", "use the demo store made by 'bale demo'", func(string) error {
		*dir = demoMarker
		return nil
	})
	return dir
}

// location turns a --store value into a desk location.
func location(dir string) desk.Location {
	if dir == demoMarker {
		return desk.Location{Demo: true}
	}
	return desk.Location{Dir: dir}
}

// storeDir resolves a --store value: empty means the default folder.
func storeDir(dir string) (string, error) { return location(dir).Resolve() }

// openDesk opens the store a --store value names; create makes it when
// the folder holds none.
func openDesk(dir string, create bool) (*desk.Desk, error) {
	return desk.Open(location(dir), desk.Options{Create: create})
}

// parseWithNumbers is parseArgs for commands whose positional arguments
// may be negative numbers ("bale sites near -33.92 18.42"): an argument
// that parses as a number is positional unless it is the value of the
// flag before it.
func parseWithNumbers(fs *flag.FlagSet, args []string) ([]string, error) {
	var flagArgs, pos []string
	for i := 0; i < len(args); i++ {
		a := args[i]
		if a == "--" {
			pos = append(pos, args[i+1:]...)
			break
		}
		if !strings.HasPrefix(a, "-") || a == "-" || recIsNumber(a) {
			pos = append(pos, a)
			continue
		}
		flagArgs = append(flagArgs, a)
		name := strings.TrimLeft(a, "-")
		if strings.Contains(name, "=") {
			continue
		}
		if f := fs.Lookup(name); f != nil && !recIsBoolFlag(f) && i+1 < len(args) {
			flagArgs = append(flagArgs, args[i+1])
			i++
		}
	}
	strictFlags(fs)
	if err := fs.Parse(flagArgs); err != nil {
		return nil, usagef("%v", err)
	}
	return append(pos, fs.Args()...), nil
}

func recIsNumber(s string) bool {
	_, err := assess.ParseDecimal(s)
	return err == nil
}

func recIsBoolFlag(f *flag.Flag) bool {
	b, ok := f.Value.(interface{ IsBoolFlag() bool })
	return ok && b.IsBoolFlag()
}

// recFloats reads positional numbers, naming the one that is wrong.
func recFloats(names []string, args []string) ([]float64, error) {
	out := make([]float64, len(args))
	for i, a := range args {
		x, err := assess.ParseDecimal(a)
		if err != nil {
			return nil, usagef("%s %q is not a plain decimal number", names[i], a)
		}
		out[i] = x
	}
	return out, nil
}

func recJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}

// confirmHint is added to a refusal that --yes would accept.
func withHint(err error) error {
	var ce *desk.ConfirmError
	if errors.As(err, &ce) {
		var b strings.Builder
		b.WriteString("not saved, please check:")
		for _, c := range ce.Checks {
			fmt.Fprintf(&b, "\n  - %s", c.Message)
		}
		b.WriteString("\nif the values are right, run the command again with --yes")
		return errors.New(b.String())
	}
	return err
}

func recTime(ms int64) string {
	if ms == 0 {
		return ""
	}
	return time.UnixMilli(ms).UTC().Format(time.RFC3339)
}

// openForArgs parses a record command's arguments, checks that exactly
// want positional ones came (wrong is the usage message for another
// count; with want 0 it follows "unexpected argument"), and opens the
// existing store that dir names.
func openForArgs(fs *flag.FlagSet, dir *string, args []string, want int, wrong string) ([]string, *desk.Desk, error) {
	pos, err := parseArgs(fs, args)
	if err != nil {
		return nil, nil, err
	}
	if len(pos) != want {
		if want == 0 {
			return nil, nil, usagef("unexpected argument %q%s", pos[0], wrong)
		}
		return nil, nil, usagef("%s", wrong)
	}
	d, err := openDesk(*dir, false)
	if err != nil {
		return nil, nil, err
	}
	return pos, d, nil
}
