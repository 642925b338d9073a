package main

import (
	"errors"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"runtime"

	"baleassay/data"
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
func openStore(dir string) (*data.Store, error) {
	d, err := storeDir(dir)
	if err != nil {
		return nil, err
	}
	s, err := data.Open(d)
	if errors.Is(err, data.ErrStoreInUse) {
		return nil, err
	}
	if err != nil {
		return nil, fmt.Errorf("cannot open the records store: %w", err)
	}
	return s, nil
}

// openExistingStore is openStore for commands that only read: a folder
// without a store is an error rather than a new empty store.
func openExistingStore(dir string) (*data.Store, error) {
	d, err := storeDir(dir)
	if err != nil {
		return nil, err
	}
	if _, err := os.Stat(filepath.Join(d, data.DBFile)); errors.Is(err, os.ErrNotExist) {
		if dir == demoMarker {
			return nil, fmt.Errorf("no demo store at %s yet: run 'bale demo' first", d)
		}
		return nil, fmt.Errorf("no records store at %s yet: add a site with 'bale sites add', or give --store DIR", d)
	}
	return openStore(dir)
}
