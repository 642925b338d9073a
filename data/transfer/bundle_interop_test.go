package transfer

import (
	"baleassay/data/internal/testkit"
	"baleassay/data/record"
	"encoding/hex"
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// debianPython is Debian's own interpreter, the one python3-cbor2
// installs for (the first python3 on PATH may be another one).
const debianPython = "/usr/bin/python3"

// interopScript decodes a bundle with cbor2, an independent CBOR
// implementation, and prints what it sees as JSON.
const interopScript = `
import sys, json, hashlib, cbor2
from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PublicKey

def verify(cose):
  # RFC 9052 §4.4: Sig_structure = ["Signature1", protected, external_aad, payload]
  assert isinstance(cose, cbor2.CBORTag) and cose.tag == 18, "tag 18"
  prot, unprot, payload, sig = cose.value
  p = cbor2.loads(prot)
  tbs = cbor2.dumps(["Signature1", prot, b"", payload])
  Ed25519PublicKey.from_public_bytes(p[4]).verify(sig, tbs)  # raises if the signature is wrong
  return p, unprot, payload, sig

raw = open(sys.argv[1], "rb").read()
msg = cbor2.loads(raw)
p, unprot, payload, sig = verify(msg)
header, proofs, events = cbor2.loads(payload)
out = {
  "alg": p[1], "kid": p[4].hex(), "unprotected": len(unprot), "siglen": len(sig),
  "header": {"format": header[1], "version": header[2], "device": header[3].hex(), "key": header[4].hex(),
             "seq": header[5], "prev": header[6].hex(), "clock": header[7], "count": header[8], "part": header[9]},
  "signer_device": hashlib.sha256(p[4]).digest()[:16].hex(),
  "proofs": [], "events": [],
}
listed = {}
for pr in proofs:
  pp, _, st, _ = verify(cbor2.loads(pr))
  st = cbor2.loads(st)
  dev = hashlib.sha256(pp[4]).digest()[:16].hex()
  out["proofs"].append({"format": st[1], "version": st[2], "device": st[3].hex(), "key_device": dev, "ids": len(st[4])})
  for i in st[4]:
    listed.setdefault(i.hex(), set()).add(dev)
for ident, evbytes in events:
  ev = cbor2.loads(evbytes)
  out["events"].append({"id": ident.hex(), "sha256": hashlib.sha256(evbytes).hexdigest(),
    "version": ev[0], "entity": ev[1].hex(), "kind": ev[2], "device": ev[3].hex(), "clock": ev[4],
    "supersedes": [s.hex() for s in ev.get(5, [])], "deleted": ev.get(6, False),
    "proven": ev[3].hex() in listed.get(hashlib.sha256(evbytes).hexdigest(), set())})
print(json.dumps(out))
`

type interopOut struct {
	Alg         int    `json:"alg"`
	KID         string `json:"kid"`
	Unprotected int    `json:"unprotected"`
	SigLen      int    `json:"siglen"`
	Header      struct {
		Format  string   `json:"format"`
		Version int      `json:"version"`
		Device  string   `json:"device"`
		Key     string   `json:"key"`
		Seq     uint64   `json:"seq"`
		Prev    string   `json:"prev"`
		Clock   []int64  `json:"clock"`
		Count   int      `json:"count"`
		Part    []uint64 `json:"part"`
	} `json:"header"`
	SignerDevice string `json:"signer_device"`
	Proofs       []struct {
		Format    string `json:"format"`
		Version   int    `json:"version"`
		Device    string `json:"device"`
		KeyDevice string `json:"key_device"`
		IDs       int    `json:"ids"`
	} `json:"proofs"`
	Events []struct {
		ID         string   `json:"id"`
		SHA256     string   `json:"sha256"`
		Version    int      `json:"version"`
		Entity     string   `json:"entity"`
		Kind       int      `json:"kind"`
		Device     string   `json:"device"`
		Clock      []int64  `json:"clock"`
		Supersedes []string `json:"supersedes"`
		Deleted    bool     `json:"deleted"`
		Proven     bool     `json:"proven"`
	} `json:"events"`
}

// needPython returns Debian's python3 with cbor2 and cryptography, or stops the test: in
// CI (env CI set) a missing module is a failure, elsewhere a skip that
// says what to install.
func needPython(t *testing.T) string {
	t.Helper()
	out, err := exec.Command(debianPython, "-c", "import cbor2, cryptography.hazmat.primitives.asymmetric.ed25519").CombinedOutput()
	if err == nil {
		return debianPython
	}
	msg := "independent CBOR decoder missing: " + strings.TrimSpace(string(out)) + " " + err.Error() +
		"; install it with: apt-get install python3-cbor2 python3-cryptography (or run scripts/deps.sh)"
	if os.Getenv("CI") != "" {
		t.Fatal(msg)
	}
	t.Skip(msg)
	return ""
}

// TestBundleInteropCBOR2 exports a bundle with every event kind, an edit
// and a deletion, decodes it with python3-cbor2, verifies the bundle's
// and the authorship proofs' Ed25519 signatures with python3-cryptography
// (OpenSSL), and checks that it sees the same envelope, header, proofs
// and events as this package, every event listed by a proof of the
// device its author field names, and the device id as the first 16
// bytes of SHA-256 of the key.
func TestBundleInteropCBOR2(t *testing.T) {
	py := needPython(t)
	dir := t.TempDir()
	s := xferStore(t, dir, testkit.XferNow)
	key, _, err := LoadOrCreateDeviceKey(dir)
	if err != nil {
		t.Fatal(err)
	}
	m := testkit.NewMaker(0x31, 3)
	m.Dev = s.DeviceID()
	site, bale, pull := m.Entity(), m.Entity(), m.Entity()
	siteEv := testkit.Enc(t, m.Site(site, "Quayside yard", 54.97, -1.61))
	pullEv := testkit.Enc(t, m.Pull(pull, bale, "P1", 10.5))
	raws := [][]byte{siteEv, testkit.Enc(t, m.Bale(bale, site, 512)), pullEv,
		testkit.Enc(t, m.Site(site, "Quayside yard (east)", 54.97, -1.60, record.IDOf(siteEv))),
		testkit.Enc(t, m.Tombstone(pull, record.KindPull, record.IDOf(pullEv)))}
	if _, err := s.ApplyRaw(raws, nil); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "out.bale")
	if _, err := Export(s, key, out, ExportOptions{}); err != nil {
		t.Fatal(err)
	}
	b, err := exec.Command(py, "-c", interopScript, out).Output()
	if err != nil {
		t.Fatalf("cbor2 could not read the bundle: %v", err)
	}
	var got interopOut
	if err := json.Unmarshal(b, &got); err != nil {
		t.Fatalf("%v in %s", err, b)
	}
	raw, _ := os.ReadFile(out)
	ob, err := OpenBundle(raw, func(fp Fingerprint) (string, bool) { return "", fp == key.Fingerprint() })
	if err != nil {
		t.Fatal(err)
	}
	h := ob.Header
	// Source: data/bundle.cddl and RFC 9864 (alg -19); the rest is what
	// this package decoded from the same file.
	if got.Alg != -19 || got.KID != hex.EncodeToString(key.Public()) || got.Unprotected != 0 || got.SigLen != 64 {
		t.Errorf("envelope seen by cbor2: alg %d kid %s unprotected %d siglen %d", got.Alg, got.KID, got.Unprotected, got.SigLen)
	}
	gh := got.Header
	if gh.Format != BundleFormat || gh.Version != BundleVersion || gh.Device != h.Device.String() ||
		gh.Key != hex.EncodeToString(h.Key[:]) || gh.Seq != h.Seq || gh.Prev != "" || gh.Count != len(ob.Raws) ||
		len(gh.Clock) != 2 || gh.Clock[0] != h.WallMs || len(gh.Part) != 2 || gh.Part[0] != 1 || gh.Part[1] != 1 {
		t.Errorf("header seen by cbor2 %+v, this package %+v", gh, h)
	}
	if got.SignerDevice != h.Device.String() || len(got.Proofs) != 1 || got.Proofs[0].Device != h.Device.String() ||
		got.Proofs[0].KeyDevice != h.Device.String() || got.Proofs[0].Format != AuthorshipFormat || got.Proofs[0].IDs != len(raws) {
		t.Errorf("authorship seen by cbor2: signer device %s, proofs %+v; header device %s", got.SignerDevice, got.Proofs, h.Device)
	}
	if len(got.Events) != len(raws) || !got.Events[4].Deleted {
		t.Fatalf("cbor2 saw %d events (last deleted: %v), want %d ending in a deletion", len(got.Events), len(got.Events) == 5 && got.Events[4].Deleted, len(raws))
	}
	for i, ge := range got.Events {
		e, err := record.DecodeEvent(ob.Raws[i])
		if err != nil {
			t.Fatal(err)
		}
		id := record.IDOf(ob.Raws[i])
		var sup []string
		for _, x := range e.Supersedes {
			sup = append(sup, x.String())
		}
		if ge.ID != id.String() || ge.SHA256 != id.String() || ge.Entity != hex.EncodeToString(e.Entity[:]) ||
			ge.Kind != int(e.Kind) || ge.Device != e.Device.String() || ge.Version != int(e.Version) ||
			len(ge.Clock) != 2 || ge.Clock[0] != e.Clock.WallMs || ge.Deleted != e.Deleted || strings.Join(ge.Supersedes, ",") != strings.Join(sup, ",") || !ge.Proven {
			t.Errorf("event %d seen by cbor2 %+v, this package %+v", i, ge, e)
		}
	}
}
