package desk

import (
	"errors"
	"fmt"
	"strings"

	"baleassay/data/record"
	"baleassay/data/transfer"
)

// TrustCandidate is a key about to be trusted: what its owner should
// confirm (by phone or in person) before anyone says yes. The device is
// derived from the key (transfer.DeviceIDOf), so a bundle signed with it
// can only speak for that device.
type TrustCandidate struct {
	Fingerprint transfer.Fingerprint
	Device      record.DeviceID
	Source      FingerprintSource
	File        string // the file read, when the argument was one
}

// CandidateOf reads the key an argument names: a fingerprint typed out,
// a public key file (bale key --public) or a bundle whose signature
// verifies with the key in it.
func CandidateOf(arg string) (TrustCandidate, error) {
	fp, src, err := FingerprintOf(arg)
	c := TrustCandidate{Fingerprint: fp, Device: fp.Device(), Source: src}
	if src == FromPEM || src == FromBundle {
		c.File = arg
	}
	return c, err
}

// MinExpectDigits is the fewest hex digits an expected fingerprint
// prefix must give: 16 digits are 64 bits, far beyond making a key that
// matches them on purpose (8 digits, 32 bits, take an afternoon).
const MinExpectDigits = 16

// ErrFingerprintMismatch refuses a key whose fingerprint does not begin
// with the prefix its owner read out.
var ErrFingerprintMismatch = errors.New("the key's fingerprint does not match the one expected")

// Matches checks the candidate's fingerprint against a prefix read out
// by the key's owner: hex digits, separators ("-", ":", spaces) ignored,
// case ignored, at least MinExpectDigits digits.
func (c TrustCandidate) Matches(prefix string) error {
	clean := strings.ToLower(strings.Map(func(r rune) rune {
		if r == '-' || r == ':' || r == ' ' {
			return -1
		}
		return r
	}, prefix))
	if strings.Trim(clean, "0123456789abcdef") != "" {
		return fmt.Errorf("%w: expected fingerprint %q holds characters other than hex digits", ErrUsage, prefix)
	}
	if len(clean) < MinExpectDigits {
		return fmt.Errorf("%w: give at least %d hex digits of the expected fingerprint, not %d", ErrUsage, MinExpectDigits, len(clean))
	}
	full := strings.ReplaceAll(c.Fingerprint.String(), "-", "")
	if !strings.HasPrefix(full, clean) {
		return fmt.Errorf("%w: the key has %s, its owner read out %s…; do not trust it, and ask how the file reached you", ErrFingerprintMismatch, c.Fingerprint, prefix)
	}
	return nil
}

// TrustKey trusts fp under name. The change runs under the store's lock
// and is written atomically (transfer.UpdateTrust), so concurrent
// changes, from this process or another, never lose one another. Names
// are unique (without regard to case and spacing); "this device" is
// reserved; this device's own key needs no entry.
func (d *Desk) TrustKey(fp transfer.Fingerprint, name string) error {
	if k, err := transfer.LoadDeviceKey(d.st.Dir()); err == nil && k.Fingerprint() == fp {
		return fmt.Errorf("%w: %s is always trusted and needs no entry", ErrOwnKey, fp)
	}
	d.tmu.Lock()
	defer d.tmu.Unlock()
	return transfer.UpdateTrust(d.st, func(tl *transfer.TrustList) error { return tl.Add(name, fp) })
}
