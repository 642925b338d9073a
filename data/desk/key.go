package desk

import (
	"fmt"
	"path/filepath"

	"baleassay/data/record"
	"baleassay/data/transfer"
)

// KeyInfo describes this device's signing key.
type KeyInfo struct {
	Device      record.DeviceID
	Fingerprint transfer.Fingerprint
	KeyFile     string
	Created     bool // made by this command (with the store, or now)
	// Bound: the store's device id is the key's, so its records can be
	// proven. False only for a store made before ids were bound to keys.
	Bound bool
}

// Key returns what to show of this device's signing key, making the key
// if the store has none yet. Others trust this device by its
// Fingerprint (read out to them, or from WritePublicKey's file).
func (d *Desk) Key() (KeyInfo, error) {
	info, _, err := d.signingKey()
	return info, err
}

// WritePublicKey writes this device's public key as PEM to path (for
// `bale trust add FILE` on another device), replacing a file of that
// name atomically; the private key never leaves the store.
func (d *Desk) WritePublicKey(path string) error {
	_, k, err := d.signingKey()
	if err != nil {
		return err
	}
	if err := checkOutFolder(filepath.Dir(path)); err != nil {
		return err
	}
	return transfer.WriteFileAtomic(path, k.PublicPEM(), 0o644)
}

// signingKey loads (or makes) this device's signing key.
func (d *Desk) signingKey() (KeyInfo, *transfer.DeviceKey, error) {
	k, created, err := d.key()
	if err != nil {
		return KeyInfo{}, nil, fmt.Errorf("device signing key: %w", err)
	}
	return KeyInfo{Device: d.st.DeviceID(), Fingerprint: k.Fingerprint(), KeyFile: filepath.Join(d.st.Dir(), transfer.KeyFileName),
		Created: created || d.created, Bound: k.DeviceID() == d.st.DeviceID()}, k, nil
}
