package transfer

import (
	"baleassay/data/record"
	"bytes"
	"errors"
	"os"
	"regexp"
	"strings"
	"testing"

	"github.com/fxamacker/cbor/v2"
)

func TestInspectBundle(t *testing.T) {
	g := newFixGen(t)
	good := g.good()
	in := InspectBundle(good, xTrustOnly(g.trusted))
	if in.EnvelopeErr != nil || in.BodyErr != nil || !in.SignatureOK || !in.Trusted || in.SignerName != "A" || in.Events != 3 || in.Header.Seq != 2 {
		t.Fatalf("good bundle: %+v", in)
	}
	if len(in.Raws) != 3 || len(in.IDs) != 3 || record.IDOf(in.Raws[1]) != in.IDs[1] {
		t.Fatalf("events handed on: %d raws, %d ids", len(in.Raws), len(in.IDs))
	}
	// Source: RFC 8949 §8 (diagnostic notation: "<<...>>" for embedded
	// CBOR, h'..' for bytes); bundle.cddl for the field names.
	for _, want := range []string{`1: "baleassay-bundle"`, "<<{0: 1, 1: h'"} {
		if !strings.Contains(in.Diagnostic, want) {
			t.Errorf("diagnostic lacks %q:\n%s", want, in.Diagnostic)
		}
	}
	for _, want := range []string{`header: {format: "baleassay-bundle", version: 2, device: h'`, "seq: 2, prev: h'",
		"events: [\n    [id: h'", "event: <<{version: 1, entity: h'", "kind: 1 /site/", "clock: [wall_ms: ", "Z/, logical: ",
		"site: {name: ", "payload: <<{format: \"baleassay-authorship\", version: 1, device: h'", "alg: -19 /Ed25519/"} {
		if !strings.Contains(in.Named, want) {
			t.Errorf("named rendering lacks %q:\n%s", want, in.Named)
		}
	}
	if regexp.MustCompile(`[{,] \d+: `).MatchString(in.Named) {
		t.Errorf("named rendering leaves an integer key unnamed:\n%s", in.Named)
	}
	// Untrusted signer: still inspected, signature still checked.
	in = InspectBundle(good, xTrustOnly())
	if in.Trusted || !in.SignatureOK || in.Events != 3 {
		t.Fatalf("untrusted: %+v", in)
	}
	// Tampered: the signature does not verify, the body is still shown.
	in = InspectBundle(flip(good, len(good)-100, 0x10), xTrustOnly(g.trusted))
	if in.SignatureOK || !errors.Is(in.SigErr, ErrBadSignature) || in.Named == "" {
		t.Fatalf("tampered: %+v", in)
	}
	// Not a bundle: the envelope error and what CBOR there is.
	in = InspectBundle(good[1:], nil)
	if !errors.Is(in.EnvelopeErr, ErrBundleNotCOSE) || !strings.HasPrefix(in.Diagnostic, "[h'") || in.Raws != nil {
		t.Fatalf("untagged: %v %q", in.EnvelopeErr, in.Diagnostic)
	}
}

// The named rendering writes floats without an exponent and names
// values it knows: kinds, times, methods.
func TestNamedRenderingValues(t *testing.T) {
	ev := map[uint64]any{0: uint64(1), 2: uint64(3), 4: []any{uint64(1767225600000), uint64(0)},
		9:  map[any]any{uint64(4): map[any]any{"pvc": 0.00001, "pet_clear": 1e6}, uint64(7): uint64(611), uint64(99): "x"},
		10: map[any]any{uint64(3): []byte("{\"name\":\"it's\"}\x1b")}}
	raw, err := cbor.Marshal(ev)
	if err != nil {
		t.Fatal(err)
	}
	var v any
	if err := namedMode.Unmarshal(raw, &v); err != nil {
		t.Fatal(err)
	}
	var b strings.Builder
	renderNamed(&b, v, eventNode)
	// 1767225600000 ms is 2026-01-01T00:00:00Z (Unix time, computed).
	want := `{version: 1, kind: 3 /pull/, clock: [wall_ms: 1767225600000 /2026-01-01T00:00:00.000Z/, logical: 0], ` +
		`pull: {kg: {"pet_clear": 1000000.0, "pvc": 0.00001}, total_count: 611, 99: "x"}, setting: {body: '{"name":"it\'s"}\x1b'}}`
	if b.String() != want {
		t.Fatalf("got  %s\nwant %s", b.String(), want)
	}
}

// TestInspectFixturesNeverPanic inspects every malformed fixture.
func TestInspectFixturesNeverPanic(t *testing.T) {
	for _, c := range fixCases() {
		raw, err := os.ReadFile(fixtureDir + "/" + c.name + BundleExt)
		if err != nil {
			t.Fatal(err)
		}
		in := InspectBundle(raw, nil)
		if in.Diagnostic == "" && in.Named == "" && in.EnvelopeErr == nil {
			t.Fatalf("%s: nothing to show", c.name)
		}
		if in.EnvelopeErr == nil && in.SigErr == nil && in.BodyErr == nil && c.name != "replayed-old-bundle" && strings.HasPrefix(c.name, "header-") {
			t.Errorf("%s: inspect found nothing wrong with a malformed header", c.name)
		}
	}
}

// TestBundleFixturesDiagnosticGolden keeps text dumps of a valid bundle's
// payload in CBOR diagnostic notation (RFC 8949 §8), plain (.diag) and
// with field names (.named), beside the fixtures,
// so a change of the format or of the event encoding shows in review
// (rewrite with -update).
func TestBundleFixturesDiagnosticGolden(t *testing.T) {
	g := newFixGen(t)
	in := InspectBundle(g.good(), xTrustOnly(g.trusted))
	if in.BodyErr != nil || !in.SignatureOK {
		t.Fatalf("%+v", in)
	}
	for _, f := range []struct{ ext, text string }{{".diag", in.Diagnostic}, {".named", in.Named}} {
		path := fixtureDir + "/valid-bundle-2" + f.ext
		got := []byte(f.text + "\n")
		if *updateFixtures {
			if err := os.WriteFile(path, got, 0o644); err != nil {
				t.Fatal(err)
			}
			continue
		}
		want, err := os.ReadFile(path)
		if err != nil {
			t.Fatalf("%v (run with -update)", err)
		}
		if !bytes.Equal(got, want) {
			os.WriteFile(fixtureDir+"/valid-bundle-2-bad"+f.ext, got, 0o644)
			t.Fatalf("dump differs from %s; wrote valid-bundle-2-bad%s (run with -update if intended)", path, f.ext)
		}
	}
}
