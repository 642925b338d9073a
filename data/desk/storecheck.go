package desk

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"time"

	"baleassay/data/store"
)

// CheckStore examines the store at loc without changing it (store.Check:
// every page, every event against its id, every index against the
// events). It returns the report and the folder it looked at.
func CheckStore(loc Location) (store.CheckReport, string, error) {
	dir, err := loc.Resolve()
	if err != nil {
		return store.CheckReport{}, "", err
	}
	if _, err := os.Stat(filepath.Join(dir, store.DBFile)); errors.Is(err, os.ErrNotExist) {
		return store.CheckReport{}, dir, &NoStoreError{Dir: dir, Demo: loc.Demo}
	}
	r, err := store.Check(dir)
	return r, dir, err
}

// RescueStore copies every record of the (damaged) store at loc that
// still verifies into a new store in the folder to (store.Rescue), with
// the other files of the store folder (this device's signing key, the
// trust list), and says what was lost. The damaged store is only read.
func RescueStore(loc Location, to string, now func() time.Time) (store.RescueReport, string, error) {
	dir, err := loc.Resolve()
	if err != nil {
		return store.RescueReport{}, "", err
	}
	if _, err := os.Stat(filepath.Join(dir, store.DBFile)); errors.Is(err, os.ErrNotExist) {
		return store.RescueReport{}, dir, &NoStoreError{Dir: dir, Demo: loc.Demo}
	}
	rep, err := store.Rescue(dir, to, now)
	if err != nil {
		return rep, dir, err
	}
	return rep, dir, copyStoreFiles(dir, to)
}

// copyStoreFiles copies the regular files of a store folder other than
// the records file (signing key, trust list) into another, keeping
// their modes and never replacing a file there.
func copyStoreFiles(from, to string) error {
	ents, err := os.ReadDir(from)
	if err != nil {
		return err
	}
	for _, e := range ents {
		if !e.Type().IsRegular() || e.Name() == store.DBFile {
			continue
		}
		info, err := e.Info()
		if err != nil {
			return err
		}
		if err := copyNew(filepath.Join(from, e.Name()), filepath.Join(to, e.Name()), info.Mode().Perm()); err != nil {
			return fmt.Errorf("the records were rescued, but %s was not copied: %w", e.Name(), err)
		}
	}
	return nil
}

func copyNew(from, to string, perm fs.FileMode) error {
	in, err := os.Open(from)
	if err != nil {
		return err
	}
	defer in.Close()
	out, err := os.OpenFile(to, os.O_WRONLY|os.O_CREATE|os.O_EXCL, perm)
	if errors.Is(err, fs.ErrExist) {
		return nil
	}
	if err != nil {
		return err
	}
	if _, err := io.Copy(out, in); err != nil {
		out.Close()
		return err
	}
	if err := out.Sync(); err != nil {
		out.Close()
		return err
	}
	return out.Close()
}
