package transfer

import (
	"bytes"
	"errors"
	"os"
	"strings"
	"testing"
)

func TestInspectBundle(t *testing.T) {
	g := newFixGen(t)
	good := g.good()
	in := InspectBundle(good, xTrustOnly(g.trusted))
	if in.EnvelopeErr != nil || in.BodyErr != nil || !in.SignatureOK || !in.Trusted || in.Events != 3 || in.Header.Seq != 2 {
		t.Fatalf("good bundle: %+v", in)
	}
	var buf bytes.Buffer
	if err := in.WriteText(&buf); err != nil {
		t.Fatal(err)
	}
	out := buf.String()
	// Source: data/bundle_doc.go (header fields) and RFC 8949 §8
	// (diagnostic notation: "<<...>>" for embedded CBOR, h'..' for bytes).
	for _, want := range []string{"signature:  verifies", `trusted as "A"`, "bundle:     2 (part 1 of 1)", "events:     3",
		`1: "baleassay-bundle"`, "<<{0: 1, 1: h'", g.trusted.Fingerprint().String()} {
		if !strings.Contains(out, want) {
			t.Errorf("inspect output lacks %q:\n%s", want, out)
		}
	}
	// Untrusted signer: still inspected, signature still checked.
	in = InspectBundle(good, xTrustOnly())
	if in.Trusted || !in.SignatureOK || in.Events != 3 {
		t.Fatalf("untrusted: %+v", in)
	}
	// Tampered: the signature does not verify, the body is still shown.
	in = InspectBundle(flip(good, len(good)-100, 0x10), xTrustOnly(g.trusted))
	if in.SignatureOK || !errors.Is(in.SigErr, ErrBadSignature) {
		t.Fatalf("tampered: %+v", in)
	}
	// Not a bundle: the envelope error and what CBOR there is.
	in = InspectBundle(good[1:], nil)
	if !errors.Is(in.EnvelopeErr, ErrBundleNotCOSE) || !strings.HasPrefix(in.Diagnostic, "[h'") {
		t.Fatalf("untagged: %v %q", in.EnvelopeErr, in.Diagnostic)
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
		var buf bytes.Buffer
		if err := in.WriteText(&buf); err != nil || buf.Len() == 0 {
			t.Fatalf("%s: %v", c.name, err)
		}
		if in.EnvelopeErr == nil && in.SigErr == nil && in.BodyErr == nil && c.name != "replayed-old-bundle" && strings.HasPrefix(c.name, "header-") {
			t.Errorf("%s: inspect found nothing wrong with a malformed header", c.name)
		}
	}
}

// TestBundleFixturesDiagnosticGolden keeps a text dump of a valid bundle's
// payload in CBOR diagnostic notation (RFC 8949 §8) beside the fixtures,
// so a change of the format or of the event encoding shows in review
// (rewrite with -update).
func TestBundleFixturesDiagnosticGolden(t *testing.T) {
	g := newFixGen(t)
	in := InspectBundle(g.good(), xTrustOnly(g.trusted))
	if in.BodyErr != nil || !in.SignatureOK {
		t.Fatalf("%+v", in)
	}
	path := fixtureDir + "/valid-bundle-2.diag"
	got := []byte(in.Diagnostic + "\n")
	if *updateFixtures {
		if err := os.WriteFile(path, got, 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run with -update)", err)
	}
	if !bytes.Equal(got, want) {
		os.WriteFile(fixtureDir+"/valid-bundle-2-bad.diag", got, 0o644)
		t.Fatalf("diagnostic dump differs from %s; wrote valid-bundle-2-bad.diag (run with -update if intended)", path)
	}
}
