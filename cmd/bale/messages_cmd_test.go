package main

// Source: invented stores, sites, bales and pulls, the demo scenario and
// the malformed inputs of testdata/bad and data/transfer's fixtures; the
// rules are the project's (messages speak to the user: no package
// prefixes, plural forms right, numbers without exponents).

import (
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

var (
	// A package's name before a colon, as Go errors are often prefixed.
	packagePrefix = regexp.MustCompile(`\b(data|record|store|transfer|desk|assess|yield|geo|demo|publish|report): `)
	// "1 pulls", "1 events": one of a noun we print, in the plural.
	onePlural = regexp.MustCompile(`(^|[^\w.,+-])1 (?:more |other |new )?([a-z]+s)\b`)
	// A number with an exponent: 1e+06, 2.5e-05, 3E7.
	exponent = regexp.MustCompile(`(^|[^\w.])\d+(\.\d+)?[eE][+-]?\d+\b`)
	// What the CLI writes before a message of its own ("bale assess: ").
	cliPrefix = regexp.MustCompile(`\bbale [a-z]+: `)
	// Hex ids, fingerprints, byte strings and paths, whose digits are no
	// numbers ("3e51" in an id).
	notNumbers = regexp.MustCompile(`h'[0-9a-f]*'|\S*/\S*|\b[0-9a-f-]{8,}\b|[0-9a-f]{4,}…`)
)

// Words ending in s after a "1 " that are no plurals.
var notPlural = map[string]bool{"is": true, "has": true, "was": true, "does": true, "gross": true, "mass": true,
	"glass": true, "pass": true, "plus": true, "minus": true, "less": true, "this": true, "its": true, "as": true}

// badMessages lists what a text breaks of the message rules.
func badMessages(text string) []string {
	var bad []string
	if m := packagePrefix.FindString(cliPrefix.ReplaceAllString(text, "")); m != "" {
		bad = append(bad, fmt.Sprintf("package prefix %q", m))
	}
	for _, m := range onePlural.FindAllStringSubmatch(text, -1) {
		if !notPlural[m[2]] {
			bad = append(bad, fmt.Sprintf("plural after 1: %q", strings.TrimSpace(m[0])))
		}
	}
	if m := exponent.FindString(notNumbers.ReplaceAllString(text, " ")); m != "" {
		bad = append(bad, fmt.Sprintf("exponent %q", strings.TrimSpace(m)))
	}
	return bad
}

// The rules themselves catch what they are for.
func TestMessageRulesCatch(t *testing.T) {
	for _, c := range []struct {
		text string
		bad  bool
	}{
		{"bale import: data: signature does not verify", true},
		{"bale assess: assess: a piece count is negative", true},
		{"signed for 1 events, key 3e51", true},
		{"1 more pulls (2 in all)", true},
		{"bale yield: --bale-kg 1e+09: give the mass", true},
		{"2.5e-05 kg of hazard items", true},
		{"bale assess: file.csv:1:16: unknown column", false},
		{"signed for 1 event, 11 events, 0.1 pulls; 1 gross mass; h'3e51ab'", false},
		{"device 0a3e5100b20b399c, fingerprint 3e51-0a3e-5100", false},
	} {
		if got := len(badMessages(c.text)) > 0; got != c.bad {
			t.Errorf("%q: flagged %v, want %v (%v)", c.text, got, c.bad, badMessages(c.text))
		}
	}
}

// A battery of commands, on their success and failure paths, whose
// every line of output keeps the message rules.
func TestMessagesSpeakToTheUser(t *testing.T) {
	tmp := t.TempDir()
	tablet, lab, demo, stick := filepath.Join(tmp, "tablet"), filepath.Join(tmp, "lab"), filepath.Join(tmp, "demo"), filepath.Join(tmp, "stick")
	os.Mkdir(stick, 0o755)
	file := func(name, body string) string {
		p := filepath.Join(tmp, name)
		if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	onePull := file("one.csv", "pull,pet_clear,pvc,pvc_count,total_count\nP1,20,0.2,1,400\n")
	tiny := file("tiny.csv", "pull,pet_clear,pvc,closures\nA,0.00002,0.00001,0.00001\nB,0.00003,0.00001,0.00002\n")
	goodSpec := file("spec.json", `{"name":"yard-7","limits":[{"item":"pvc","max":0.01}]}`)
	badSpec := file("bad-spec.json", `{"name":"yard-8","limits":[{"item":"pvc","min":80}]}`)
	otherName := file("other-name.json", `{"name":"yard-9","limits":[{"item":"pvc","max":0.01}]}`)
	garbage := file("garbage.bale", "pull,pet_clear\nP1,20\n")
	st := func(dir string, args ...string) []string { return append(args, "--store", dir) }

	type step struct {
		args []string
		code int // -1: any
	}
	steps := []step{
		{[]string{"demo", "--store", demo}, 0},
		{st(tablet, "sites", "add", "--name", "Orrin Bridge Yard", "--lat", "45.112", "--lon", "4.688"), 0},
		{st(tablet, "sites", "add", "--name", "Nowhere", "--lat", "95", "--lon", "4.6"), -1},
		{st(tablet, "sites", "add", "--name", "Nowhere", "--lat", "1e2", "--lon", "4.6"), -1},
		{st(tablet, "sites", "add", "--name", "Orrin Bridge Yard", "--lat", "45.1121", "--lon", "4.6881"), 1},
		{st(tablet, "bales", "add", "--site", "Orrin Bridge Yard", "--kg", "540", "--tag", "VO-1"), 0},
		{st(tablet, "bales", "add", "--site", "Orrin Bridge Yard", "--kg", "9000", "--tag", "VO-2"), 1},
		{st(tablet, "bales", "add", "--site", "Orrin Bridge Yard", "--kg", "540", "--dims", "122x76x152"), 1},
		{st(tablet, "bales", "add", "--site", "Orrin Bridge Yard", "--kg", "540", "--received", "1900-01-01"), -1},
		{st(tablet, "bales", "add", "--site", "No Such Yard", "--kg", "540"), 1},
		{st(tablet, "bales", "add", "--site", "Orrin Bridge Yard", "--kg", "540", "--spec", "no-such-spec"), 1},
		{st(tablet, "bales", "add", "--site", "Orrin Bridge Yard", "--kg", "1000000", "--tag", "VO-3"), 1},
		{st(tablet, "pulls", "add", "VO-1", onePull), 0},
		{st(tablet, "pulls", "add", "VO-1", onePull), 1},
		{st(tablet, "pulls", "add", "VO-1", file("big.csv", "pull,pet_clear\nP9,6000\n")), 1},
		{st(tablet, "pulls", "add", "VO-1", file("tot.csv", "pull,pet_clear,pvc,pvc_count,total_count\nP8,20,0.1,5,1\n")), 1},
		{st(tablet, "pulls", "add", "VO-1", file("comma.csv", "pull,pet_clear\nP7,\"20,5\"\n")), 1},
		{st(tablet, "pulls", "add", "VO-1", file("semi.csv", "pull;pet_clear\nP7;20\n")), 1},
		{st(tablet, "pulls", "add", "VO-1", file("alu.csv", "pull,aluminum\nP7,2\n")), 1},
		{st(tablet, "pulls", "list", "VO-1"), 0},
		{st(tablet, "settings", "add", "spec", goodSpec), 0},
		{st(tablet, "settings", "add", "spec", badSpec), 1},
		{st(tablet, "settings", "add", "spec", garbage), 1},
		{st(tablet, "settings", "add", "spec", otherName, "--name", "yard-7"), -1},
		{st(tablet, "show", "VO-1"), 0},
		{st(tablet, "bales", "list"), 0},
		{st(tablet, "sites", "list"), 0},
		{st(tablet, "find", "orrin"), 0},
		{st(tablet, "assess", "VO-1"), 0},
		{st(tablet, "conflicts"), 0},
		{st(tablet, "key"), 0},
		{st(tablet, "export", "--to", filepath.Join(stick, "tablet.bale")), 0},
		{st(tablet, "export", "--to", filepath.Join(stick, "tablet.bale")), 1},
		{st(tablet, "export", "--to", filepath.Join(tmp, "no-such-folder", "x.bale")), 1},
		{st(demo, "export", "--to", filepath.Join(stick, "demo.bale")), 0},
		{[]string{"assess", "../../testdata/demo-bale-0417.csv", "--bale-kg", "548"}, 0},
		{[]string{"assess", onePull}, 0},
		{[]string{"assess", tiny}, 0},
		{[]string{"assess", "../../testdata/demo-bale-0417.csv", "--bale-kg", "1e9"}, 1},
		{[]string{"assess", "../../testdata/demo-bale-0417.csv", "--confidence", "95"}, 2},
		{[]string{"assess", filepath.Join(tmp, "missing.csv")}, 1},
		{[]string{"yield", "../../testdata/demo-bale-0417.csv", "--bale-kg", "548", "--draws", "300"}, 0},
		{[]string{"yield", tiny, "--bale-kg", "500", "--draws", "300"}, -1},
		{[]string{"yield", "../../testdata/demo-bale-0417.csv", "--bale-kg", "10"}, 1},
		{[]string{"glycolysis", "--pet-kg", "1", "--glycol", "DEG", "--glycol-ratio", "1e-7"}, -1},
		{[]string{"blend", "--polyol", "300:10", "--isocyanate", "MDI", "--index", "1.05"}, -1},
		{[]string{"load", "../../testdata/load/bale-a.csv:540", "../../testdata/load/bale-b.csv:512", "--bales", "24"}, 0},
		{st(lab, "key"), 0},
		{st(lab, "import", filepath.Join(stick, "tablet.bale")), 1},
		{st(lab, "inspect", filepath.Join(stick, "tablet.bale")), 1},
		{st(lab, "inspect", garbage), 1},
		{st(lab, "import", garbage), 1},
		{st(lab, "trust", "add", "0123", "--name", "x", "--yes"), -1},
		{st(lab, "trust", "add", filepath.Join(stick, "tablet.bale"), "--name", "tablet", "--expect", "0000000000000000"), 1},
		{st(lab, "trust", "add", filepath.Join(stick, "tablet.bale"), "--name", "tablet", "--yes"), 0},
		{st(lab, "trust", "add", filepath.Join(stick, "demo.bale"), "--name", "demo", "--yes"), 0},
		{st(lab, "trust", "list"), 0},
		{st(lab, "inspect", filepath.Join(stick, "tablet.bale")), 0},
		{st(lab, "import", filepath.Join(stick, "tablet.bale")), 0},
		{st(lab, "import", filepath.Join(stick, "demo.bale")), 1},
		{st(lab, "inspect", filepath.Join(stick, "demo.bale")), 1},
		{st(lab, "trust", "remove", "nobody"), 1},
		{st(lab, "trust", "remove", "tablet"), 0},
		{st(demo, "bales", "list"), 0},
		{st(demo, "conflicts"), 0},
		{st(demo, "sites", "summary", "within", "45.0", "4.7", "50"), 0},
		{st(tablet, "bales", "edit", "VO-1", "--kg", "1e9"), 1},
		{st(tablet, "bales", "edit", "VO-1", "--kg", "0.5"), 1},
		{st(tablet, "sites", "edit", "Orrin Bridge Yard", "--kind", "castle"), -1},
		{st(tablet, "pulls", "edit", "P1", file("edit.csv", "pull,pet_clear\nP1,1e9\n")), -1},
		{st(tablet, "measured", "add", "--bales", "VO-1", "--flake-kg", "1e9"), 1},
		{st(tablet, "measured", "add", "--bales", "VO-1", "--flake-kg", "15", "--moisture-pct", "80"), 1},
		{st(tablet, "report", "bale", "VO-1", "--html", filepath.Join(tmp, "vo1.html"), "--draws", "200"), 0},
		{st(tablet, "export", "csv", "pulls", filepath.Join(tmp, "pulls.csv")), 0},
		{[]string{"value", "../../testdata/demo-bale-0417.csv", "--bale-kg", "548"}, 0},
		{[]string{"load", onePull + ":500", "--bales", "1"}, -1},
		{[]string{"load", "../../testdata/load/bale-a.csv:540", "--bales", "0"}, -1},
	}
	for _, s := range steps {
		code, out, errs := bale(t, s.args...)
		if s.code >= 0 && code != s.code {
			t.Errorf("bale %s: exit %d, want %d\n%s%s", strings.Join(s.args, " "), code, s.code, out, errs)
		}
		for _, b := range badMessages(out + "\n" + errs) {
			t.Errorf("bale %s: %s\n%s%s", strings.Join(s.args, " "), b, out, errs)
		}
	}
	// A tampered copy of the tablet's bundle, its key trusted again.
	recMust(t, st(lab, "trust", "add", filepath.Join(stick, "tablet.bale"), "--name", "tablet", "--yes")...)
	raw, _ := os.ReadFile(filepath.Join(stick, "tablet.bale"))
	raw[len(raw)-80] ^= 0x01
	tampered := file("copy.bale", string(raw))
	for _, args := range [][]string{st(lab, "import", tampered), st(lab, "inspect", tampered)} {
		code, out, errs := bale(t, args...)
		if code != 1 || !strings.Contains(out+errs, "tampered") {
			t.Errorf("bale %s: exit %d\n%s%s", strings.Join(args, " "), code, out, errs)
		}
		for _, b := range badMessages(out + "\n" + errs) {
			t.Errorf("bale %s: %s", strings.Join(args, " "), b)
		}
	}
}
