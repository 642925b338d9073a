package transfer

import (
	"baleassay/data/record"
	"encoding/hex"
	"fmt"
)

// A device's key fingerprint, as `bale key` prints it and `bale trust
// add` reads it: SHA-256 of the Ed25519 public key, here the key of
// RFC 8032 §7.1 TEST 1 (Source of the public key: RFC 8032; of the
// fingerprint: Python hashlib.sha256 of that key, computed separately).
func ExampleFingerprintOf() {
	seed, _ := hex.DecodeString("9d61b19deffd5a60ba844af492ec2cc44449c5697b326919703bac031cae7f60")
	k, _ := NewDeviceKeyFromSeed(seed)
	fmt.Println(hex.EncodeToString(k.Public()))
	fmt.Println(k.Fingerprint())
	// Output:
	// d75a980182b10ab7d54bfed3c964073a0ee172f3daa62325af021a68f707511a
	// 21fe31df-a154a261-626bf854-046fd227-1b7bed4b-6abe45aa-58877ef4-7f9721b9
}

// The importer's gap report after bundles 1, 2, 5 and 9 of a device.
func ExampleSeqSet_Missing() {
	var s SeqSet
	for _, n := range []uint64{9, 1, 5, 2} {
		s = s.Add(n)
	}
	for _, r := range s.Missing() {
		fmt.Println(SeqGap{Device: record.DeviceID{0xab, 0xcd}, From: r.Lo, To: r.Hi})
	}
	// Output:
	// bundles 3 to 4 from device abcd0000000000000000000000000000 have not been seen
	// bundles 6 to 8 from device abcd0000000000000000000000000000 have not been seen
}
