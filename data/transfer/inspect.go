package transfer

import (
	"baleassay/data/record"
	"encoding/hex"
	"fmt"
	"io"
	"strings"
	"time"

	"github.com/fxamacker/cbor/v2"
)

// Inspection is what InspectBundle found in a file, step by step; a step
// that could not be done has its error set and the later ones empty.
type Inspection struct {
	Size        int
	EnvelopeErr error // the COSE_Sign1 envelope
	Signer      Fingerprint
	SignerName  string // trust-list name, "" when not trusted
	Trusted     bool
	SignatureOK bool  // verifies with the key in the file, trusted or not
	SigErr      error // why not
	Header      BundleHeader
	BodyErr     error  // the strict body reader
	Events      int    // events in the body
	Diagnostic  string // payload in CBOR diagnostic notation (RFC 8949 §8)
}

// diagMode prints byte strings in hex and stops at the bounds the
// reader uses, so inspecting a hostile file cannot run away.
var diagMode cbor.DiagMode

func init() {
	var err error
	diagMode, err = cbor.DiagOptions{MaxNestedLevels: 32, MaxArrayElements: MaxBundleEvents, MaxMapPairs: 4096}.DiagMode()
	if err != nil {
		panic(err)
	}
}

// InspectBundle reads a bundle without importing anything: envelope,
// signer, whether the signature verifies, the header and the payload in
// diagnostic notation, each event as an embedded data item
// (<<...>>). It never panics and never modifies raw.
func InspectBundle(raw []byte, trust TrustFunc) Inspection {
	in := Inspection{Size: len(raw)}
	if len(raw) > MaxBundleBytes {
		in.EnvelopeErr = bundleErr(ErrBundleTooLarge, "file", -1, "%d bytes, limit %d", len(raw), MaxBundleBytes)
		return in
	}
	env, err := parseSign1(raw)
	if err != nil {
		in.EnvelopeErr = err
		if d, _, derr := diagMode.DiagnoseFirst(raw); derr == nil {
			in.Diagnostic = d
		}
		return in
	}
	in.Signer = FingerprintOf(env.kid)
	if trust != nil {
		in.SignerName, in.Trusted = trust(in.Signer)
	}
	if in.SigErr = verifySign1(env, env.kid); in.SigErr == nil {
		in.SignatureOK = true
	}
	h, raws, _, err := decodeBody(env.payload, env.payloadOff)
	if err != nil {
		in.BodyErr = err
		if d, derr := diagMode.Diagnose(env.payload); derr == nil {
			in.Diagnostic = d
		} else {
			in.Diagnostic = fmt.Sprintf("(payload is not well-formed CBOR: %v)", derr)
		}
		return in
	}
	in.Header, in.Events = h, len(raws)
	if h.Key != in.Signer {
		in.BodyErr = bundleErr(ErrBundleHeader, "header.key", env.payloadOff, "header names key %s, bundle is signed by %s", h.Key, in.Signer)
	}
	in.Diagnostic = bodyDiagnostic(env.payload, raws)
	return in
}

// bodyDiagnostic writes [header, [[h'id', <<event>>], ...]] one event
// per line.
func bodyDiagnostic(payload []byte, raws [][]byte) string {
	var b strings.Builder
	w := &wire{buf: payload}
	w.head()
	start := w.off
	var item cbor.RawMessage
	rest, _ := headerDec.UnmarshalFirst(payload[start:], &item)
	hd, err := diagMode.Diagnose(payload[start : len(payload)-len(rest)])
	if err != nil {
		hd = "(" + err.Error() + ")"
	}
	b.WriteString("[\n  " + hd + ",\n  [")
	for i, r := range raws {
		id := record.IDOf(r)
		ed, err := diagMode.Diagnose(r)
		if err != nil {
			ed = "h'" + hex.EncodeToString(r) + "'"
		} else {
			ed = "<<" + ed + ">>"
		}
		if i > 0 {
			b.WriteByte(',')
		}
		fmt.Fprintf(&b, "\n    [h'%s', %s]", hex.EncodeToString(id[:]), ed)
	}
	b.WriteString("\n  ]\n]")
	return b.String()
}

// WriteText prints the inspection for people.
func (in Inspection) WriteText(w io.Writer) error {
	p := func(format string, args ...any) { fmt.Fprintf(w, format+"\n", args...) }
	p("size:       %d bytes", in.Size)
	if in.EnvelopeErr != nil {
		p("envelope:   NOT a valid bundle: %v", in.EnvelopeErr)
		if in.Diagnostic != "" {
			p("as CBOR (RFC 8949 §8 diagnostic notation):\n%s", in.Diagnostic)
		}
		return nil
	}
	p("envelope:   COSE_Sign1 (tag 18), algorithm %d (Ed25519)", AlgEd25519)
	trust := "NOT trusted here (bale trust add FILE --name NAME, after checking the fingerprint with the sender)"
	if in.Trusted {
		trust = fmt.Sprintf("trusted as %q", in.SignerName)
	}
	p("signer:     %s, %s", in.Signer, trust)
	if in.SignatureOK {
		p("signature:  verifies")
	} else {
		p("signature:  DOES NOT VERIFY: %v", in.SigErr)
	}
	if in.BodyErr != nil {
		p("body:       refused: %v", in.BodyErr)
	} else {
		h := in.Header
		p("format:     %s version %d", BundleFormat, BundleVersion)
		p("device:     %s", h.Device)
		p("bundle:     %d (part %d of %d)", h.Seq, h.Part, h.Parts)
		if h.Seq > 1 {
			p("previous:   %s", hex.EncodeToString(h.Prev[:]))
		}
		p("clock:      %s+%d", time.UnixMilli(h.WallMs).UTC().Format(time.RFC3339), h.Logical)
		p("events:     %d", in.Events)
	}
	p("payload (RFC 8949 §8 diagnostic notation):\n%s", in.Diagnostic)
	return nil
}
