package transfer

// BundleFormat is the format name written in every bundle header.
//
// # The bundle format, version 1
//
// A bundle is the file one device writes for another: a grader's
// tablet exports to a USB stick, the lab imports it, and files may
// travel back the same way. The CDDL schema (RFC 8610) is in
// data/bundle.cddl; this section says what the schema cannot.
//
// Envelope. A bundle file is exactly one CBOR data item (RFC 8949): a
// COSE_Sign1 message with its tag 18 (RFC 9052 §4.2). The protected
// header is the deterministic encoding of {1: -19, 4: kid}: algorithm
// -19 is "Ed25519" as registered by RFC 9864 in the IANA COSE
// Algorithms registry (the polymorphic -8 "EdDSA" of RFC 9053 is
// deprecated there and is refused here), and the key identifier is the
// signer's raw 32-byte Ed25519 public key. The unprotected header is the
// empty map. The signature is the 64-byte Ed25519 signature (RFC 8032)
// over the COSE Sig_structure ["Signature1", protected, empty external data, payload].
// No external data is used. Nothing may follow the message.
//
// Signer. A key's fingerprint is SHA-256 of the 32-byte public key,
// written as eight groups of eight lowercase hex digits joined by "-".
// The importer verifies only with keys whose fingerprint is in the
// store's trust list (or the store's own key); an unknown key is
// refused with its fingerprint, a known key whose signature fails is
// refused as tampered. The signature is checked before the payload is
// decoded at all.
//
// Body. The payload byte string holds the deterministic encoding (RFC
// 8949 §4.2.1: shortest heads, definite lengths, map keys sorted
// bytewise) of a two-element array [header, events]:
//
//   - header: a map with integer keys, all required, no others:
//     1 format "baleassay-bundle"; 2 version 1; 3 exporting device id
//     (16 bytes); 4 fingerprint of the signing key (32 bytes, must match
//     the kid); 5 per-device bundle sequence number (from 1, one more
//     for every bundle the device writes); 6 SHA-256 of the complete
//     file of the device's previous bundle (empty byte string for
//     sequence 1); 7 clock stamp [wall ms since 1970 UTC, logical
//     counter]; 8 number of events; 9 [part, parts] of one export.
//   - events: an array of [id, event] pairs, where event is a byte
//     string holding the event's exact stored CBOR bytes and id is
//     SHA-256 of those bytes (the records' event id), so ids verify
//     after any number of hops. Events appear in the exporting store's
//     insertion order; an id appears at most once per bundle.
//
// Strict reading. A reader refuses: a file over the size limit (read
// no further than the limit); anything but tag 18 around a 4-array;
// indefinite lengths; non-shortest heads; tags inside; duplicate map
// keys; NaN or infinite floats; invalid UTF-8; unknown header fields;
// nesting, array and map sizes beyond small bounds; a header that does
// not re-encode to its own bytes; a count that differs from the events
// present; an id that is not the hash of its bytes; and every event that
// fails the records' strict decoding or validation. One bad event
// refuses the whole bundle: a bundle is applied in one transaction or
// not at all, and the file itself is never modified.
//
// Sequences. The importer records, per exporting device, which
// sequence numbers it has seen and each bundle's hash; after an import
// it reports sequence numbers below the highest seen that are missing
// ("bundle 7 from device … has not been seen") and a previous-bundle
// hash that does not match the bundle it names. A bundle seen before is
// accepted as a no-op. These records are a pure function of the set of
// bundles imported, so import order does not change the store.
//
// Parts. An export larger than the part limit is split into several
// bundles, each signed and numbered in the device sequence, each
// importable alone; header field 9 says "part k of n". Memory needed to
// import is bounded by one bundle's bytes plus a constant.
//
// Versioning. A reader checks format and version before anything else
// in the header, so a file from a newer program is refused as "newer
// format version", not as damaged.
const BundleFormat = "baleassay-bundle"
