package transfer

import (
	"baleassay/data/record"
	"crypto/ed25519"
	"crypto/rand"
	"crypto/x509"
	"encoding/hex"
	"encoding/pem"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
)

// KeyFileName is the device's private signing key, PKCS#8 in PEM (RFC
// 5208, RFC 8410 for Ed25519), kept in the store folder with mode 0600.
const KeyFileName = "device-key.pem"

// DeviceKey is a device's Ed25519 signing key.
type DeviceKey struct{ priv ed25519.PrivateKey }

// NewDeviceKeyFromSeed returns the key for a 32-byte seed (RFC 8032
// §5.1.5). Tests and fixtures use it for reproducible signatures.
func NewDeviceKeyFromSeed(seed []byte) (*DeviceKey, error) {
	if len(seed) != ed25519.SeedSize {
		return nil, fmt.Errorf("%w: seed has %d bytes, want %d", ErrKeyFile, len(seed), ed25519.SeedSize)
	}
	return &DeviceKey{priv: ed25519.NewKeyFromSeed(seed)}, nil
}

// Public returns the 32-byte public key.
func (k *DeviceKey) Public() ed25519.PublicKey { return k.priv.Public().(ed25519.PublicKey) }

// Fingerprint returns SHA-256 of the public key.
func (k *DeviceKey) Fingerprint() Fingerprint { return FingerprintOf(k.Public()) }

// DeviceID is the id of the device this key belongs to: see DeviceIDOf.
func (k *DeviceKey) DeviceID() record.DeviceID { return k.Fingerprint().Device() }

// DeviceIDOf is the device id bound to an Ed25519 public key: the first
// 16 bytes of SHA-256 of the raw 32-byte key, so the same as the first
// 32 hex digits of its fingerprint. A device id therefore names exactly
// one key (finding a second key with the same id takes about 2¹²⁸
// tries), and anyone holding the key can check the id without asking
// anybody: an event's author field says whose signature it must carry.
func DeviceIDOf(pub ed25519.PublicKey) record.DeviceID { return FingerprintOf(pub).Device() }

// Device is the device id bound to the key with this fingerprint.
func (f Fingerprint) Device() record.DeviceID {
	var d record.DeviceID
	copy(d[:], f[:len(d)])
	return d
}

// PublicPEM returns the public key as a PEM "PUBLIC KEY" block
// (SubjectPublicKeyInfo, RFC 8410 §4), the file `bale trust add` reads.
func (k *DeviceKey) PublicPEM() []byte {
	der, err := x509.MarshalPKIXPublicKey(k.Public())
	if err != nil { // cannot happen for a valid Ed25519 key
		panic(err)
	}
	return pem.EncodeToMemory(&pem.Block{Type: "PUBLIC KEY", Bytes: der})
}

// LoadOrCreateDeviceKey reads dir/device-key.pem, creating it on first
// use (created reports that). A key file readable by group or others is
// refused with the command that fixes it, as ssh does for its keys.
func LoadOrCreateDeviceKey(dir string) (key *DeviceKey, created bool, err error) {
	path := filepath.Join(dir, KeyFileName)
	key, err = loadDeviceKey(path)
	if err == nil || !errors.Is(err, fs.ErrNotExist) {
		return key, false, err
	}
	seed := make([]byte, ed25519.SeedSize)
	if _, err := rand.Read(seed); err != nil {
		return nil, false, fmt.Errorf("no randomness for a device key: %w", err)
	}
	key, _ = NewDeviceKeyFromSeed(seed)
	der, err := x509.MarshalPKCS8PrivateKey(key.priv)
	if err != nil {
		return nil, false, err
	}
	block := pem.EncodeToMemory(&pem.Block{Type: "PRIVATE KEY", Bytes: der})
	if err := os.MkdirAll(dir, 0o700); err != nil {
		return nil, false, err
	}
	// O_EXCL: two processes creating at once cannot both win.
	f, err := os.OpenFile(path, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o600)
	if errors.Is(err, fs.ErrExist) {
		key, err = loadDeviceKey(path)
		return key, false, err
	}
	if err != nil {
		return nil, false, fmt.Errorf("creating device key: %w", err)
	}
	if _, err := f.Write(block); err != nil {
		f.Close()
		os.Remove(path)
		return nil, false, fmt.Errorf("writing device key: %w", err)
	}
	if err := f.Sync(); err != nil {
		f.Close()
		os.Remove(path)
		return nil, false, fmt.Errorf("syncing device key: %w", err)
	}
	if err := f.Close(); err != nil {
		return nil, false, err
	}
	if err := syncDir(dir); err != nil {
		return nil, false, err
	}
	return key, true, nil
}

func loadDeviceKey(path string) (*DeviceKey, error) {
	if err := checkPrivateDir(filepath.Dir(path)); err != nil {
		return nil, err
	}
	st, err := os.Stat(path)
	if err != nil {
		return nil, err
	}
	if st.Mode().Perm()&0o077 != 0 {
		return nil, fmt.Errorf("%w: %s is readable by other users (mode %v); run: chmod 600 %s", ErrKeyFile, path, st.Mode().Perm(), path)
	}
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("%w: %v", ErrKeyFile, err)
	}
	block, _ := pem.Decode(b)
	if block == nil || block.Type != "PRIVATE KEY" {
		return nil, fmt.Errorf("%w: %s holds no PEM private key", ErrKeyFile, path)
	}
	k, err := x509.ParsePKCS8PrivateKey(block.Bytes)
	if err != nil {
		return nil, fmt.Errorf("%w: %s: %v", ErrKeyFile, path, err)
	}
	priv, ok := k.(ed25519.PrivateKey)
	if !ok {
		return nil, fmt.Errorf("%w: %s is not an Ed25519 key", ErrKeyFile, path)
	}
	return &DeviceKey{priv: priv}, nil
}

// String writes the fingerprint as eight groups of eight hex digits.
func (f Fingerprint) String() string {
	h := hex.EncodeToString(f[:])
	var b strings.Builder
	for i := 0; i < len(h); i += 8 {
		if i > 0 {
			b.WriteByte('-')
		}
		b.WriteString(h[i : i+8])
	}
	return b.String()
}

// ParseFingerprint reads 64 hex digits; "-", ":" and spaces between
// them are ignored, case does not matter.
func ParseFingerprint(s string) (Fingerprint, error) {
	var f Fingerprint
	clean := strings.Map(func(r rune) rune {
		if r == '-' || r == ':' || r == ' ' {
			return -1
		}
		return r
	}, s)
	if len(clean) != 64 {
		return f, fmt.Errorf("%w: %q has %d hex digits", ErrFingerprintFormat, s, len(clean))
	}
	if _, err := hex.Decode(f[:], []byte(strings.ToLower(clean))); err != nil {
		return f, fmt.Errorf("%w: %q: %v", ErrFingerprintFormat, s, err)
	}
	return f, nil
}

// MarshalText and UnmarshalText let fingerprints appear in JSON.
func (f Fingerprint) MarshalText() ([]byte, error) { return []byte(f.String()), nil }

func (f *Fingerprint) UnmarshalText(b []byte) error {
	p, err := ParseFingerprint(string(b))
	if err == nil {
		*f = p
	}
	return err
}

// ParsePublicKeyPEM reads a PEM "PUBLIC KEY" block holding an Ed25519 key.
func ParsePublicKeyPEM(b []byte) (ed25519.PublicKey, error) {
	block, _ := pem.Decode(b)
	if block == nil || block.Type != "PUBLIC KEY" {
		return nil, fmt.Errorf("%w: no PEM public key", ErrKeyFile)
	}
	k, err := x509.ParsePKIXPublicKey(block.Bytes)
	if err != nil {
		return nil, fmt.Errorf("%w: %v", ErrKeyFile, err)
	}
	pub, ok := k.(ed25519.PublicKey)
	if !ok {
		return nil, fmt.Errorf("%w: not an Ed25519 public key", ErrKeyFile)
	}
	return pub, nil
}

// LoadDeviceKey reads dir/device-key.pem without creating it; a missing
// file gives an error matching fs.ErrNotExist.
func LoadDeviceKey(dir string) (*DeviceKey, error) {
	return loadDeviceKey(filepath.Join(dir, KeyFileName))
}
