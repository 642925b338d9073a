package desk

import (
	"fmt"
	"os"
	"path/filepath"
	"time"

	"baleassay/data/demo"
	"baleassay/data/store"
	"baleassay/data/transfer"
)

// GenerateOptions choose a generated season (demo.GenOptions: size,
// devices, seed, weeks, last day, events per bundle) and where it goes:
// into the store folder Dir, or as bundle files into Bundles.
type GenerateOptions struct {
	Events, Devices, Weeks, PerBundle int
	Seed                              uint64
	End                               time.Time
	Dir                               string // a store folder ("" with Bundles)
	Bundles                           string // a folder for the devices' bundle files
	Force                             bool   // replace a demo store already in Dir
}

// GenDefaultEnd is the last day of a generated season when none is given.
var GenDefaultEnd = demo.GenDefaultEnd

// BundleKeysDir is the folder, inside a generated bundle folder, that
// holds the devices' public keys.
const BundleKeysDir = demo.KeysDir

// Generate makes a generated season of about o.Events events: into a
// store of its own (a folder of real records is refused, an existing
// demo store is replaced only with Force), or as the signed bundles its
// devices would send, with their public keys beside them.
func Generate(o GenerateOptions) (demo.GenSummary, error) {
	if (o.Dir == "") == (o.Bundles == "") {
		return demo.GenSummary{}, fmt.Errorf("%w: give a store folder or a bundle folder, one of them", ErrUsage)
	}
	g := demo.GenOptions{Events: o.Events, Devices: o.Devices, Seed: o.Seed, End: o.End, Weeks: o.Weeks, PerBundle: o.PerBundle}
	if o.Bundles != "" {
		return demo.GenerateBundles(o.Bundles, g)
	}
	if err := clearDemoFolder(o.Dir, o.Force); err != nil {
		return demo.GenSummary{}, err
	}
	s, _, err := transfer.OpenStore(o.Dir, store.Options{})
	if err != nil {
		return demo.GenSummary{}, err
	}
	sum, err := demo.GenerateStore(s, g)
	// The invented devices sign their records, so the store can export
	// them like any relayed records (as MakeDemo does).
	for _, d := range sum.Devices {
		if err != nil {
			break
		}
		_, err = transfer.ProveStoredEvents(s, d.Key())
	}
	if cerr := s.Close(); err == nil {
		err = cerr
	}
	return sum, err
}

// clearDemoFolder makes dir ready for a demo store: a folder without a
// store, or with an empty one, is fine; a store of real records is
// refused (the demo never mixes into real data); a demo store is
// removed with force and refused without.
func clearDemoFolder(dir string, force bool) error {
	db := filepath.Join(dir, store.DBFile)
	if _, err := os.Stat(db); err != nil {
		return nil
	}
	s, err := store.OpenReadOnly(dir)
	if err != nil {
		return err
	}
	isDemo, err1 := s.IsDemo()
	n, err2 := s.LastSeq()
	s.Close()
	switch {
	case err1 != nil || err2 != nil:
		return fmt.Errorf("cannot read the store at %s", dir)
	case !isDemo && n > 0:
		return fmt.Errorf("%w: %s holds %s, not a demo store; the demo is never mixed into real data: choose another folder", ErrRealStore, dir, Plural(int(n), "event", "events"))
	case isDemo && !force:
		return fmt.Errorf("%w: at %s; use it, or make it again (force)", ErrDemoExists, dir)
	}
	if err := os.Remove(db); err != nil {
		return fmt.Errorf("cannot replace the demo store: %w", err)
	}
	return nil
}
