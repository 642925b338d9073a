package yield

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"regexp"
	"sort"
	"strings"

	"baleassay/assess"
)

// StageKind is the kind of a wash-line stage.
type StageKind int

// The stage kinds, in the order a PET wash line usually runs them.
const (
	StageSort        StageKind = iota + 1 // manual or sensor pre-sort of whole bottles
	StageGrind                            // granulator: fines loss, dust made
	StageElutriate                        // air classifier: labels, film, dust
	StageCausticWash                      // hot caustic wash: glue, paper, dirt
	StageSinkFloat                        // density separation in a bath
	StageDry                              // rinse and drying to a residual moisture
	StageScreen                           // fines screening
	stageKindEnd                          // one past the last kind; add new kinds above
)

var stageKeys = [stageKindEnd]string{"", "sort", "grind", "elutriate", "caustic_wash", "sink_float", "dry", "screen"}

// defaultStream is the reject stream a stage feeds unless it names one.
var defaultStream = [stageKindEnd]string{"", "sorted_out", "fines", "lights", "water_and_dirt", "floats", "water_and_dirt", "fines"}

func (k StageKind) String() string {
	if k < StageSort || k >= stageKindEnd {
		return fmt.Sprintf("StageKind(%d)", int(k))
	}
	return stageKeys[k]
}

// ParseStageKind reads a stage kind key.
func ParseStageKind(s string) (StageKind, error) {
	for k := StageSort; k < stageKindEnd; k++ {
		if stageKeys[k] == s {
			return k, nil
		}
	}
	return 0, fmt.Errorf("%w: stage kind %q; use one of %s", ErrUnknownKey, s, strings.Join(stageKeys[1:], ", "))
}

// MarshalText writes the kind key.
func (k StageKind) MarshalText() ([]byte, error) { return []byte(k.String()), nil }

// UnmarshalText reads the kind key.
func (k *StageKind) UnmarshalText(b []byte) error {
	v, err := ParseStageKind(string(b))
	if err != nil {
		return err
	}
	*k = v
	return nil
}

// Stage is one step of a wash line. Every stage may remove a share of
// any component (Removal, by category key, group key, "glue" or "dust";
// a category entry overrides its group's) and loses PetLoss of the PET
// categories, both into Stream. Kind-specific fields:
//   - grind: DustMade, the share of PET ground to dust that travels on
//     with the flake until a screen or classifier takes it out;
//   - sink_float: BathDensity (g/cm³), Keep ("sink" or "float", the side
//     that goes on), Efficiency (share of the other side's material that
//     leaves), ProductLoss (share of the kept side's material that leaves
//     wrongly, e.g. flakes carried by air bubbles);
//   - dry: Moisture, the water left in the flake (mass share of the wet
//     flake); free liquid from the bale is evaporated whole.
type Stage struct {
	Kind        StageKind        `json:"kind"`
	Name        string           `json:"name,omitempty"`
	Stream      string           `json:"stream,omitempty"`
	Removal     map[string]Param `json:"removal,omitempty"`
	PETLoss     Param            `json:"pet_loss,omitzero"`
	DustMade    Param            `json:"dust_made,omitzero"`
	BathDensity float64          `json:"bath_density,omitempty"`
	Keep        Side             `json:"keep,omitempty"`
	Efficiency  Param            `json:"efficiency,omitzero"`
	ProductLoss Param            `json:"product_loss,omitzero"`
	Moisture    Param            `json:"moisture,omitzero"`
}

// Side is the side of a sink–float bath that goes on with the PET.
type Side int

// The sides. SideUnset (a profile that says nothing) means SideSink.
const (
	SideUnset Side = iota
	SideSink
	SideFloat
)

func (s Side) String() string {
	switch s {
	case SideUnset:
		return ""
	case SideSink:
		return "sink"
	case SideFloat:
		return "float"
	}
	return fmt.Sprintf("Side(%d)", int(s))
}

// MarshalText writes "sink" or "float".
func (s Side) MarshalText() ([]byte, error) { return []byte(s.String()), nil }

// UnmarshalText reads "sink" or "float".
func (s *Side) UnmarshalText(b []byte) error {
	switch string(b) {
	case "sink":
		*s = SideSink
	case "float":
		*s = SideFloat
	default:
		return fmt.Errorf("keep %q: say which side goes on, \"sink\" or \"float\"", b)
	}
	return nil
}

// IsZero lets encoding/json omit an unset Param.
func (p Param) IsZero() bool { return !p.set }

// Line is a wash-line profile: its stages in order and the adhesive
// carried on the labels.
type Line struct {
	Name string `json:"name"`
	Note string `json:"note,omitempty"`
	// GlueShareOfLabels is the share of the labels' audited mass that is
	// adhesive. The model moves it to the "glue" component at the line's
	// entry, where it stays on the bottle wall (it travels with the PET
	// and only stages that name "glue" remove it).
	GlueShareOfLabels Param   `json:"glue_share_of_labels,omitzero"`
	Stages            []Stage `json:"stages"`
}

// Pseudo-components the line tracks besides the catalogue categories.
const (
	KeyGlue = "glue" // label adhesive left on the bottles
	KeyDust = "dust" // PET ground to dust
)

// NumComponents is the number of components the line tracks: the
// catalogue categories, then glue, then dust.
func NumComponents() int { return assess.NumCategories() + 2 }

// ComponentKey returns the key of component i.
func ComponentKey(i int) string {
	n := assess.NumCategories()
	switch i {
	case n:
		return KeyGlue
	case n + 1:
		return KeyDust
	}
	return assess.CategoryAt(i).Key
}

// ComponentIndex returns the index of a component key.
func ComponentIndex(key string) (int, bool) {
	switch key {
	case KeyGlue:
		return assess.NumCategories(), true
	case KeyDust:
		return assess.NumCategories() + 1, true
	}
	return assess.CategoryIndex(key)
}

// isPET reports whether component i is target PET (dust counts as PET).
func isPET(i int) bool {
	n := assess.NumCategories()
	if i == n+1 {
		return true
	}
	return i < n && assess.CategoryAt(i).IsTargetPET()
}

// ReadLineFile reads a line profile from a JSON file and validates it.
func ReadLineFile(path string) (Line, error) {
	b, err := assess.ReadFileLimited(path, assess.MaxDocumentFileBytes)
	if err != nil {
		return Line{}, fieldErr(path, "", fmt.Errorf("%w: %w", ErrBadLine, err), "cannot read the line profile (%v); check the path", err)
	}
	return ReadLine(bytes.NewReader(b), path)
}

// ReadLine reads a line profile in JSON (unknown fields are errors) and
// validates it; name labels the messages.
func ReadLine(r io.Reader, name string) (Line, error) {
	return readJSON(r, name, "line profile", "profile", ErrBadLine, (*Line).Validate)
}

// readJSON reads one JSON document, a what ("line profile") that a file
// holds one of (short: "profile"), into a T: at most
// assess.MaxDocumentFileBytes, no repeated key or control character
// (readDocument), no unknown field, nothing after it; then validate
// checks it (and may complete it), its field errors prefixed with name. Every failure wraps
// bad.
func readJSON[T any](r io.Reader, name, what, short string, bad error, validate func(*T) error) (T, error) {
	var v, zero T
	b, err := readDocument(r)
	if err != nil {
		return zero, fieldErr(name, "", fmt.Errorf("%w: %w", bad, err), "not a valid %s: %v", what, err)
	}
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&v); err != nil {
		return zero, fieldErr(name, "", bad, "not a valid %s: %v", what, jsonMsg(err))
	}
	if dec.More() {
		return zero, fieldErr(name, "", bad, "text after the %s's closing brace; a file holds one %s", short, short)
	}
	if err := validate(&v); err != nil {
		var fe *FieldError
		if errors.As(err, &fe) {
			fe.Where = name + ": " + fe.Where
		}
		return zero, err
	}
	return v, nil
}

// readDocument reads a JSON document of at most
// assess.MaxDocumentFileBytes and refuses a repeated key or a control
// character in a string (assess.CheckJSON).
func readDocument(r io.Reader) ([]byte, error) {
	b, err := io.ReadAll(io.LimitReader(r, assess.MaxDocumentFileBytes+1))
	if err != nil {
		return nil, err
	}
	if len(b) > assess.MaxDocumentFileBytes {
		return nil, fmt.Errorf("%w: more than %d bytes", assess.ErrFileTooLarge, assess.MaxDocumentFileBytes)
	}
	if err := assess.CheckJSON(b); err != nil {
		return nil, err
	}
	return b, nil
}

func jsonMsg(err error) string {
	var se *json.SyntaxError
	if errors.As(err, &se) {
		return fmt.Sprintf("JSON syntax error at byte %d: %v", se.Offset, err)
	}
	var te *json.UnmarshalTypeError
	if errors.As(err, &te) {
		return fmt.Sprintf("field %q: want %v", te.Field, te.Type)
	}
	return err.Error()
}

var streamName = regexp.MustCompile(`^[a-z][a-z0-9_]*$`)

// Validate checks the profile: known kinds and keys, every share within
// 0–1, and every stage closing (for each component, the shares a stage
// sends away add up to at most 1).
func (l Line) Validate() error {
	_, err := compile(l)
	return err
}

// where names stage i for messages.
func (s Stage) where(i int) string {
	w := fmt.Sprintf("stage %d (%s)", i+1, s.Kind)
	if s.Name != "" {
		w = fmt.Sprintf("stage %d (%s, %q)", i+1, s.Kind, s.Name)
	}
	return w
}

// removalFor resolves the removal entries of a stage to one Param per
// component (unset where none applies) and the entry each came from:
// category keys override group keys.
func (s Stage) removalFor(where string) ([]Param, []string, error) {
	out := make([]Param, NumComponents())
	from := make([]string, NumComponents())
	keys := make([]string, 0, len(s.Removal))
	for k := range s.Removal {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		p := s.Removal[k]
		if err := checkParam(where, "removal."+k, p); err != nil {
			return nil, nil, err
		}
		if g, ok := assess.LookupGroup(k); ok {
			for i := 0; i < assess.NumCategories(); i++ {
				if assess.CategoryAt(i).Group == g && !s.Removal[assess.CategoryAt(i).Key].set {
					out[i], from[i] = p, k
				}
			}
			continue
		}
		i, ok := ComponentIndex(k)
		if !ok {
			return nil, nil, fieldErr(where, "removal."+k, ErrUnknownKey, "%q is not a category, group, %q or %q; categories: %s", k, KeyGlue, KeyDust, strings.Join(assess.CategoryKeys(), ", "))
		}
		out[i], from[i] = p, k
	}
	return out, from, nil
}
