package record

import (
	"crypto/rand"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"io"

	"github.com/google/uuid"
)

// EntityID names a site, bale, pull or setting: a UUIDv7 (RFC 9562 §5.7),
// time-ordered and random, made with github.com/google/uuid.
type EntityID [16]byte

// DeviceID names a device (a store): 128 random bits made when the store
// is first created and kept in it.
type DeviceID [16]byte

// EventID is the SHA-256 of an event's deterministic CBOR bytes.
type EventID [32]byte

// NewEntityID returns a fresh UUIDv7.
func NewEntityID() (EntityID, error) {
	u, err := uuid.NewV7()
	if err != nil {
		return EntityID{}, fmt.Errorf("new entity id: %w", err)
	}
	return EntityID(u), nil
}

// EntityIDAt builds a UUIDv7 for the given Unix millisecond time with the
// random bits read from r. It lets the demo scenario and tests make
// reproducible ids; the layout is that of RFC 9562 §5.7.
func EntityIDAt(ms int64, r io.Reader) (EntityID, error) {
	var id EntityID
	if _, err := io.ReadFull(r, id[6:]); err != nil {
		return id, fmt.Errorf("entity id: %w", err)
	}
	for i := 0; i < 6; i++ {
		id[i] = byte(ms >> (40 - 8*i))
	}
	id[6] = id[6]&0x0f | 0x70 // version 7
	id[8] = id[8]&0x3f | 0x80 // variant 10
	return id, nil
}

// ParseEntityID reads the canonical UUID text form.
func ParseEntityID(s string) (EntityID, error) {
	u, err := uuid.Parse(s)
	if err != nil {
		return EntityID{}, fmt.Errorf("%w: entity id %q: %v", ErrMissingID, s, err)
	}
	return EntityID(u), nil
}

// String is the canonical UUID text form.
func (id EntityID) String() string { return uuid.UUID(id).String() }

// IsZero reports whether the id is unset.
func (id EntityID) IsZero() bool { return id == EntityID{} }

// newDeviceID returns 128 random bits.
func NewDeviceID() (DeviceID, error) {
	var d DeviceID
	if _, err := rand.Read(d[:]); err != nil {
		return d, fmt.Errorf("new device id: %w", err)
	}
	return d, nil
}

// String is the device id in lower-case hex.
func (d DeviceID) String() string { return hex.EncodeToString(d[:]) }

// ParseDeviceID reads 32 hex digits.
func ParseDeviceID(s string) (DeviceID, error) {
	var d DeviceID
	b, err := hex.DecodeString(s)
	if err != nil || len(b) != len(d) {
		return d, fmt.Errorf("%w: device id %q must be 32 hex digits", ErrMissingID, s)
	}
	copy(d[:], b)
	return d, nil
}

// IDOf is the id of an event from its encoded bytes: SHA-256 (FIPS 180-4).
func IDOf(raw []byte) EventID { return sha256.Sum256(raw) }

// String is the event id in lower-case hex (64 digits).
func (id EventID) String() string { return hex.EncodeToString(id[:]) }

// Short is the first 12 hex digits, for messages.
func (id EventID) Short() string { return hex.EncodeToString(id[:6]) }

// ParseEventID reads 64 hex digits.
func ParseEventID(s string) (EventID, error) {
	var id EventID
	b, err := hex.DecodeString(s)
	if err != nil || len(b) != len(id) {
		return id, fmt.Errorf("%w: event id %q must be 64 hex digits", ErrMissingID, s)
	}
	copy(id[:], b)
	return id, nil
}
