package transfer

import (
	"baleassay/data/internal/testkit"
	"bytes"
	"crypto/ed25519"
	"fmt"
	"os"
	"path/filepath"
	"testing"
	"time"
)

// Fuzz targets of the bundle reader. Their seeds are the committed
// corpus in testdata/fuzz/<target>/ (written from the fixture suite by
// `go test ./data/transfer -run Fixtures -update`) plus the f.Add calls below;
// plain `go test` runs all seeds.

// fuzzSeeds adds the reference bundles as seeds.
func fuzzSeeds(f *testing.F, g *fixGen) {
	f.Add(g.good())
	f.Add(g.baseFile)
	f.Add([]byte{})
	f.Add([]byte{0xd2, 0x84, 0x40, 0xa0, 0x40, 0x40})
}

// FuzzBundleDecode: OpenBundle never panics, and whatever it accepts is
// exactly what SealBundle writes for the decoded header and events: the
// reader accepts one encoding per content (Ed25519 signatures are
// deterministic, RFC 8032 §5.1.6).
func FuzzBundleDecode(f *testing.F) {
	g := newFixGen(f)
	fuzzSeeds(f, g)
	trust := xTrustOnly(g.trusted)
	f.Fuzz(func(t *testing.T, raw []byte) {
		in := bytes.Clone(raw)
		ob, err := OpenBundle(raw, trust)
		if !bytes.Equal(in, raw) {
			t.Fatal("OpenBundle modified its input")
		}
		if err != nil {
			if err.Error() == "" {
				t.Fatal("empty error message")
			}
			return
		}
		var relayed [][]byte
		for _, p := range ob.Proofs {
			if p.Device != ob.Header.Device {
				relayed = append(relayed, p.Raw)
			}
		}
		again, err := SealBundle(g.trusted, ob.Header, ob.Raws, relayed)
		if err != nil {
			t.Fatalf("re-sealing an accepted bundle: %v", err)
		}
		if !bytes.Equal(again, raw) {
			t.Fatalf("accepted bundle is not the canonical encoding of its content:\n in  %x\n out %x", raw, again)
		}
	})
}

// FuzzImportBundle: importing arbitrary bytes into a lab store never
// panics; a refused file leaves the store's content hash unchanged; an
// accepted one imported again is a no-op.
func FuzzImportBundle(f *testing.F) {
	g := newFixGen(f)
	fuzzSeeds(f, g)
	s := xferStore(f, f.TempDir(), testkit.XferNow)
	im := &Importer{Store: s, Trust: xTrustOnly(g.trusted), Now: func() time.Time { return testkit.XferNow }}
	f.Fuzz(func(t *testing.T, raw []byte) {
		before := xContentHash(t, s)
		fr := im.ImportBytes(raw)
		if fr.Err != nil {
			if xContentHash(t, s) != before {
				t.Fatalf("refused file (%v) changed the store", fr.Err)
			}
			return
		}
		mid := xContentHash(t, s)
		if fr2 := im.ImportBytes(raw); fr2.Err != nil || fr2.New != 0 || xContentHash(t, s) != mid {
			t.Fatalf("second import of an accepted file: %+v", fr2)
		}
	})
}

// FuzzVerifySign1: for any envelope the strict reader accepts, the
// go-cose verification path and a hand-built RFC 9052 §4.4 Sig_structure
// checked with crypto/ed25519 agree.
func FuzzVerifySign1(f *testing.F) {
	g := newFixGen(f)
	fuzzSeeds(f, g)
	f.Fuzz(func(t *testing.T, raw []byte) {
		env, err := parseSign1(raw)
		if err != nil {
			return
		}
		pub := ed25519.PublicKey(env.kid)
		viaCOSE := verifySign1(env, pub) == nil
		tbs := appendHead(nil, majArray, 4)
		tbs = appendHead(tbs, majText, 10)
		tbs = append(tbs, "Signature1"...)
		tbs = append(tbs, env.protectedItem...) // the protected header as its bstr
		tbs = appendHead(tbs, majBytes, 0)
		tbs = appendHead(tbs, majBytes, uint64(len(env.payload)))
		tbs = append(tbs, env.payload...)
		direct := len(env.signature) == ed25519.SignatureSize && ed25519.Verify(pub, tbs, env.signature)
		if viaCOSE != direct {
			t.Fatalf("go-cose says %v, hand-built Sig_structure says %v", viaCOSE, direct)
		}
	})
}

// writeFuzzSeeds writes fixture files as seed corpus entries of the
// three targets, in the file format of `go test -fuzz` ("go test fuzz
// v1" and a []byte literal).
func writeFuzzSeeds(t *testing.T, cases []fixCase) {
	keep := map[string]bool{"replayed-old-bundle": true, "truncated-in-payload": true, "header-duplicate-key": true,
		"relayed-south-with-proof": true, "event-impersonates-lab-no-proof": true, "proof-ids-unsorted": true, "proof-own-lists-too-few": true,
		"unknown-signer": true, "events-array-claims-2e32": true, "event-nan-mass": true, "signature-byte-flipped": true,
		"header-nonminimal-seq": true, "event-id-mismatch": true, "algorithm-only-unprotected": true}
	for _, target := range []string{"FuzzBundleDecode", "FuzzImportBundle", "FuzzVerifySign1"} {
		dir := filepath.Join("testdata", "fuzz", target)
		if err := os.MkdirAll(dir, 0o755); err != nil {
			t.Fatal(err)
		}
		for _, c := range cases {
			if !keep[c.name] {
				continue
			}
			body := fmt.Sprintf("go test fuzz v1\n[]byte(%q)\n", c.build(newFixGen(t)))
			if err := os.WriteFile(filepath.Join(dir, c.name), []byte(body), 0o644); err != nil {
				t.Fatal(err)
			}
		}
	}
}
