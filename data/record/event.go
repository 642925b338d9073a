package record

import (
	"bytes"
	"crypto/sha256"
	"fmt"
	"strings"
)

// FormatVersion is the version of the event encoding written by this code.
const FormatVersion = 1

// Kind is the kind of entity an event is about.
type Kind uint8

// The entity kinds. Values are part of the encoding: never renumber.
const (
	KindSite    Kind = 1 // a pickup site or supplier
	KindBale    Kind = 2 // a received bale
	KindPull    Kind = 3 // one grab sample from a bale
	KindSetting Kind = 4 // a spec or line profile that travels between devices
)

var kindNames = map[Kind]string{KindSite: "site", KindBale: "bale", KindPull: "pull", KindSetting: "setting", KindMeasured: "measured"}

func (k Kind) String() string {
	if n, ok := kindNames[k]; ok {
		return n
	}
	return fmt.Sprintf("kind(%d)", uint8(k))
}

// Valid reports whether k is a known kind.
func (k Kind) Valid() bool { _, ok := kindNames[k]; return ok }

// ParseKind reads a kind name.
func ParseKind(s string) (Kind, error) {
	for k, n := range kindNames {
		if n == s {
			return k, nil
		}
	}
	return 0, fmt.Errorf("%w %q (want site, bale, pull, setting or measured)", ErrKind, s)
}

// Event is one immutable change to one entity. Exactly one payload field
// matching Kind is set, except for a tombstone (Deleted), which has none
// and supersedes at least one event. Integer map keys keep the encoding
// small; they are part of the format: never renumber.
type Event struct {
	Version    uint8     `cbor:"0,keyasint"`
	Entity     EntityID  `cbor:"1,keyasint"`
	Kind       Kind      `cbor:"2,keyasint"`
	Device     DeviceID  `cbor:"3,keyasint"`
	Clock      HLC       `cbor:"4,keyasint"`
	Supersedes []EventID `cbor:"5,keyasint,omitempty"`
	Deleted    bool      `cbor:"6,keyasint,omitempty"`

	Site    *SiteRecord    `cbor:"7,keyasint,omitempty"`
	Bale    *BaleRecord    `cbor:"8,keyasint,omitempty"`
	Pull    *PullRecord    `cbor:"9,keyasint,omitempty"`
	Setting *SettingRecord `cbor:"10,keyasint,omitempty"`

	// Demo marks an event of the invented demo scenario, or one saved in
	// a demo store: a real store refuses to import it unless told to.
	Demo bool `cbor:"11,keyasint,omitempty"`

	Measured *MeasuredRecord `cbor:"12,keyasint,omitempty"` // KindMeasured (measured.go)
}

// SiteKind says what kind of place a site is.
type SiteKind uint8

// Site kinds. Values are part of the encoding.
const (
	SiteOther    SiteKind = 0
	SiteYard     SiteKind = 1 // scrap or recycling yard
	SiteMRF      SiteKind = 2 // materials recovery facility
	SiteDepot    SiteKind = 3 // deposit-return counting centre or collection depot
	SiteSupplier SiteKind = 4 // trader or other supplier
)

var siteKindNames = []string{"other", "yard", "mrf", "depot", "supplier"}

func (k SiteKind) String() string {
	if int(k) < len(siteKindNames) {
		return siteKindNames[k]
	}
	return fmt.Sprintf("sitekind(%d)", uint8(k))
}

// ParseSiteKind reads a site kind name.
func ParseSiteKind(s string) (SiteKind, error) {
	for i, n := range siteKindNames {
		if n == s {
			return SiteKind(i), nil
		}
	}
	return 0, fmt.Errorf("site kind %q is %w: give one of %s", s, ErrInvalid, strings.Join(siteKindNames, ", "))
}

// SiteRecord is a pickup site or supplier. Latitude and longitude are WGS 84
// degrees.
type SiteRecord struct {
	Name  string   `cbor:"1,keyasint"`
	Kind  SiteKind `cbor:"2,keyasint,omitempty"`
	Lat   float64  `cbor:"3,keyasint"`
	Lon   float64  `cbor:"4,keyasint"`
	Notes string   `cbor:"5,keyasint,omitempty"` // contact notes
}

// BaleRecord is a received bale. Dimensions are in metres; all three zero
// means not measured.
type BaleRecord struct {
	Site       EntityID `cbor:"1,keyasint"`
	ReceivedMs int64    `cbor:"2,keyasint"`
	GrossKg    float64  `cbor:"3,keyasint"`
	LengthM    float64  `cbor:"4,keyasint,omitempty"`
	WidthM     float64  `cbor:"5,keyasint,omitempty"`
	HeightM    float64  `cbor:"6,keyasint,omitempty"`
	Tag        string   `cbor:"7,keyasint,omitempty"`
	Grader     string   `cbor:"8,keyasint,omitempty"`
	Spec       string   `cbor:"9,keyasint,omitempty"`
	Notes      string   `cbor:"10,keyasint,omitempty"`
}

// VolumeM3 is L·W·H, zero when not measured.
func (b BaleRecord) VolumeM3() float64 { return b.LengthM * b.WidthM * b.HeightM }

// DensityKgM3 is gross kg / volume, zero when not measured.
func (b BaleRecord) DensityKgM3() float64 {
	v := b.VolumeM3()
	if v <= 0 {
		return 0
	}
	return b.GrossKg / v
}

// PullRecord is one grab sample, sorted and weighed. Kg and Pieces are
// keyed by the category keys of package assess. StatedKg is the pull's
// mass as weighed before sorting, 0 when not weighed. TotalPieces is the
// number of pieces examined in the pull, all categories together (the
// denominator of a piece share, assess.Pull.TotalPieces), 0 when not
// counted.
type PullRecord struct {
	Bale        EntityID           `cbor:"1,keyasint"`
	Label       string             `cbor:"2,keyasint"`
	TakenMs     int64              `cbor:"3,keyasint,omitempty"`
	Kg          map[string]float64 `cbor:"4,keyasint"`
	Pieces      map[string]int64   `cbor:"5,keyasint,omitempty"`
	StatedKg    float64            `cbor:"6,keyasint,omitempty"`
	TotalPieces int64              `cbor:"7,keyasint,omitempty"`
}

// CountedPieces is the sum of the per-category piece counts.
func (p PullRecord) CountedPieces() int64 {
	var n int64
	for _, c := range p.Pieces {
		n += c
	}
	return n
}

// PartsKg is the sum of the sorted parts.
func (p PullRecord) PartsKg() float64 { return partsKg(p, SortedKeys(p.Kg)) }

// partsKg sums p.Kg in the order of kgKeys (its keys, sorted), so that
// the rounding is the same wherever it is computed.
func partsKg(p PullRecord, kgKeys []string) float64 {
	var t float64
	for _, k := range kgKeys {
		t += p.Kg[k]
	}
	return t
}

// SettingRecord is a spec or line profile in use, as its JSON document.
type SettingRecord struct {
	Kind string `cbor:"1,keyasint"` // "spec" or "line_profile"
	Name string `cbor:"2,keyasint"`
	Body []byte `cbor:"3,keyasint"` // JSON
}

// Setting kinds.
const (
	SettingSpec        = "spec"
	SettingLineProfile = "line_profile"
)

// SettingEntityID is the entity id of the setting of a kind and name:
// the same on every device, so that two devices saving a setting of one
// name edit one entity (a conflict when concurrent), never make two. It
// is a UUIDv8 (RFC 9562 §5.8) over the first 122 bits of
// SHA-256("baleassay setting" ‖ kind ‖ 0 ‖ name).
func SettingEntityID(kind, name string) EntityID {
	h := sha256.Sum256([]byte("baleassay setting\x00" + kind + "\x00" + name))
	var id EntityID
	copy(id[:], h[:16])
	id[6] = id[6]&0x0f | 0x80 // version 8
	id[8] = id[8]&0x3f | 0x80 // variant 10
	return id
}

// Stamped is an event with its id.
type Stamped struct {
	ID EventID
	Event
}

// Before is the deterministic view order: (clock, device id, event id).
func (a Stamped) Before(b Stamped) bool { return compareStamped(a, b) < 0 }

func compareStamped(a, b Stamped) int {
	if c := a.Clock.Compare(b.Clock); c != 0 {
		return c
	}
	if c := bytes.Compare(a.Device[:], b.Device[:]); c != 0 {
		return c
	}
	return bytes.Compare(a.ID[:], b.ID[:])
}
