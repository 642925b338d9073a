package transfer

import (
	"baleassay/data/internal/testkit"
	"baleassay/data/record"
	"bytes"
	"crypto/ed25519"
	"crypto/rand"
	"encoding/hex"
	"errors"
	"testing"

	"github.com/fxamacker/cbor/v2"
	"github.com/veraison/go-cose"
)

// Source: RFC 8032 §7.1, TEST 1 (Ed25519 secret key, public key and the
// signature of the empty message).
const (
	rfc8032Seed = "9d61b19deffd5a60ba844af492ec2cc44449c5697b326919703bac031cae7f60"
	rfc8032Pub  = "d75a980182b10ab7d54bfed3c964073a0ee172f3daa62325af021a68f707511a"
	rfc8032Sig  = "e5564300c360ac729086e2cc806e828a84877f1eb8e5d974d873e065224901555fb8821590a33bacc61e39701cf9b46bd25bf5f0595bbe24655141438e7a100b"
)

func xHex(t testing.TB, s string) []byte {
	t.Helper()
	b, err := hex.DecodeString(s)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

func TestDeviceKeyRFC8032Vector(t *testing.T) {
	k, err := NewDeviceKeyFromSeed(xHex(t, rfc8032Seed))
	if err != nil {
		t.Fatal(err)
	}
	if got := hex.EncodeToString(k.Public()); got != rfc8032Pub {
		t.Fatalf("public key %s, want %s", got, rfc8032Pub) // Source: RFC 8032 §7.1 TEST 1
	}
	sig, err := ed25519Signer{k.priv}.Sign(nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	if got := hex.EncodeToString(sig); got != rfc8032Sig {
		t.Fatalf("signature %s, want %s", got, rfc8032Sig) // Source: RFC 8032 §7.1 TEST 1
	}
}

// TestSign1MatchesSigStructure rebuilds the RFC 9052 §4.4 Sig_structure by
// hand, independently of go-cose, and checks the signature against it.
func TestSign1MatchesSigStructure(t *testing.T) {
	k, _ := NewDeviceKeyFromSeed(xHex(t, rfc8032Seed))
	payload := []byte("a payload")
	msg, err := sealSign1(k.priv, payload)
	if err != nil {
		t.Fatal(err)
	}
	// Source: RFC 9052 §4.2 (COSE_Sign1 = [protected, unprotected, payload,
	// signature], tag 18) and §4.4 (Sig_structure for "Signature1").
	var raw struct {
		_           struct{} `cbor:",toarray"`
		Protected   []byte
		Unprotected map[int]any
		Payload     []byte
		Signature   []byte
	}
	var tag cbor.RawTag
	if err := cbor.Unmarshal(msg, &tag); err != nil || tag.Number != 18 {
		t.Fatalf("outer tag %d, err %v; want 18", tag.Number, err)
	}
	if err := cbor.Unmarshal(tag.Content, &raw); err != nil {
		t.Fatal(err)
	}
	// Protected header {1: -19, 4: kid}: 0xa2 0x01 0x32 0x04 0x58 0x20 <kid>.
	// Source: RFC 9864 (Ed25519 = -19), RFC 8949 §3 (-19 encodes as 0x32).
	wantProt := append([]byte{0xa2, 0x01, 0x32, 0x04, 0x58, 0x20}, k.Public()...)
	if !bytes.Equal(raw.Protected, wantProt) {
		t.Fatalf("protected header %x, want %x", raw.Protected, wantProt)
	}
	if len(raw.Unprotected) != 0 || !bytes.Equal(raw.Payload, payload) {
		t.Fatalf("unprotected %v payload %q", raw.Unprotected, raw.Payload)
	}
	tbs, err := cbor.Marshal([]any{"Signature1", raw.Protected, []byte{}, payload})
	if err != nil {
		t.Fatal(err)
	}
	if !ed25519.Verify(k.Public(), tbs, raw.Signature) {
		t.Fatal("signature does not verify over the hand-built Sig_structure")
	}
}

func xKey(t testing.TB, b byte) *DeviceKey {
	t.Helper()
	k, err := NewDeviceKeyFromSeed(bytes.Repeat([]byte{b}, 32))
	if err != nil {
		t.Fatal(err)
	}
	return k
}

func xTrustOnly(keys ...*DeviceKey) TrustFunc {
	return func(fp Fingerprint) (string, bool) {
		for i, k := range keys {
			if k.Fingerprint() == fp {
				return string(rune('A' + i)), true
			}
		}
		return "", false
	}
}

func TestSealOpenRoundTrip(t *testing.T) {
	k := xKey(t, 1)
	h := BundleHeader{Device: record.DeviceID{1, 2, 3}, Seq: 2, Prev: [32]byte{9}, WallMs: 1_780_000_000_000, Logical: 3, Part: 1, Parts: 1}
	m := testkit.NewMaker(1, 1)
	m.Dev = k.DeviceID()
	raws := [][]byte{testkit.Enc(t, m.Site(m.Entity(), "First yard", 50, 1)), testkit.Enc(t, m.Site(m.Entity(), "Second yard", 51, 1))}
	b, err := SealBundle(k, h, raws, nil)
	if err != nil {
		t.Fatal(err)
	}
	ob, err := OpenBundle(b, xTrustOnly(k))
	if err != nil {
		t.Fatal(err)
	}
	// SealBundle writes the key's own device, whatever the header said.
	h.Key, h.Count, h.Device = k.Fingerprint(), 2, k.DeviceID()
	if ob.Header != h {
		t.Fatalf("header %+v, want %+v", ob.Header, h)
	}
	if len(ob.Raws) != 2 || !bytes.Equal(ob.Raws[1], raws[1]) {
		t.Fatalf("raws %q", ob.Raws)
	}
	if len(ob.Proofs) != 1 || ob.Proofs[0].Device != k.DeviceID() || ob.Proofs[0].Len() != 2 || !ob.Proofs[0].Has(record.IDOf(raws[0])) {
		t.Fatalf("proofs %+v", ob.Proofs)
	}
}

func TestOpenRefusesSigners(t *testing.T) {
	k, other := xKey(t, 1), xKey(t, 2)
	m := testkit.NewMaker(1, 1)
	m.Dev = k.DeviceID()
	b, err := SealBundle(k, BundleHeader{Seq: 1, WallMs: testkit.XferNow.UnixMilli(), Part: 1, Parts: 1}, [][]byte{testkit.Enc(t, m.Site(m.Entity(), "Yard", 50, 1))}, nil)
	if err != nil {
		t.Fatal(err)
	}
	_, err = OpenBundle(b, xTrustOnly(other))
	var use *UnknownSignerError
	if !errors.As(err, &use) || use.Fingerprint != k.Fingerprint() || !errors.Is(err, ErrUnknownSigner) {
		t.Fatalf("untrusted signer: got %v", err)
	}
	if _, err := OpenBundle(b, nil); !errors.Is(err, ErrUnknownSigner) {
		t.Fatalf("nil trust: got %v, want ErrUnknownSigner", err)
	}
	bad := bytes.Clone(b)
	bad[len(bad)-1] ^= 0x01 // last signature byte
	if _, err := OpenBundle(bad, xTrustOnly(k)); !errors.Is(err, ErrBadSignature) {
		t.Fatalf("flipped signature: got %v, want ErrBadSignature", err)
	}
	// The same body signed by go-cose's own EdDSA (-8) signer is refused:
	// only -19 is accepted. Source: RFC 9864 deprecates -8.
	signer, err := cose.NewSigner(cose.AlgorithmEdDSA, k.priv)
	if err != nil {
		t.Fatal(err)
	}
	hdr := cose.Headers{Protected: cose.ProtectedHeader{
		cose.HeaderLabelAlgorithm: cose.AlgorithmEdDSA, cose.HeaderLabelKeyID: []byte(k.Public())}}
	env, _ := parseSign1(b)
	m8, err := cose.Sign1(rand.Reader, signer, hdr, env.payload, nil)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := OpenBundle(m8, xTrustOnly(k)); !errors.Is(err, ErrUnexpectedAlg) {
		t.Fatalf("alg -8: got %v, want ErrUnexpectedAlg", err)
	}
}

func TestFingerprintText(t *testing.T) {
	k := xKey(t, 7)
	fp := k.Fingerprint()
	s := fp.String()
	if len(s) != 71 { // common practice: 8 groups of 8 hex digits and 7 dashes
		t.Fatalf("fingerprint text %q has %d characters, want 71", s, len(s))
	}
	for _, in := range []string{s, hex.EncodeToString(fp[:]), "  " + s, bytes.NewBufferString(hex.EncodeToString(fp[:])).String()} {
		got, err := ParseFingerprint(in)
		if err != nil || got != fp {
			t.Fatalf("ParseFingerprint(%q) = %v, %v", in, got, err)
		}
	}
	if _, err := ParseFingerprint(s[:70]); !errors.Is(err, ErrFingerprintFormat) {
		t.Fatalf("short fingerprint: %v", err)
	}
	if _, err := ParseFingerprint("zz" + s[2:]); !errors.Is(err, ErrFingerprintFormat) {
		t.Fatalf("non-hex fingerprint: %v", err)
	}
}
