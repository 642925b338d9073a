package main

import (
	"baleassay/data/transfer"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
)

func init() {
	register(command{
		name:    "key",
		usage:   "[--store DIR] [--public FILE] [--json]",
		summary: "show this device's id and signing-key fingerprint (the key is made on first use)",
		run:     runKey,
	})
}

// deviceKey loads or creates the signing key in a store folder.
func deviceKey(dir string) (*transfer.DeviceKey, bool, error) {
	k, created, err := transfer.LoadOrCreateDeviceKey(dir)
	if err != nil {
		return nil, false, fmt.Errorf("device signing key: %w", err)
	}
	return k, created, nil
}

func runKey(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("key")
	store := storeFlag(fs)
	public := fs.String("public", "", "also write the public key to `FILE` (PEM), for 'bale trust add FILE' elsewhere")
	asJSON := fs.Bool("json", false, "print JSON: {device, fingerprint, key_file, created}")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 0 {
		return usagef("no arguments expected, got %q", pos)
	}
	dk, err := openDesk(*store, true)
	if err != nil {
		return err
	}
	defer dk.Close()
	s := dk.Store()
	k, created, err := deviceKey(s.Dir())
	if err != nil {
		return err
	}
	if *public != "" {
		if err := transfer.WriteFileAtomic(*public, k.PublicPEM(), 0o644); err != nil {
			return err
		}
	}
	keyFile := filepath.Join(s.Dir(), transfer.KeyFileName)
	if *asJSON {
		return json.NewEncoder(stdout).Encode(map[string]any{
			"device": s.DeviceID().String(), "fingerprint": k.Fingerprint().String(), "key_file": keyFile, "created": created})
	}
	fmt.Fprintf(stdout, "device:      %s\nfingerprint: %s\nkey file:    %s (owner-only; never copy it to another device)\n",
		s.DeviceID(), k.Fingerprint(), keyFile)
	if created {
		fmt.Fprintln(stdout, "A new signing key was made for this device.")
	}
	if *public != "" {
		fmt.Fprintf(stdout, "public key written to %s\n", *public)
	}
	fmt.Fprintln(stdout, "Others trust this device with: bale trust add FINGERPRINT --name NAME (read the fingerprint to them by phone or in person)")
	return nil
}

// statusFile reports whether path names an existing regular file.
func statusFile(path string) bool {
	st, err := os.Stat(path)
	return err == nil && st.Mode().IsRegular()
}
