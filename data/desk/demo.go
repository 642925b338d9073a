package desk

import (
	"crypto/sha256"
	"fmt"
	"time"

	"baleassay/data/demo"
	"baleassay/data/record"
	"baleassay/data/store"
	"baleassay/data/transfer"
)

// DemoOptions tune MakeDemo.
type DemoOptions struct {
	Dir   string // "" for the demo folder
	Weeks int    // 1 to 52
	Seed  uint64
	Force bool // replace an existing demo store
	// End is the scenario's last day (today when zero); tests and
	// reference images fix it.
	End time.Time
}

// MakeDemo writes the invented demo scenario into a store of its own. A
// folder holding real records is refused (the demo never mixes into real
// data); an existing demo store is replaced only with Force.
func MakeDemo(o DemoOptions) (string, demo.DemoSummary, error) {
	var sum demo.DemoSummary
	if o.Weeks < 1 || o.Weeks > 52 {
		return "", sum, fmt.Errorf("%w: %d weeks: give 1 to 52", ErrUsage, o.Weeks)
	}
	dir := o.Dir
	if dir == "" {
		var err error
		if dir, err = DemoDir(); err != nil {
			return "", sum, err
		}
	}
	if err := clearDemoFolder(dir, o.Force); err != nil {
		return dir, sum, err
	}
	s, _, err := transfer.OpenStore(dir, store.Options{})
	if err != nil {
		return dir, sum, err
	}
	defer s.Close()
	keys := map[string]*transfer.DeviceKey{}
	for _, name := range []string{"yard tablet", "lab laptop"} {
		keys[name] = demoKey(name, o.Seed)
	}
	sum, err = demo.WriteDemo(s, demo.DemoOptions{Weeks: o.Weeks, Seed: o.Seed, End: o.End,
		Device: func(name string) record.DeviceID { return demoKey(name, o.Seed).DeviceID() }})
	if err != nil {
		return dir, sum, fmt.Errorf("the demo scenario was not written: %w", err)
	}
	// The invented devices sign their records, so the demo store can
	// export them like any relayed records.
	for _, k := range keys {
		if _, err := transfer.ProveStoredEvents(s, k); err != nil {
			return dir, sum, fmt.Errorf("the demo scenario's authorship proofs were not written: %w", err)
		}
	}
	return dir, sum, nil
}

// demoKey is the invented signing key of a demo device: its seed is
// SHA-256 of the device's name and the scenario's seed. Only demo records
// are ever signed with it.
func demoKey(name string, seed uint64) *transfer.DeviceKey {
	h := sha256.Sum256([]byte(fmt.Sprintf("baleassay demo key %s %d", name, seed)))
	k, err := transfer.NewDeviceKeyFromSeed(h[:])
	if err != nil {
		panic(err) // a 32-byte seed always makes a key
	}
	return k
}
