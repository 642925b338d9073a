package transfer

// BundleFormat is the format name written in every bundle header.
//
// # The bundle format, version 2
//
// A bundle is the file one device writes for another: a grader's
// tablet exports to a USB stick, the lab imports it, and files may
// travel back the same way, carrying records of many devices. The CDDL
// schema (RFC 8610), including the full schema of an event, is in
// data/transfer/bundle.cddl; this section says what the schema cannot.
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
// Keys and devices. A key's fingerprint is SHA-256 of the 32-byte
// public key, written as eight groups of eight lowercase hex digits
// joined by "-". A device's id is the first 16 bytes of its key's
// fingerprint (DeviceIDOf): a store takes it from the key made with the
// store, so the id names one key and anyone can check which. Every
// event names its author in field 3; that field is what a signature must
// cover.
//
// Trust. The importer verifies the envelope only with keys in the
// store's trust list (or the store's own key); an unknown key is refused
// with its fingerprint, a known key whose signature fails is refused as
// tampered. The signature is checked before the payload is decoded at
// all. Trust decides whose files a device takes in; authorship (below)
// decides which device each record is from, and holds for records the
// signer passes on from others.
//
// Body. The payload byte string holds the deterministic encoding (RFC
// 8949 §4.2.1: shortest heads, definite lengths, map keys sorted
// bytewise) of a three-element array [header, proofs, events]:
//
//   - header: a map with integer keys, all required, no others:
//     1 format "baleassay-bundle"; 2 version 2; 3 exporting device id
//     (16 bytes), which must be the signing key's device; 4 fingerprint
//     of the signing key (32 bytes, must match the kid); 5 per-device
//     bundle sequence number (from 1, one more for every bundle the
//     device writes); 6 SHA-256 of the complete file of the device's
//     previous bundle (empty byte string for sequence 1); 7 clock stamp
//     [wall ms since 1970 UTC, logical counter], the wall time in
//     2000–2099; 8 number of events; 9 [part, parts] of one export.
//   - proofs: authorship proofs (below), each a byte string holding one
//     COSE_Sign1 message, in strictly ascending bytewise order, at most
//     MaxBundleProofs.
//   - events: an array of [id, event] pairs, where event is a byte
//     string holding the event's exact stored CBOR bytes and id is
//     SHA-256 of those bytes (the records' event id), so ids verify
//     after any number of hops. Events appear in the exporting store's
//     insertion order; an id appears at most once per bundle.
//
// Authorship. An authorship proof is a COSE_Sign1 message, with the same
// envelope rules as a bundle, whose payload is the deterministic
// encoding of {1: "baleassay-authorship", 2: 1, 3: device id, 4: [event
// ids]}: the statement, signed with that device's own key (the device
// id must be the kid's, and the ids are listed once each in ascending
// order), that the device wrote those events. Because an event id is the
// hash of the event's bytes and the bytes hold the author field, a proof
// binds each listed event, byte for byte, to the one key its author
// field names. A reader accepts a bundle only if:
//
//   - the header's device is the signing key's device (a header cannot
//     claim another device's sequence numbers);
//   - every proof parses strictly and its signature verifies with its
//     own key; no key needs to be in the trust list for that;
//   - every proof lists at least one event of the bundle by its device;
//   - the signer's own events are listed by exactly one proof of the
//     signer's device, which lists exactly them;
//   - every event's author (field 3) has a proof in the bundle that lists
//     the event's id.
//
// Otherwise the whole bundle is refused with the reason (ErrBundleDevice,
// ErrBundleProof, ErrAuthorUnproven, naming the event and the device it
// claims). So a device a store trusts can carry records of other devices
// (the lab passes the tablets' records on to each other) but cannot
// write, change or claim a record in another device's name. An importer
// stores the proofs of the other devices' records beside them (meta keys
// "xfer/proof/<SHA-256 of the proof>"), and its own exports send them on
// unchanged with those records; its own records get a proof it signs
// afresh for each bundle. A record of another device that arrived
// without a proof (a store from before version 2) is not exported: the
// export stops and says which.
//
// Strict reading. A reader refuses: a file that is not a regular file
// (a FIFO, a device, a folder), without blocking; a file over the size
// limit (read no further than the limit); anything but tag 18 around a
// 4-array; indefinite lengths; non-shortest heads; tags inside;
// duplicate map keys; NaN or infinite floats; invalid UTF-8; unknown
// header fields; nesting, array and map sizes beyond small bounds; a
// header that does not re-encode to its own bytes; a count that differs
// from the events present; an id that is not the hash of its bytes; a
// proof or an event that fails the authorship rules above; and every
// event that fails the records' strict decoding or validation (every
// number in its physical range, text without control characters). One
// bad event refuses the whole bundle: a bundle is applied in one
// transaction or not at all, and the file itself is never modified.
//
// Sequences. The importer records, per exporting device, which
// sequence numbers it has seen and each bundle's hash; after an import
// it reports sequence numbers below the highest seen that are missing
// ("bundle 7 from device … has not been seen") and a previous-bundle
// hash that does not match the bundle it names. A bundle seen before is
// accepted as a no-op. These records and the stored proofs are a pure
// function of the set of bundles imported, so import order does not
// change the store.
//
// Parts. An export larger than the part limit is split into several
// bundles, each signed and numbered in the device sequence, each
// importable alone and carrying the proofs its own events need; header
// field 9 says "part k of n".
//
// Versioning. A reader checks format and version before anything else
// in the header, so a file from another version is refused as "format
// version N", not as damaged. Version 1 (before authorship proofs) had
// the body [header, events] and is refused.
const BundleFormat = "baleassay-bundle"
