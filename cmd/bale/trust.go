package main

import (
	"baleassay/data/transfer"
	"encoding/json"
	"fmt"
	"io"
	"os"
)

func init() {
	register(command{
		name:    "trust",
		usage:   "add FILE|FINGERPRINT --name NAME | list [--json] | remove NAME|FINGERPRINT  [--store DIR]",
		summary: "choose whose bundles this device imports (explicit trust list)",
		run:     runTrust,
	})
}

func runTrust(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("trust")
	store := storeFlag(fs)
	name := fs.String("name", "", "name for the trusted key (add)")
	asJSON := fs.Bool("json", false, "print the list as JSON: [{name, fingerprint}] (list)")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) == 0 {
		return usagef("say add, list or remove")
	}
	dir, err := storeDir(*store)
	if err != nil {
		return err
	}
	if err := os.MkdirAll(dir, 0o700); err != nil {
		return err
	}
	tl, err := transfer.LoadTrust(dir)
	if err != nil {
		return err
	}
	switch pos[0] {
	case "add":
		if len(pos) != 2 || *name == "" {
			return usagef("trust add FILE|FINGERPRINT --name NAME")
		}
		fp, from, err := fingerprintArg(pos[1])
		if err != nil {
			return err
		}
		if k, err := transfer.LoadDeviceKey(dir); err == nil && k.Fingerprint() == fp {
			return fmt.Errorf("%s is this device's own key: it is always trusted and needs no entry", fp)
		}
		if err := tl.Add(*name, fp); err != nil {
			return err
		}
		if err := tl.Save(); err != nil {
			return err
		}
		fmt.Fprintf(stdout, "trusted %s as %q (%s)\n", fp, *name, from)
		return nil
	case "list":
		if len(pos) != 1 {
			return usagef("trust list takes no arguments")
		}
		if *asJSON {
			if tl.Entries == nil {
				tl.Entries = []transfer.TrustEntry{}
			}
			return json.NewEncoder(stdout).Encode(tl.Entries)
		}
		if len(tl.Entries) == 0 {
			fmt.Fprintln(stdout, "no trusted keys yet (this device's own key is always trusted); add one with: bale trust add FILE|FINGERPRINT --name NAME")
		}
		for _, e := range tl.Entries {
			fmt.Fprintf(stdout, "%-24s %s\n", e.Name, e.Fingerprint)
		}
		return nil
	case "remove":
		if len(pos) != 2 {
			return usagef("trust remove NAME|FINGERPRINT")
		}
		e, err := tl.Remove(pos[1])
		if err != nil {
			return err
		}
		if err := tl.Save(); err != nil {
			return err
		}
		fmt.Fprintf(stdout, "no longer trusted: %q %s (bundles it signed are refused from now on; events already imported stay)\n", e.Name, e.Fingerprint)
		return nil
	}
	return usagef("unknown trust action %q: say add, list or remove", pos[0])
}

// fingerprintArg reads a fingerprint, a public key file (PEM, from 'bale
// key --public') or a bundle whose signature verifies with its own key.
func fingerprintArg(arg string) (transfer.Fingerprint, string, error) {
	if !statusFile(arg) {
		fp, err := transfer.ParseFingerprint(arg)
		if err != nil {
			return fp, "", fmt.Errorf("%q is neither a file nor a fingerprint: %w", arg, err)
		}
		return fp, "typed fingerprint", nil
	}
	b, err := transfer.ReadBundleFile(arg, 0)
	if err != nil {
		return transfer.Fingerprint{}, "", err
	}
	if pub, err := transfer.ParsePublicKeyPEM(b); err == nil {
		return transfer.FingerprintOf(pub), "public key file " + arg, nil
	}
	fp, err := transfer.BundleSigner(b)
	if err != nil {
		return fp, "", fmt.Errorf("%s is neither a public key file nor a readable bundle: %w", arg, err)
	}
	return fp, "signer of bundle " + arg, nil
}
