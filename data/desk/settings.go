package desk

import (
	"bytes"
	"errors"
	"fmt"
	"sort"

	"baleassay/assess"
	"baleassay/data/record"
	"baleassay/data/store"
	"baleassay/yield"
)

// SettingKind is the kind of a stored setting.
type SettingKind uint8

// The setting kinds.
const (
	SettingSpec SettingKind = iota + 1 // a buyer's spec (assess)
	SettingLine                        // a wash-line profile (yield)
)

func (k SettingKind) String() string {
	switch k {
	case SettingSpec:
		return "spec"
	case SettingLine:
		return "line"
	}
	return fmt.Sprintf("setting(%d)", uint8(k))
}

// ParseSettingKind reads "spec" or "line" ("line_profile" too).
func ParseSettingKind(s string) (SettingKind, error) {
	switch s {
	case "spec":
		return SettingSpec, nil
	case "line", "line_profile":
		return SettingLine, nil
	}
	return 0, fmt.Errorf("%w: unknown setting kind %q: give spec or line", ErrUsage, s)
}

// recordKind is the records' name of the kind.
func (k SettingKind) recordKind() string {
	if k == SettingLine {
		return record.SettingLineProfile
	}
	return record.SettingSpec
}

func settingKindOf(s string) SettingKind {
	if s == record.SettingLineProfile {
		return SettingLine
	}
	return SettingSpec
}

// SettingRow is a stored setting.
type SettingRow struct {
	ID         record.EntityID
	Kind       SettingKind
	Name       string
	Body       []byte // the JSON document
	Conflicted bool
}

// Settings lists the stored settings by kind, then name.
func (d *Desk) Settings() ([]SettingRow, error) {
	states, err := d.st.Entities(record.KindSetting)
	if err != nil {
		return nil, err
	}
	var out []SettingRow
	for _, st := range states {
		cur, ok := st.Current()
		if !ok || cur.Setting == nil {
			continue
		}
		out = append(out, SettingRow{st.ID, settingKindOf(cur.Setting.Kind), cur.Setting.Name, cur.Setting.Body, st.Conflicted()})
	}
	sort.Slice(out, func(i, j int) bool {
		if out[i].Kind != out[j].Kind {
			return out[i].Kind < out[j].Kind
		}
		return out[i].Name < out[j].Name
	})
	return out, nil
}

// ErrSettingConflict refuses a setting changed on two devices at once.
var ErrSettingConflict = errors.New("setting in conflict")

// Setting returns the stored setting of a kind and name.
func (d *Desk) Setting(kind SettingKind, name string) (SettingRow, error) {
	all, err := d.Settings()
	if err != nil {
		return SettingRow{}, err
	}
	for _, v := range all {
		if v.Kind == kind && v.Name == name {
			if v.Conflicted {
				return v, fmt.Errorf("%w: %s %q was changed on two devices at once; keep one (conflicts resolve %s EVENT)", ErrSettingConflict, kind, name, v.ID)
			}
			return v, nil
		}
	}
	return SettingRow{}, fmt.Errorf("%w: there is no %s named %q in this store", ErrNotFound, kind, name)
}

// setting returns a stored document by kind and name; a nil desk has none.
func (d *Desk) setting(kind SettingKind, name string) ([]byte, bool, error) {
	if d == nil {
		return nil, false, nil
	}
	v, err := d.Setting(kind, name)
	switch {
	case errors.Is(err, ErrNotFound):
		return nil, false, nil
	case err != nil:
		return nil, false, err
	}
	return v.Body, true, nil
}

// ReadSetting checks a document with the reader its kind uses (the
// audit's for a spec, the yield's for a line) and returns its name.
func ReadSetting(kind SettingKind, body []byte, source string) (string, error) {
	switch kind {
	case SettingSpec:
		s, err := assess.ParseSpec(body)
		if err != nil {
			return "", fmt.Errorf("%s: %w", source, err)
		}
		return s.Name, nil
	case SettingLine:
		l, err := yield.ReadLine(bytes.NewReader(body), source)
		if err != nil {
			return "", err
		}
		if _, err := yield.Compile(l); err != nil {
			return "", fmt.Errorf("%s: %w", source, err)
		}
		return l.Name, nil
	}
	return "", fmt.Errorf("%w: unknown setting kind %s", ErrUsage, kind)
}

// SaveSetting keeps a spec or line document in the store under the name
// it gives itself. Saving a name again records a new version that
// supersedes the old one, which stays in the history. Two devices saving
// one name offline edit one setting: a conflict, not two settings.
func (d *Desk) SaveSetting(kind SettingKind, body []byte, source string) (id record.EntityID, updated bool, err error) {
	name, err := ReadSetting(kind, body, source)
	if err != nil {
		return id, false, &RefusedError{Reason: RefuseInvalid, Msg: err.Error(), Err: err}
	}
	if name == "" {
		return id, false, refused(RefuseInvalid, "%s has no \"name\"; give the document a name so it can be found on other devices", source)
	}
	ev := record.Event{Kind: record.KindSetting, Setting: &record.SettingRecord{Kind: kind.recordKind(), Name: name, Body: body}}
	if prev, err := d.Setting(kind, name); err == nil || errors.Is(err, ErrSettingConflict) {
		_, err = d.st.Supersede(prev.ID, ev, store.SaveOptions{})
		return prev.ID, true, saveError(err)
	} else if !errors.Is(err, ErrNotFound) {
		return id, false, err
	}
	id = record.SettingEntityID(kind.recordKind(), name)
	if st, err := d.st.Entity(id); err == nil {
		// Removed once: the new version supersedes the tombstone.
		ev.Entity, ev.Supersedes = id, st.HeadIDs()
	} else {
		ev.Entity = id
	}
	_, err = d.st.Save([]record.Event{ev}, store.SaveOptions{})
	return id, false, saveError(err)
}
