package transfer

import (
	"baleassay/data/record"
	"errors"
	"fmt"
)

// Sentinels of the bundle layer. Every refusal of a bundle wraps exactly
// one of them, so callers and tests tell failure modes apart with
// errors.Is; the typed errors below add where it happened.
var (
	ErrBundleEmpty       = errors.New("bundle file is empty")
	ErrBundleNotFile     = errors.New("not a regular file")
	ErrBundleTooLarge    = errors.New("bundle file is larger than the import limit")
	ErrBundleTruncated   = errors.New("bundle is truncated")
	ErrBundleTrailing    = errors.New("bytes after the end of the bundle")
	ErrBundleNotCOSE     = errors.New("not a COSE_Sign1 message (tag 18)")
	ErrBundleMalformed   = errors.New("malformed CBOR in bundle")
	ErrBundleNonCanon    = errors.New("bundle is not in deterministic encoding")
	ErrAlgUnprotected    = errors.New("algorithm given only in the unprotected header")
	ErrUnexpectedAlg     = errors.New("unexpected signature algorithm")
	ErrBadHeaderParam    = errors.New("unexpected COSE header parameter")
	ErrUnknownSigner     = errors.New("bundle signed by a key that is not trusted")
	ErrBadSignature      = errors.New("signature does not verify: bundle was altered (tampered)")
	ErrBundleFormat      = errors.New("not a baleassay bundle")
	ErrBundleVersion     = errors.New("unsupported bundle format version")
	ErrBundleHeader      = errors.New("invalid bundle header")
	ErrBundleEventID     = errors.New("event id does not match the event's bytes")
	ErrBundleEventCount  = errors.New("event count does not match the header")
	ErrBundleTooMany     = errors.New("bundle claims more events than the limit")
	ErrBundleDupEvent    = errors.New("event appears twice in one bundle")
	ErrBundleEvent       = errors.New("event in bundle refused")
	ErrBundleDevice      = errors.New("device id does not belong to the signing key")
	ErrBundleProof       = errors.New("authorship proof refused")
	ErrAuthorUnproven    = errors.New("event's author has not signed it")
	ErrDeviceKey         = errors.New("this store's device id is not derived from its signing key")
	ErrTrustName         = errors.New("invalid trust entry")
	ErrFingerprintFormat = errors.New("not a key fingerprint (64 hex digits)")
	ErrKeyFile           = errors.New("device key file unreadable")
)

// BundleError locates a refusal inside a bundle: the byte offset where
// decoding stopped (or -1), the event index (or -1) and a short part
// name ("envelope", "protected header", "header.seq", "events[3]").
type BundleError struct {
	Part   string
	Offset int
	Event  int
	Err    error // wraps one of the sentinels above
	Detail string
}

func (e *BundleError) Error() string {
	s := e.Err.Error()
	if e.Part != "" {
		s += " (in " + e.Part
		if e.Offset >= 0 {
			s += fmt.Sprintf(" at byte %d", e.Offset)
		}
		s += ")"
	}
	if e.Detail != "" {
		s += ": " + e.Detail
	}
	return s
}

func (e *BundleError) Unwrap() error { return e.Err }

func bundleErr(sentinel error, part string, off int, detail string, args ...any) *BundleError {
	if len(args) > 0 {
		detail = fmt.Sprintf(detail, args...)
	}
	return &BundleError{Part: part, Offset: off, Event: -1, Err: sentinel, Detail: detail}
}

// UnknownSignerError is returned for a well-formed bundle whose signing
// key is not in the trust list. Its message shows the key's fingerprint
// and the command that trusts it, after the user has checked the
// fingerprint with the sender by another channel.
type UnknownSignerError struct {
	Fingerprint Fingerprint
	Device      string // device id claimed in the protected header, hex, may be empty
	File        string // file name, when known
}

func (e *UnknownSignerError) Error() string {
	file := e.File
	if file == "" {
		file = "FILE"
	}
	return fmt.Sprintf("%v: fingerprint %s; check it with the sender (phone, in person), then run: bale trust add %s --name NAME",
		ErrUnknownSigner, e.Fingerprint, file)
}

func (e *UnknownSignerError) Unwrap() error { return ErrUnknownSigner }

// EventRefusedError says which event of a bundle was refused and why;
// Err is the records validation or decoding error (its own sentinel is
// reachable through errors.Is as well as ErrBundleEvent).
type EventRefusedError struct {
	Index int
	ID    string // hex id as given in the bundle
	Err   error
}

func (e *EventRefusedError) Error() string {
	cause := e.Err
	var ee *record.EventError
	if errors.As(cause, &ee) { // its index and id are said here already
		cause = ee.Err
	}
	return fmt.Sprintf("%v: event %d of the bundle (id %.16s…): %v", ErrBundleEvent, e.Index+1, e.ID, cause)
}

// Unwrap exposes both ErrBundleEvent and the underlying cause.
func (e *EventRefusedError) Unwrap() []error { return []error{ErrBundleEvent, e.Err} }
