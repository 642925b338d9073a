package transfer

import (
	"encoding/hex"
	"fmt"
	"math"
	"math/big"
	"sort"
	"strconv"
	"strings"
	"time"
	"unicode"
	"unicode/utf8"

	"github.com/fxamacker/cbor/v2"

	"baleassay/assess"
	"baleassay/data/record"
)

// The named rendering of a bundle (Inspection.Named): CBOR diagnostic
// notation (RFC 8949 §8) in which every integer map key the schema knows
// is replaced by its field name from bundle.cddl ("gross_kg: 548.0" for
// "3: 548.0"), array members are named as the CDDL names them, embedded
// CBOR is decoded (<<...>>), and values get a comment in EDN's /.../
// form (RFC 8610 Appendix G.6): a time for every clock and date, the
// name of a kind, site kind or method. Floats are written without an
// exponent. Maps with text keys are shown in alphabetical order;
// Inspection.Diagnostic keeps the bytes' own order (bale inspect --raw).

// node is what the schema knows of one data item.
type node struct {
	keys  map[uint64]field // a map with integer keys: their names
	items []field          // an array with named members, by position
	elem  *node            // every element of an array, every value of a text-keyed map
	embed *node            // a byte string holding CBOR of this shape
	text  bool             // a byte string holding UTF-8 text (a JSON document)
	tag   *node            // the content of a tag
	note  func(v any) string
}

type field struct {
	name string
	n    *node
}

// Notes on values.
var (
	timeNote = &node{note: func(v any) string {
		if ms, ok := v.(uint64); ok && ms <= math.MaxInt64 {
			return time.UnixMilli(int64(ms)).UTC().Format("2006-01-02T15:04:05.000Z")
		}
		if ms, ok := v.(int64); ok {
			return time.UnixMilli(ms).UTC().Format("2006-01-02T15:04:05.000Z")
		}
		return ""
	}}
	clockNode = &node{items: []field{{"wall_ms", timeNote}, {"logical", nil}}}
	algNode   = &node{note: func(v any) string {
		if a, ok := v.(int64); ok && a == int64(AlgEd25519) {
			return "Ed25519"
		}
		return ""
	}}
	kindNode = &node{note: func(v any) string {
		if k, ok := v.(uint64); ok && k < 256 && record.Kind(k).Valid() {
			return record.Kind(k).String()
		}
		return ""
	}}
	siteKindNode = &node{note: func(v any) string {
		if k, ok := v.(uint64); ok && k < 256 {
			return record.SiteKind(k).String()
		}
		return ""
	}}
	methodNode = &node{note: func(v any) string {
		if m, ok := v.(uint64); ok && m < 256 {
			return record.Method(m).String()
		}
		return ""
	}}
)

// The maps of the format, named as bundle.cddl names them.
var (
	protectedNode = &node{keys: map[uint64]field{1: {"alg", algNode}, 4: {"kid", nil}}}
	headerNode    = &node{keys: map[uint64]field{1: {"format", nil}, 2: {"version", nil}, 3: {"device", nil},
		4: {"fingerprint", nil}, 5: {"seq", nil}, 6: {"prev", nil}, 7: {"clock", clockNode}, 8: {"events", nil},
		9: {"part", &node{items: []field{{"part", nil}, {"parts", nil}}}}}}
	authorshipNode = &node{keys: map[uint64]field{1: {"format", nil}, 2: {"version", nil}, 3: {"device", nil}, 4: {"events", nil}}}
	proofNode      = &node{tag: &node{items: []field{{"protected", &node{embed: protectedNode}}, {"unprotected", nil},
		{"payload", &node{embed: authorshipNode}}, {"signature", nil}}}}
	siteNode = &node{keys: map[uint64]field{1: {"name", nil}, 2: {"kind", siteKindNode}, 3: {"lat", nil}, 4: {"lon", nil},
		5: {"notes", nil}}}
	baleNode = &node{keys: map[uint64]field{1: {"site", nil}, 2: {"received", timeNote}, 3: {"gross_kg", nil},
		4: {"length_m", nil}, 5: {"width_m", nil}, 6: {"height_m", nil}, 7: {"tag", nil}, 8: {"grader", nil},
		9: {"spec", nil}, 10: {"notes", nil}}}
	pullNode = &node{keys: map[uint64]field{1: {"bale", nil}, 2: {"label", nil}, 3: {"taken", timeNote}, 4: {"kg", nil},
		5: {"pieces", nil}, 6: {"weighed_kg", nil}, 7: {"total_count", nil}}}
	settingNode = &node{keys: map[uint64]field{1: {"kind", nil}, 2: {"name", nil}, 3: {"body", &node{text: true}}}}
	reactorNode = &node{keys: map[uint64]field{1: {"flake_kg", nil}, 2: {"glycol", nil}, 3: {"glycol_kg", nil},
		4: {"strip_eg", nil}, 5: {"glycolysate_kg", nil}, 6: {"hydroxyl_value", nil}, 7: {"hydroxyl_method", methodNode},
		8: {"acid_value", nil}, 9: {"acid_method", methodNode}}}
	measuredNode = &node{keys: map[uint64]field{1: {"line", nil}, 2: {"bales", nil}, 3: {"ran", timeNote},
		4: {"flake_kg", nil}, 5: {"moisture_pct", nil}, 6: {"streams_kg", nil}, 7: {"reactor", reactorNode}, 8: {"notes", nil}}}
	eventNode = &node{keys: map[uint64]field{0: {"version", nil}, 1: {"entity", nil}, 2: {"kind", kindNode},
		3: {"author", nil}, 4: {"clock", clockNode}, 5: {"supersedes", nil}, 6: {"deleted", nil}, 7: {"site", siteNode},
		8: {"bale", baleNode}, 9: {"pull", pullNode}, 10: {"setting", settingNode}, 11: {"demo_record", nil}, 12: {"measured", measuredNode}}}
	entryNode = &node{items: []field{{"id", nil}, {"event", &node{embed: eventNode}}}}
)

// NamedRules lists, per bundle.cddl rule, the names Inspection.Named
// gives its integer keys (TestCDDLNamesMatchInspect holds them to the
// schema's comments).
func NamedRules() map[string]map[uint64]string {
	out := map[string]map[uint64]string{}
	for rule, n := range map[string]*node{"bundle-protected": protectedNode, "bundle-header": headerNode,
		"authorship": authorshipNode, "event": eventNode, "site": siteNode, "bale": baleNode, "pull": pullNode,
		"setting": settingNode, "measured": measuredNode, "reactor": reactorNode} {
		out[rule] = map[uint64]string{}
		for k, f := range n.keys {
			out[rule][k] = f.name
		}
	}
	return out
}

// namedMode decodes what the rendering shows, within the reader's bounds,
// so a hostile file cannot make it run away.
var namedMode cbor.DecMode

func init() {
	var err error
	namedMode, err = cbor.DecOptions{MaxNestedLevels: 32, MaxArrayElements: MaxBundleEvents, MaxMapPairs: 4096,
		IndefLength: cbor.IndefLengthAllowed, TagsMd: cbor.TagsAllowed}.DecMode()
	if err != nil {
		panic(err)
	}
}

// namedBody renders a payload [header, proofs, events] with one proof and
// one event per line. A payload that is not such an array is rendered as
// far as it decodes.
func namedBody(payload []byte) string {
	var v any
	if err := namedMode.Unmarshal(payload, &v); err != nil {
		return fmt.Sprintf("(payload is not well-formed CBOR: %v)", err)
	}
	body, ok := v.([]any)
	if !ok || len(body) != 3 {
		var b strings.Builder
		renderNamed(&b, v, nil)
		return b.String()
	}
	var b strings.Builder
	b.WriteString("[\n  header: ")
	renderNamed(&b, body[0], headerNode)
	b.WriteString(",\n  proofs: ")
	lines(&b, body[1], &node{embed: proofNode})
	b.WriteString(",\n  events: ")
	lines(&b, body[2], entryNode)
	b.WriteString("\n]")
	return b.String()
}

// lines writes an array one element per line.
func lines(b *strings.Builder, v any, elem *node) {
	arr, ok := v.([]any)
	if !ok {
		renderNamed(b, v, nil)
		return
	}
	b.WriteString("[")
	for i, x := range arr {
		if i > 0 {
			b.WriteByte(',')
		}
		b.WriteString("\n    ")
		renderNamed(b, x, elem)
	}
	b.WriteString("\n  ]")
}

// renderNamed writes v in diagnostic notation with the names and notes n
// knows (n may be nil).
func renderNamed(b *strings.Builder, v any, n *node) {
	switch x := v.(type) {
	case map[any]any:
		renderMap(b, x, n)
	case []any:
		b.WriteByte('[')
		for i, e := range x {
			if i > 0 {
				b.WriteString(", ")
			}
			var en *node
			switch {
			case n != nil && i < len(n.items):
				b.WriteString(n.items[i].name + ": ")
				en = n.items[i].n
			case n != nil:
				en = n.elem
			}
			renderNamed(b, e, en)
		}
		b.WriteByte(']')
	case []byte:
		renderBytes(b, x, n)
	case string:
		b.WriteString(strconv.Quote(x))
	case uint64:
		b.WriteString(strconv.FormatUint(x, 10))
	case int64:
		b.WriteString(strconv.FormatInt(x, 10))
	case float64:
		b.WriteString(diagFloat(x))
	case bool:
		b.WriteString(strconv.FormatBool(x))
	case nil:
		b.WriteString("null")
	case cbor.Tag:
		fmt.Fprintf(b, "%d(", x.Number)
		var tn *node
		if n != nil {
			tn = n.tag
		}
		renderNamed(b, x.Content, tn)
		b.WriteByte(')')
	case big.Int:
		b.WriteString(x.String())
	case cbor.SimpleValue:
		fmt.Fprintf(b, "simple(%d)", uint8(x))
	default:
		fmt.Fprintf(b, "%v", x)
	}
	if n != nil && n.note != nil {
		if s := n.note(v); s != "" {
			b.WriteString(" /" + s + "/")
		}
	}
}

// renderMap writes a map: integer keys in ascending order, by name where
// the schema knows them, then every other key in the order of its text.
func renderMap(b *strings.Builder, m map[any]any, n *node) {
	es := make([]mapEntry, 0, len(m))
	for k, v := range m {
		e := mapEntry{v: v}
		if u, ok := k.(uint64); ok {
			e.num, e.isNum = u, true
		} else {
			var kb strings.Builder
			renderNamed(&kb, k, nil)
			e.key = kb.String()
		}
		es = append(es, e)
	}
	sort.Slice(es, func(i, j int) bool {
		if es[i].isNum != es[j].isNum {
			return es[i].isNum
		}
		if es[i].isNum {
			return es[i].num < es[j].num
		}
		return es[i].key < es[j].key
	})
	b.WriteByte('{')
	for i, e := range es {
		if i > 0 {
			b.WriteString(", ")
		}
		var vn *node
		switch f, known := n.field(e); {
		case known:
			b.WriteString(f.name)
			vn = f.n
		case e.isNum:
			b.WriteString(strconv.FormatUint(e.num, 10))
		default:
			b.WriteString(e.key)
			if n != nil {
				vn = n.elem
			}
		}
		b.WriteString(": ")
		renderNamed(b, e.v, vn)
	}
	b.WriteByte('}')
}

// mapEntry is one key and value of a map being written.
type mapEntry struct {
	num   uint64 // an unsigned integer key
	isNum bool
	key   string // any other key, as diagnostic notation
	v     any
}

// field is the name the schema gives a map entry, if any.
func (n *node) field(e mapEntry) (field, bool) {
	if n == nil || !e.isNum || n.keys == nil {
		return field{}, false
	}
	f, ok := n.keys[e.num]
	return f, ok
}

// renderBytes writes a byte string: its CBOR decoded (<<...>>) where the
// schema says it holds some, its text ('...', EDN's byte string given as
// text) where it holds a document, hex otherwise.
func renderBytes(b *strings.Builder, x []byte, n *node) {
	if n != nil && n.embed != nil {
		var inner any
		if err := namedMode.Unmarshal(x, &inner); err == nil {
			b.WriteString("<<")
			renderNamed(b, inner, n.embed)
			b.WriteString(">>")
			return
		}
	}
	if n != nil && n.text && utf8.Valid(x) {
		b.WriteByte('\'')
		for _, r := range string(x) {
			switch {
			case r == '\\' || r == '\'':
				b.WriteString(`\` + string(r))
			case unicode.IsPrint(r):
				b.WriteRune(r)
			default: // controls and direction marks, as strconv writes them
				q := strconv.QuoteRune(r)
				b.WriteString(q[1 : len(q)-1])
			}
		}
		b.WriteByte('\'')
		return
	}
	b.WriteString("h'" + hex.EncodeToString(x) + "'")
}

// diagFloat writes a float as diagnostic notation does, but never with an
// exponent: 548.0, 0.0001, NaN, Infinity.
func diagFloat(x float64) string {
	switch {
	case math.IsNaN(x):
		return "NaN"
	case math.IsInf(x, 1):
		return "Infinity"
	case math.IsInf(x, -1):
		return "-Infinity"
	}
	s := assess.Plain(x)
	if !strings.ContainsAny(s, ".×") {
		s += ".0"
	}
	return s
}
