package transfer

import (
	"baleassay/assess"
	"baleassay/data/record"
	"os"
	"reflect"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"
)

// cddlRule returns the text of rule name in bundle.cddl: from "name ="
// to the next line that starts a rule.
func cddlRule(t *testing.T, src, name string) string {
	t.Helper()
	start := regexp.MustCompile(`(?m)^` + regexp.QuoteMeta(name) + ` = `).FindStringIndex(src)
	if start == nil {
		t.Fatalf("bundle.cddl has no rule %s", name)
	}
	rest := src[start[1]:]
	if end := regexp.MustCompile(`(?m)^[a-z][a-z0-9-]* = `).FindStringIndex(rest); end != nil {
		rest = rest[:end[0]]
	}
	return rest
}

// cddlKeys lists the integer map keys ("N =>") of a rule, comments left out.
func cddlKeys(rule string) []int {
	var keys []int
	for _, line := range strings.Split(rule, "\n") {
		if i := strings.Index(line, ";"); i >= 0 {
			line = line[:i]
		}
		for _, m := range regexp.MustCompile(`(?:^|[\s(,?])(\d+) =>`).FindAllStringSubmatch(line, -1) {
			n, _ := strconv.Atoi(m[1])
			keys = append(keys, n)
		}
	}
	slices.Sort(keys)
	return slices.Compact(keys)
}

// structKeys lists the CBOR integer keys of a struct type's fields.
func structKeys(v any) []int {
	var keys []int
	rt := reflect.TypeOf(v)
	for i := range rt.NumField() {
		tag := rt.Field(i).Tag.Get("cbor")
		if n, err := strconv.Atoi(strings.Split(tag, ",")[0]); err == nil {
			keys = append(keys, n)
		}
	}
	slices.Sort(keys)
	return keys
}

// TestCDDLMatchesCode holds bundle.cddl to the code: every map's integer
// keys equal the struct tags, the version numbers equal the constants,
// and the category keys equal the catalogue of package assess. (No CDDL
// validator is at hand in CI; this keeps the schema from drifting.)
func TestCDDLMatchesCode(t *testing.T) {
	b, err := os.ReadFile("bundle.cddl")
	if err != nil {
		t.Fatal(err)
	}
	src := string(b)
	eventKeys := append(append(cddlKeys(cddlRule(t, src, "event")), cddlKeys(cddlRule(t, src, "live"))...), cddlKeys(cddlRule(t, src, "tombstone"))...)
	slices.Sort(eventKeys)
	eventKeys = slices.Compact(eventKeys)
	for _, c := range []struct {
		rule string
		got  []int
		want []int
	}{
		{"event", eventKeys, structKeys(record.Event{})},
		{"site", cddlKeys(cddlRule(t, src, "site")), structKeys(record.SiteRecord{})},
		{"bale", cddlKeys(cddlRule(t, src, "bale")), structKeys(record.BaleRecord{})},
		{"pull", cddlKeys(cddlRule(t, src, "pull")), structKeys(record.PullRecord{})},
		{"setting", cddlKeys(cddlRule(t, src, "setting")), structKeys(record.SettingRecord{})},
		{"measured", cddlKeys(cddlRule(t, src, "measured")), structKeys(record.MeasuredRecord{})},
		{"reactor", cddlKeys(cddlRule(t, src, "reactor")), structKeys(record.ReactorRecord{})},
		{"bundle-header", cddlKeys(cddlRule(t, src, "bundle-header")), structKeys(headerWire{})},
		{"authorship", cddlKeys(cddlRule(t, src, "authorship")), []int{1, 2, 3, 4}},
	} {
		if !slices.Equal(c.got, c.want) {
			t.Errorf("%s: CDDL keys %v, code %v", c.rule, c.got, c.want)
		}
	}
	for _, c := range []struct{ rule, want string }{
		{"bundle-header", "2 => " + strconv.Itoa(BundleVersion) + ","},
		{"bundle-header", `1 => "` + BundleFormat + `"`},
		{"authorship", "2 => " + strconv.Itoa(authorshipVersion) + ","},
		{"authorship", `1 => "` + AuthorshipFormat + `"`},
		{"event", "0 => " + strconv.Itoa(record.FormatVersion) + ","},
		{"kg", "0.0.." + strconv.FormatFloat(record.MaxBaleKg, 'f', 1, 64)},
		{"dim-m", "0.0.." + strconv.FormatFloat(record.MaxBaleDimM, 'f', 1, 64)},
		{"clock-ms", strconv.FormatInt(record.MinTimeMs, 10) + ".." + strconv.FormatInt(record.MaxTimeMs-1, 10)},
		{"date-ms", strconv.FormatInt(record.MinDateMs, 10) + ".." + strconv.FormatInt(record.MaxTimeMs-1, 10)},
		{"pull", "0.." + strconv.Itoa(record.MaxPieces)},
		{"pull", "7 => 1.." + strconv.Itoa(record.MaxPieces) + ","},
		{"measured", "[1*" + strconv.Itoa(record.MaxBatchBales) + " entity-id]"},
		{"measured", "0.0.." + strconv.FormatFloat(record.MaxFlakeMoisturePct, 'f', 1, 64)},
		{"bundle-body", "at most " + strconv.Itoa(MaxBundleProofs)},
	} {
		if !strings.Contains(cddlRule(t, src, c.rule), c.want) {
			t.Errorf("%s does not say %q", c.rule, c.want)
		}
	}
	var cats []string
	for _, m := range regexp.MustCompile(`"([a-z_]+)"`).FindAllStringSubmatch(cddlRule(t, src, "category-key"), -1) {
		cats = append(cats, m[1])
	}
	if !slices.Equal(cats, assess.CategoryKeys()) {
		t.Errorf("category-key %v, catalogue %v", cats, assess.CategoryKeys())
	}
}

// TestCDDLNamesMatchInspect holds the field names bale inspect prints to
// bundle.cddl: every integer key of a rule is named, and its name is the
// one the rule's comment gives ("3 => kg, ; gross_kg: ...") or, for a
// payload, the rule it points to ("7 => site").
func TestCDDLNamesMatchInspect(t *testing.T) {
	b, err := os.ReadFile("bundle.cddl")
	if err != nil {
		t.Fatal(err)
	}
	src := string(b)
	rules := NamedRules()
	if len(rules) != 10 {
		t.Fatalf("%d named rules, want 10", len(rules))
	}
	for rule, names := range rules {
		text := cddlRule(t, src, rule)
		if rule == "event" {
			text += cddlRule(t, src, "live") + cddlRule(t, src, "tombstone")
		}
		keys := cddlKeys(text)
		if len(keys) != len(names) {
			t.Errorf("%s: CDDL keys %v, named %v", rule, keys, names)
		}
		for _, k := range keys {
			name, ok := names[uint64(k)]
			if !ok {
				t.Errorf("%s: key %d has no name", rule, k)
				continue
			}
			commented := regexp.MustCompile(`(?m)^\s*\??\s*` + strconv.Itoa(k) + ` =>[^;\n]*;\s*` + regexp.QuoteMeta(name) + `(:|$)`)
			payload := regexp.MustCompile(`(^|[\s(,])` + strconv.Itoa(k) + ` => ` + regexp.QuoteMeta(name) + `\b`)
			if !commented.MatchString(text) && !payload.MatchString(text) {
				t.Errorf("%s: key %d is named %q, which bundle.cddl does not give it", rule, k, name)
			}
		}
	}
}
