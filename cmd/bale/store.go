package main

import (
	"baleassay/data/record"
	"baleassay/data/store"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"time"
)

// Where the stores live. A user's records and the demo scenario are kept
// in separate folders so that the demo never mixes into real data.
//
//	$XDG_DATA_HOME/baleassay/{store,demo}        when XDG_DATA_HOME is set
//	~/.local/share/baleassay/{store,demo}        otherwise on Linux and BSD
//	os.UserConfigDir()/baleassay/{store,demo}    on macOS and Windows
//
// $BALEASSAY_STORE, when set, replaces the default store folder (not the
// demo one). --store DIR on any command overrides both.

const appDir = "baleassay"

func dataHome() (string, error) {
	if x := os.Getenv("XDG_DATA_HOME"); x != "" && filepath.IsAbs(x) {
		return filepath.Join(x, appDir), nil
	}
	switch runtime.GOOS {
	case "darwin", "windows", "ios", "android", "plan9":
		d, err := os.UserConfigDir()
		if err != nil {
			return "", fmt.Errorf("no user data folder (%v): give --store DIR", err)
		}
		return filepath.Join(d, appDir), nil
	}
	h, err := os.UserHomeDir()
	if err != nil {
		return "", fmt.Errorf("no home folder (%v): give --store DIR", err)
	}
	return filepath.Join(h, ".local", "share", appDir), nil
}

// defaultStoreDir is the user's store folder.
func defaultStoreDir() (string, error) {
	if d := os.Getenv("BALEASSAY_STORE"); d != "" {
		return d, nil
	}
	h, err := dataHome()
	if err != nil {
		return "", err
	}
	return filepath.Join(h, "store"), nil
}

// demoStoreDir is the demo scenario's own store folder.
func demoStoreDir() (string, error) {
	h, err := dataHome()
	if err != nil {
		return "", err
	}
	return filepath.Join(h, "demo"), nil
}

// demoMarker is the value storeFlag puts in the flag for --demo.
const demoMarker = "\x00demo"

// storeFlag registers --store DIR and --demo (use the demo store) on a
// command's flag set. Pass the result to openStore.
func storeFlag(fs *flag.FlagSet) *string {
	dir := new(string)
	fs.StringVar(dir, "store", "", "records store `folder` (default: the user data folder, see README)")
	fs.BoolFunc("demo", "use the demo store made by 'bale demo'", func(string) error {
		*dir = demoMarker
		return nil
	})
	return dir
}

// storeDir resolves a --store value: empty means the default folder.
func storeDir(dir string) (string, error) {
	switch dir {
	case "":
		return defaultStoreDir()
	case demoMarker:
		return demoStoreDir()
	}
	return dir, nil
}

// openStore opens the store named by a --store value ("" for the default
// folder), creating it when new.
func openStore(dir string) (*store.Store, error) {
	d, err := storeDir(dir)
	if err != nil {
		return nil, err
	}
	s, err := store.Open(d)
	if errors.Is(err, store.ErrStoreInUse) {
		return nil, err
	}
	if err != nil {
		return nil, fmt.Errorf("cannot open the records store: %w", err)
	}
	return s, nil
}

// openExistingStore is openStore for commands that only read: a folder
// without a store is an error rather than a new empty store.
func openExistingStore(dir string) (*store.Store, error) {
	d, err := storeDir(dir)
	if err != nil {
		return nil, err
	}
	if _, err := os.Stat(filepath.Join(d, store.DBFile)); errors.Is(err, os.ErrNotExist) {
		if dir == demoMarker {
			return nil, fmt.Errorf("no demo store at %s yet: run 'bale demo' first", d)
		}
		return nil, fmt.Errorf("no records store at %s yet: add a site with 'bale sites add', or give --store DIR", d)
	}
	return openStore(dir)
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
	if err := fs.Parse(flagArgs); err != nil {
		return nil, usagef("%v", err)
	}
	return append(pos, fs.Args()...), nil
}

func recIsNumber(s string) bool {
	_, err := strconv.ParseFloat(s, 64)
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
		x, err := strconv.ParseFloat(a, 64)
		if err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
			return nil, usagef("%s %q is not a number", names[i], a)
		}
		out[i] = x
	}
	return out, nil
}

// recDate reads 2006-01-02 (UTC midnight) or RFC 3339.
func recDate(flagName, s string) (time.Time, error) {
	if s == "" {
		return time.Time{}, nil
	}
	if t, err := time.Parse("2006-01-02", s); err == nil {
		return t, nil
	}
	if t, err := time.Parse(time.RFC3339, s); err == nil {
		return t, nil
	}
	return time.Time{}, usagef("%s %q: give a date as 2026-03-02 or 2026-03-02T14:30:00Z", flagName, s)
}

func recJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}

// recSaveError turns a refused save into a message that says what to do.
func recSaveError(err error) error {
	var we *store.WarningsError
	if errors.As(err, &we) {
		var b strings.Builder
		b.WriteString("not saved, please check:")
		for _, w := range we.Warnings {
			fmt.Fprintf(&b, "\n  - %s", w)
		}
		b.WriteString("\nif the values are right, run the command again with --yes")
		return errors.New(b.String())
	}
	var fe *record.FieldError
	if errors.As(err, &fe) {
		return fmt.Errorf("not saved: %v", fe)
	}
	return fmt.Errorf("not saved: %w", err)
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
func openForArgs(fs *flag.FlagSet, dir *string, args []string, want int, wrong string) ([]string, *store.Store, error) {
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
	s, err := openExistingStore(*dir)
	if err != nil {
		return nil, nil, err
	}
	return pos, s, nil
}
