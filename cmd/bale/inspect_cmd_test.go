package main

// Source: invented stores, sites, bales and pulls, the demo scenario and
// the malformed-bundle fixtures of data/transfer; the checks follow the
// documented behaviour (README: moving records between devices; field
// names from data/transfer/bundle.cddl).

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// fixture is a bundle of data/transfer's malformed-file suite.
func fixture(name string) string {
	return filepath.Join("..", "..", "data", "transfer", "testdata", "bundles", name+".bale")
}

// inspect exits 1 exactly when import refuses the file, and prints the
// payload with field names (--raw: plain diagnostic notation).
func TestInspectAgreesWithImport(t *testing.T) {
	tablet, lab := grader(t), t.TempDir()
	file := filepath.Join(t.TempDir(), "north.bale")
	if code, _, e := bale(t, "export", "--to", file, "--store", tablet); code != 0 {
		t.Fatalf("export: %s", e)
	}
	// Untrusted signer: refused by both, with the trust command.
	code, out, e := bale(t, "inspect", file, "--store", lab)
	if code != 1 || !strings.Contains(e, "would be refused") || !strings.Contains(e, "not trusted") || !strings.Contains(e, "bale trust add "+file) {
		t.Fatalf("inspect, untrusted signer: exit %d, stderr %q", code, e)
	}
	for _, want := range []string{`header: {format: "baleassay-bundle", version: 2, device: h'`, "fingerprint: h'", "seq: 1, prev: h''",
		"events: [\n    [id: h'", "event: <<{version: 1, entity: h'", "kind: 1 /site/", `site: {name: "Eastfield yard", lat: 51.5, lon: -0.1}`,
		"clock: [wall_ms: ", "alg: -19 /Ed25519/", "events:     3 (3 sites)", "import:     REFUSED"} {
		if !strings.Contains(out, want) {
			t.Errorf("inspect lacks %q:\n%s", want, out)
		}
	}
	if code, _, _ := bale(t, "import", file, "--store", lab); code != 1 {
		t.Fatalf("import of an untrusted file: exit %d", code)
	}
	code, out, _ = bale(t, "inspect", file, "--store", lab, "--raw")
	if code != 1 || !strings.Contains(out, `{1: "baleassay-bundle", 2: 2, 3: h'`) || strings.Contains(out, "header: {format") {
		t.Fatalf("inspect --raw: exit %d\n%s", code, out)
	}
	// Trusted: taken by both.
	if code, _, e := bale(t, "trust", "add", file, "--name", "tablet north", "--yes", "--store", lab); code != 0 {
		t.Fatalf("trust add: %s", e)
	}
	code, out, e = bale(t, "inspect", file, "--store", lab)
	if code != 0 || !strings.Contains(out, "import:     would be taken") || !strings.Contains(out, "every event decodes") {
		t.Fatalf("inspect, trusted: exit %d %q\n%s", code, e, out)
	}
	// A signed bundle from a trusted key whose event fails validation (a
	// latitude of 91°): inspect refuses it as import does, naming it.
	bad := fixture("event-latitude-91")
	if code, _, e := bale(t, "trust", "add", bad, "--name", "fixture signer", "--yes", "--store", lab); code != 0 {
		t.Fatalf("trust the fixtures' signer: %s", e)
	}
	code, out, e = bale(t, "inspect", bad, "--store", lab)
	if code != 1 || !strings.Contains(out, "REFUSED") || !strings.Contains(e, "latitude") || !strings.Contains(out, "signature:  verifies") {
		t.Fatalf("inspect, invalid event: exit %d %q\n%s", code, e, out)
	}
	if code, out, _ := bale(t, "import", bad, "--store", lab); code != 1 || !strings.Contains(out, "latitude") {
		t.Fatalf("import, invalid event: exit %d\n%s", code, out)
	}
	// A record claiming another device's authorship, tampered bytes,
	// garbage: refused by both.
	raw, _ := os.ReadFile(file)
	raw[len(raw)-80] ^= 0x01
	tampered := filepath.Join(t.TempDir(), "tampered.bale")
	os.WriteFile(tampered, raw, 0o644)
	garbage := filepath.Join(t.TempDir(), "garbage.bale")
	os.WriteFile(garbage, []byte("pull,pet_clear\nP1,20\n"), 0o644)
	for _, c := range []struct{ file, want string }{
		{fixture("event-impersonates-lab-no-proof"), "signed"},
		{tampered, "tampered"},
		{garbage, "COSE_Sign1"},
	} {
		code, _, e := bale(t, "inspect", c.file, "--store", lab)
		icode, _, _ := bale(t, "import", c.file, "--store", lab)
		if code != 1 || icode != 1 || !strings.Contains(e, c.want) {
			t.Errorf("%s: inspect exit %d %q, import exit %d; want both 1, mentioning %q", filepath.Base(c.file), code, e, icode, c.want)
		}
	}
}

// A store of real records refuses the invented demo scenario's records
// unless told to take them; inspect says so the same way.
func TestImportAllowDemo(t *testing.T) {
	demo, lab := demoStore(t), t.TempDir()
	file := filepath.Join(t.TempDir(), "demo.bale")
	if code, _, e := bale(t, "export", "--to", file, "--store", demo); code != 0 {
		t.Fatalf("export of the demo: %s", e)
	}
	if code, _, e := bale(t, "trust", "add", file, "--name", "demo", "--yes", "--store", lab); code != 0 {
		t.Fatalf("trust add: %s", e)
	}
	before := storeHash(t, lab)
	code, out, _ := bale(t, "import", file, "--store", lab)
	if code != 1 || !strings.Contains(out, "of the invented demo scenario") || !strings.Contains(out, "refused") {
		t.Fatalf("import of demo records into a real store: exit %d\n%s", code, out)
	}
	if storeHash(t, lab) != before {
		t.Fatal("a refused import changed the store")
	}
	if code, _, e := bale(t, "inspect", file, "--store", lab); code != 1 || !strings.Contains(e, "demo scenario") {
		t.Fatalf("inspect without --allow-demo: exit %d %q", code, e)
	}
	if code, _, e := bale(t, "inspect", file, "--store", lab, "--allow-demo"); code != 0 {
		t.Fatalf("inspect --allow-demo: exit %d %q", code, e)
	}
	code, out, e := bale(t, "import", file, "--store", lab, "--allow-demo")
	if code != 0 || !strings.Contains(out, "0 refused") {
		t.Fatalf("import --allow-demo: exit %d %q\n%s", code, e, out)
	}
	var sites []siteJSON
	if err := json.Unmarshal([]byte(recMust(t, "sites", "list", "--store", lab, "--json")), &sites); err != nil || len(sites) != 12 {
		t.Fatalf("after --allow-demo the lab has %d sites (%v), want the demo's 12", len(sites), err)
	}
	// The demo store itself takes its own export without the flag.
	if code, _, e := bale(t, "inspect", file, "--store", demo); code != 0 {
		t.Fatalf("inspect against the demo store: exit %d %q", code, e)
	}
}

// Two tablets that give a pull the same label offline make a visible
// conflict at the lab: listed by conflicts, shown on the bale, and both
// pulls counted in the audit.
func TestPullLabelUsedTwiceIsAConflict(t *testing.T) {
	a, b, lab, stick := t.TempDir(), t.TempDir(), t.TempDir(), t.TempDir()
	recMust(t, "sites", "add", "--name", "Kettleby Yard", "--lat", "45.067", "--lon", "4.402", "--store", a)
	recMust(t, "bales", "add", "--site", "Kettleby Yard", "--kg", "540", "--tag", "VO-1", "--store", a)
	recMust(t, "export", "--to", filepath.Join(stick, "a1.bale"), "--since-last", "lab", "--store", a)
	recMust(t, "trust", "add", filepath.Join(stick, "a1.bale"), "--name", "tablet A", "--yes", "--store", b)
	recMust(t, "import", filepath.Join(stick, "a1.bale"), "--store", b)
	recMust(t, "pulls", "add", "VO-1", writeFile(t, "a.csv", "pull,pet_clear,pvc\nP1,20,0.2\nP2,21,0.1\n"), "--store", a)
	recMust(t, "pulls", "add", "VO-1", writeFile(t, "b.csv", "pull,pet_clear,pvc\nP1,19,0.3\n"), "--store", b)
	recMust(t, "export", "--to", filepath.Join(stick, "a2.bale"), "--since-last", "lab", "--store", a)
	recMust(t, "export", "--to", filepath.Join(stick, "b1.bale"), "--since-last", "lab", "--store", b)
	recMust(t, "trust", "add", filepath.Join(stick, "a1.bale"), "--name", "tablet A", "--yes", "--store", lab)
	recMust(t, "trust", "add", filepath.Join(stick, "b1.bale"), "--name", "tablet B", "--yes", "--store", lab)
	recMust(t, "import", stick, "--store", lab)

	out := recMust(t, "conflicts", "--store", lab)
	if !strings.Contains(out, `has 2 pulls labelled "P1" (added on two devices)`) || !strings.Contains(out, "both are counted") || !strings.HasSuffix(out, "1 conflict\n") {
		t.Fatalf("conflicts:\n%s", out)
	}
	var cs []conflictJSON
	if err := json.Unmarshal([]byte(recMust(t, "conflicts", "--store", lab, "--json")), &cs); err != nil || len(cs) != 1 || cs[0].Kind != "label" || cs[0].Label != "P1" || len(cs[0].Pulls) != 2 {
		t.Fatalf("conflicts --json: %+v %v", cs, err)
	}
	if out := recMust(t, "show", "VO-1", "--store", lab); !strings.Contains(out, "audit  3 pulls") || !strings.Contains(out, "CONFLICT: pull labels P1") {
		t.Fatalf("show: the audit is dropped or the conflict not shown:\n%s", out)
	}
	if out := recMust(t, "assess", "VO-1", "--store", lab); !strings.Contains(out, "3 pulls, 60.60 kg sampled") || !strings.Contains(out, "CONFLICT") {
		t.Fatalf("assess:\n%s", out)
	}
	if out := recMust(t, "sites", "summary", "Kettleby Yard", "--store", lab); !strings.Contains(out, "1 with pulls assessed") || !strings.Contains(out, "CONFLICT") {
		t.Fatalf("sites summary:\n%s", out)
	}
}
