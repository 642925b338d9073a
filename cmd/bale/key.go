package main

import (
	"encoding/json"
	"fmt"
	"io"
)

func init() {
	register(command{
		name:    "key",
		usage:   "[--store DIR] [--public FILE] [--json]",
		summary: "show this device's id and signing-key fingerprint (the key is made with the store)",
		run:     runKey,
	})
}

func runKey(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("key")
	store := storeFlag(fs)
	public := fs.String("public", "", "also write the public key to `FILE` (PEM), for 'bale trust add FILE' elsewhere")
	asJSON := fs.Bool("json", false, "print JSON: {device, fingerprint, key_file, created, bound}")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 0 {
		return usagef("no arguments expected, got %q", pos)
	}
	d, err := openDesk(*store, true)
	if err != nil {
		return err
	}
	defer d.Close()
	info, err := d.Key()
	if err != nil {
		return err
	}
	if *public != "" {
		if err := d.WritePublicKey(*public); err != nil {
			return err
		}
	}
	if *asJSON {
		return json.NewEncoder(stdout).Encode(map[string]any{"device": info.Device.String(), "fingerprint": info.Fingerprint.String(),
			"key_file": info.KeyFile, "created": info.Created, "bound": info.Bound})
	}
	fmt.Fprintf(stdout, "device:      %s\nfingerprint: %s\nkey file:    %s (owner-only; never copy it to another device)\n",
		info.Device, info.Fingerprint, info.KeyFile)
	if info.Created {
		fmt.Fprintln(stdout, "A new signing key was made for this device.")
	}
	if !info.Bound {
		fmt.Fprintln(stdout, "WARNING: this store was made by an older baleassay: its device id is not its key's, so its records cannot be proven and it cannot export. Start a new store for new records.")
	}
	if *public != "" {
		fmt.Fprintf(stdout, "public key written to %s\n", *public)
	}
	fmt.Fprintln(stdout, "Others trust this device with: bale trust add FINGERPRINT --name NAME (read the fingerprint to them by phone or in person)")
	return nil
}
