package transfer

import (
	"baleassay/data/store"
	"fmt"
	"os"
)

// OpenStore opens (creating if needed) the records store in dir together
// with the device's signing key, making the key first for a new store so
// that the store's device id is DeviceIDOf(key) from its first record:
// every event it saves is then provably this device's. A store made
// before device ids were bound to keys keeps its id and opens; Export
// refuses it (ErrDeviceKey).
func OpenStore(dir string, o store.Options) (*store.Store, *DeviceKey, error) {
	if err := os.MkdirAll(dir, 0o700); err != nil {
		return nil, nil, fmt.Errorf("create store folder: %w", err)
	}
	key, _, err := LoadOrCreateDeviceKey(dir)
	if err != nil {
		return nil, nil, err
	}
	o.Device = key.DeviceID()
	s, err := store.OpenWith(dir, o)
	if err != nil {
		return nil, nil, err
	}
	return s, key, nil
}
