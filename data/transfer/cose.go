package transfer

import (
	"crypto/ed25519"
	"crypto/sha256"
	"errors"
	"fmt"
	"io"

	"github.com/fxamacker/cbor/v2"
	"github.com/veraison/go-cose"
)

// AlgEd25519 is the COSE algorithm identifier bundles are signed with:
// -19, "Ed25519" (EdDSA with the Ed25519 parameter set, pure mode),
// registered by RFC 9864 (Jones & Steele, "Fully-Specified Algorithms
// for JOSE and COSE", 2025) in the IANA "COSE Algorithms" registry.
// RFC 9864 deprecates the polymorphic identifier -8 ("EdDSA", RFC 9053
// §2.2), which leaves the curve to the key. go-cose v1.3.0 names only
// -8 (its AlgorithmEd25519 is an alias of AlgorithmEdDSA = -8), so the
// signer and verifier below implement go-cose's Signer and Verifier
// interfaces for -19 with crypto/ed25519; go-cose builds the message
// and the Sig_structure (RFC 9052 §4.4). Bundles with -8 or any other
// identifier are refused (ErrUnexpectedAlg).
const AlgEd25519 cose.Algorithm = -19

// COSE header labels used (RFC 9052 §3.1).
const (
	coseLabelAlg = 1
	coseLabelKID = 4
)

// ed25519Signer signs with a device's private key.
type ed25519Signer struct{ priv ed25519.PrivateKey }

func (s ed25519Signer) Algorithm() cose.Algorithm { return AlgEd25519 }

// Sign returns the pure Ed25519 signature (RFC 8032 §5.1.6) of content;
// Ed25519 is deterministic, so rand is not used.
func (s ed25519Signer) Sign(_ io.Reader, content []byte) ([]byte, error) {
	return ed25519.Sign(s.priv, content), nil
}

// ed25519Verifier checks signatures against one public key.
type ed25519Verifier struct{ pub ed25519.PublicKey }

func (v ed25519Verifier) Algorithm() cose.Algorithm { return AlgEd25519 }

func (v ed25519Verifier) Verify(content, sig []byte) error {
	if len(sig) != ed25519.SignatureSize || !ed25519.Verify(v.pub, content, sig) {
		return cose.ErrVerification
	}
	return nil
}

// sealSign1 wraps payload in a tagged COSE_Sign1 message signed by priv.
// The protected header is {1: -19, 4: public key}: the key identifier is
// the signer's raw 32-byte Ed25519 public key, so a receiver can verify
// a bundle from the fingerprint alone; the unprotected header is empty.
func sealSign1(priv ed25519.PrivateKey, payload []byte) ([]byte, error) {
	msg := cose.NewSign1Message()
	msg.Headers.Protected.SetAlgorithm(AlgEd25519)
	msg.Headers.Protected[cose.HeaderLabelKeyID] = []byte(priv.Public().(ed25519.PublicKey))
	msg.Payload = payload
	if err := msg.Sign(nil, nil, ed25519Signer{priv}); err != nil {
		return nil, fmt.Errorf("signing bundle: %w", err)
	}
	return msg.MarshalCBOR()
}

// envelope is a strictly parsed COSE_Sign1 message, its byte strings
// sliced from the file without copying.
type envelope struct {
	protectedItem []byte // the protected header bstr, head included
	kid           []byte
	payload       []byte
	payloadOff    int
	signature     []byte
}

// parseSign1 reads COSE_Sign1_Tagged (RFC 9052 §4.2) strictly: tag 18,
// an array of exactly four items, shortest heads, definite lengths, a
// protected header {1: -19, 4: bstr} in deterministic encoding, an empty
// unprotected header, an attached payload and nothing after the message.
func parseSign1(raw []byte) (envelope, error) {
	var env envelope
	if len(raw) == 0 {
		return env, bundleErr(ErrBundleEmpty, "envelope", 0, "")
	}
	w := &wire{buf: raw, part: "envelope"}
	m, arg, err := w.head()
	if err != nil {
		return env, err
	}
	switch {
	case m == majArray:
		return env, bundleErr(ErrBundleNotCOSE, "envelope", 0, "the COSE_Sign1 tag 18 is missing")
	case m != majTag:
		return env, bundleErr(ErrBundleNotCOSE, "envelope", 0, "file starts with %s", majorName(m))
	case arg != cose.CBORTagSign1Message:
		return env, bundleErr(ErrBundleNotCOSE, "envelope", 0, "outer tag is %d, want 18 (COSE_Sign1)", arg)
	}
	at := w.off
	if n, err := w.expect(majArray, "the COSE_Sign1 array"); err != nil {
		return env, err
	} else if n != 4 {
		return env, bundleErr(ErrBundleMalformed, "envelope", at, "COSE_Sign1 array has %d items, want 4", n)
	}
	pStart := w.off
	prot, pOff, err := w.bytes("the protected header")
	if err != nil {
		return env, err
	}
	env.protectedItem = raw[pStart:w.off]
	uStart := w.off
	um, un, err := w.head()
	if err != nil {
		return env, err
	}
	if um != majMap {
		return env, bundleErr(ErrBundleMalformed, "unprotected header", uStart, "expected a map, found %s", majorName(um))
	}
	if un != 0 {
		var unprot map[int64]cbor.RawMessage
		if _, err := headerDec.UnmarshalFirst(raw[uStart:], &unprot); err != nil {
			return env, cborErr(err, "unprotected header", uStart)
		}
		if _, ok := unprot[coseLabelAlg]; ok && !hasAlg(prot) {
			return env, bundleErr(ErrAlgUnprotected, "unprotected header", uStart, "the algorithm must be in the protected header")
		}
		return env, bundleErr(ErrBadHeaderParam, "unprotected header", uStart, "must be empty, has %d entries", un)
	}
	if env.payload, env.payloadOff, err = w.bytes("the payload"); err != nil {
		return env, err
	}
	if env.signature, _, err = w.bytes("the signature"); err != nil {
		return env, err
	}
	if err := w.end(); err != nil {
		return env, err
	}
	env.kid, err = parseProtected(prot, pOff)
	return env, err
}

// hasAlg reports whether a protected header decodes with an alg label.
func hasAlg(prot []byte) bool {
	var m map[int64]cbor.RawMessage
	if headerDec.Unmarshal(prot, &m) != nil {
		return false
	}
	_, ok := m[coseLabelAlg]
	return ok
}

// parseProtected checks the protected header map and returns the kid.
func parseProtected(prot []byte, off int) ([]byte, error) {
	var m map[int64]cbor.RawMessage
	if len(prot) == 0 {
		return nil, bundleErr(ErrUnexpectedAlg, "protected header", off, "no algorithm: protected header is empty")
	}
	if err := headerDec.Unmarshal(prot, &m); err != nil {
		return nil, cborErr(err, "protected header", off)
	}
	for label := range m {
		if label != coseLabelAlg && label != coseLabelKID {
			return nil, bundleErr(ErrBadHeaderParam, "protected header", off, "label %d is not used by bundles", label)
		}
	}
	algRaw, ok := m[coseLabelAlg]
	if !ok {
		return nil, bundleErr(ErrUnexpectedAlg, "protected header", off, "no algorithm (label 1)")
	}
	var alg int64
	if err := headerDec.Unmarshal(algRaw, &alg); err != nil {
		return nil, bundleErr(ErrUnexpectedAlg, "protected header", off, "algorithm is not an integer")
	}
	if cose.Algorithm(alg) != AlgEd25519 {
		return nil, bundleErr(ErrUnexpectedAlg, "protected header", off, "algorithm %d, want %d (Ed25519)", alg, AlgEd25519)
	}
	var kid []byte
	if err := headerDec.Unmarshal(m[coseLabelKID], &kid); err != nil || len(kid) != ed25519.PublicKeySize {
		return nil, bundleErr(ErrBadHeaderParam, "protected header", off, "key id (label 4) must be a 32-byte Ed25519 public key")
	}
	canon, err := detEnc.Marshal(m)
	if err != nil || string(canon) != string(prot) {
		return nil, bundleErr(ErrBundleNonCanon, "protected header", off, "protected header is not deterministically encoded")
	}
	return kid, nil
}

// verifySign1 checks env's signature with pub through go-cose.
func verifySign1(env envelope, pub ed25519.PublicKey) error {
	msg := cose.Sign1Message{
		Headers: cose.Headers{
			RawProtected: env.protectedItem,
			Protected:    cose.ProtectedHeader{cose.HeaderLabelAlgorithm: AlgEd25519, cose.HeaderLabelKeyID: env.kid},
		},
		Payload:   env.payload,
		Signature: env.signature,
	}
	err := msg.Verify(nil, ed25519Verifier{pub})
	if err == nil {
		return nil
	}
	if errors.Is(err, cose.ErrVerification) || errors.Is(err, cose.ErrEmptySignature) {
		return bundleErr(ErrBadSignature, "signature", -1, "")
	}
	return bundleErr(ErrBadSignature, "signature", -1, "%v", err)
}

// Fingerprint identifies a signing key: SHA-256 of the raw 32-byte
// Ed25519 public key (FIPS 180-4). It is shown as eight groups of eight
// hex digits.
type Fingerprint [32]byte

// FingerprintOf returns the fingerprint of an Ed25519 public key.
func FingerprintOf(pub ed25519.PublicKey) Fingerprint { return sha256.Sum256(pub) }
