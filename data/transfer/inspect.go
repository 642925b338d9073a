package transfer

import (
	"baleassay/data/record"
	"encoding/hex"
	"fmt"
	"strings"

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
	BodyErr     error // the strict body reader
	Events      int   // events in the body
	Proofs      []ProofInfo
	Diagnostic  string // payload in CBOR diagnostic notation (RFC 8949 §8)
	// Named is the payload with every field named as bundle.cddl names it
	// (inspect_names.go); empty when the envelope could not be read.
	Named string
	// Raws and IDs are the events of the body (sub-slices of raw) with
	// their checked ids, for checks the body reader does not make
	// (decoding and validating each event, as an import does); nil when
	// the body was refused before its events were read.
	Raws [][]byte
	IDs  []record.EventID
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
	in.Named = namedBody(env.payload)
	h, proofRaws, raws, ids, err := decodeBody(env.payload, env.payloadOff)
	if err != nil {
		in.BodyErr = err
		if d, derr := diagMode.Diagnose(env.payload); derr == nil {
			in.Diagnostic = d
		} else {
			in.Diagnostic = fmt.Sprintf("(payload is not well-formed CBOR: %v)", derr)
		}
		return in
	}
	in.Header, in.Events, in.Raws, in.IDs = h, len(raws), raws, ids
	in.BodyErr = checkSigner(h, in.Signer, env.payloadOff)
	for _, pr := range proofRaws {
		pi := ProofInfo{Size: len(pr)}
		if p, err := ParseAuthorProof(pr); err != nil {
			pi.Err = err
		} else {
			pi.Device, pi.Key, pi.Lists = p.Device, p.Key, p.Len()
		}
		in.Proofs = append(in.Proofs, pi)
	}
	if in.BodyErr == nil {
		if _, err := checkAuthorship(h.Device, proofRaws, raws, ids); err != nil {
			in.BodyErr = err
		}
	}
	in.Diagnostic = bodyDiagnostic(env.payload, raws)
	return in
}

// ProofInfo is one authorship proof as Inspect found it.
type ProofInfo struct {
	Size   int
	Device record.DeviceID // the author it speaks for
	Key    Fingerprint
	Lists  int   // event ids it lists
	Err    error // why it does not count, if it does not
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
	w.off = len(payload) - len(rest)
	if proofs, err := readProofs(w); err == nil {
		for i, pr := range proofs {
			pd, err := diagMode.Diagnose(pr)
			if err != nil {
				pd = "h'" + hex.EncodeToString(pr) + "'"
			} else {
				pd = "<<" + pd + ">>"
			}
			if i > 0 {
				b.WriteByte(',')
			}
			b.WriteString("\n    " + pd)
		}
	}
	b.WriteString("\n  ],\n  [")
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
