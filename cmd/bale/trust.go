package main

import (
	"baleassay/data/desk"
	"bufio"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"strings"
	"time"
)

func init() {
	register(command{
		name:    "trust",
		usage:   "add FILE|FINGERPRINT --name NAME [--yes | --expect FINGERPRINT-PREFIX] | list [--json] | remove NAME|FINGERPRINT  [--store DIR]",
		summary: "choose whose bundles this device imports (explicit trust list)",
		run:     runTrust,
	})
}

// trustWait is how long a trust change waits for another bale process
// to release the store: changes are serialised, never lost.
const trustWait = 30 * time.Second

// confirmIn is where trust add reads its answer; tests replace it.
// interactive says whether to ask at all (a terminal).
var (
	confirmIn   io.Reader = os.Stdin
	interactive           = func() bool {
		st, err := os.Stdin.Stat()
		return err == nil && st.Mode()&os.ModeCharDevice != 0
	}
)

func runTrust(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("trust")
	store := storeFlag(fs)
	name := fs.String("name", "", "name for the trusted key (add)")
	yes := fs.Bool("yes", false, "trust without asking, for scripts: check the fingerprint first (add)")
	expect := fs.String("expect", "", "trust only if the key's fingerprint begins with these hex digits, 16 at least, as its owner read them out (add)")
	asJSON := fs.Bool("json", false, "print the list as JSON: [{name, fingerprint, device}] (list)")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) == 0 {
		return usagef("say add, list or remove")
	}
	switch pos[0] {
	case "add":
		if len(pos) != 2 || *name == "" {
			return usagef("trust add FILE|FINGERPRINT --name NAME [--yes | --expect FINGERPRINT-PREFIX]")
		}
		if *yes && *expect != "" {
			return usagef("--yes and --expect exclude each other")
		}
		return trustAdd(*store, pos[1], *name, *yes, *expect, stdout)
	case "list":
		if len(pos) != 1 {
			return usagef("trust list takes no arguments")
		}
		return trustList(*store, *asJSON, stdout)
	case "remove":
		if len(pos) != 2 {
			return usagef("trust remove NAME|FINGERPRINT")
		}
		d, err := desk.Open(location(*store), desk.Options{Create: true, Wait: trustWait})
		if err != nil {
			return err
		}
		defer d.Close()
		e, err := d.TrustRemove(pos[1])
		if err != nil {
			return err
		}
		fmt.Fprintf(stdout, "no longer trusted: %q %s (bundles it signed are refused from now on; events already imported stay)\n", e.Name, e.Fingerprint)
		return nil
	}
	return usagef("unknown trust action %q: say add, list or remove", pos[0])
}

// trustAdd shows the key's fingerprint and device, has it confirmed (a
// prompt on a terminal, --yes, or --expect with the digits its owner
// read out) and trusts exactly the key shown.
func trustAdd(store, arg, name string, yes bool, expect string, stdout io.Writer) error {
	c, err := desk.CandidateOf(arg)
	if err != nil {
		return err
	}
	from := c.Source.String()
	if c.File != "" {
		from += " " + c.File
	}
	fmt.Fprintf(stdout, "key:     %s\ndevice:  %s\nfrom:    %s\n", c.Fingerprint, c.Device, from)
	switch {
	case expect != "":
		if err := c.Matches(expect); err != nil {
			return err
		}
	case yes:
	case !interactive():
		return usagef("not trusted: no terminal to confirm on; check the fingerprint with the key's owner, then give --yes, or --expect with its first 16 or more hex digits")
	default:
		fmt.Fprintf(stdout, "Check this fingerprint with the key's owner by phone or in person.\nTrust it as %q? [y/N] ", name)
		line, _ := bufio.NewReader(io.LimitReader(confirmIn, 256)).ReadString('\n')
		if a := strings.ToLower(strings.TrimSpace(line)); a != "y" && a != "yes" {
			fmt.Fprintln(stdout, "not trusted")
			return nil
		}
	}
	d, err := desk.Open(location(store), desk.Options{Create: true, Wait: trustWait})
	if err != nil {
		return err
	}
	defer d.Close()
	if err := d.TrustKey(c.Fingerprint, name); err != nil {
		return err
	}
	fmt.Fprintf(stdout, "trusted %s as %q (%s)\n", c.Fingerprint, name, from)
	return nil
}

func trustList(store string, asJSON bool, stdout io.Writer) error {
	keys, err := desk.TrustedKeys(location(store))
	if err != nil {
		return err
	}
	if asJSON {
		type entry struct {
			Name        string `json:"name"`
			Fingerprint string `json:"fingerprint"`
			Device      string `json:"device"`
		}
		out := []entry{}
		for _, k := range keys {
			out = append(out, entry{k.Name, k.Fingerprint.String(), k.Device.String()})
		}
		return json.NewEncoder(stdout).Encode(out)
	}
	if len(keys) == 0 {
		fmt.Fprintf(stdout, "no trusted keys yet (%s's own key is always trusted); add one with: bale trust add FILE|FINGERPRINT --name NAME\n", desk.SelfName)
	}
	for _, k := range keys {
		fmt.Fprintf(stdout, "%-24s %s  device %s\n", k.Name, k.Fingerprint, k.Device)
	}
	return nil
}
