package data

import (
	"go/parser"
	"go/token"
	"io/fs"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
)

// module is the module path of go.mod.
const module = "baleassay"

// gio is the prefix of every Gio import.
const gio = "gioui.org"

// allowed lists, for every package of the module (path below the module
// root; "x/..." covers x's sub-packages), the project packages it may
// import, and gio where it may import Gio. Test files may also import
// their own package and data/internal/testkit. A package missing here
// fails the test: add it, with what it may import, on purpose.
var allowed = map[string][]string{
	"assess":                {},
	"yield":                 {"assess"},
	"data":                  {},
	"data/record":           {"assess", "yield"},
	"data/geo":              {"data/record"},
	"data/store":            {"assess", "data/record", "data/geo"},
	"data/transfer":         {"assess", "data/record", "data/store"},
	"data/demo":             {"assess", "yield", "data/record", "data/store", "data/transfer"},
	"data/internal/testkit": {"data/record"},
	"data/desk":             {"assess", "yield", "data/record", "data/geo", "data/store", "data/transfer", "data/demo", "data/publish"},
	"data/publish":          {"assess", "yield", "data/record", "data/store"},
	"data/report":           {"data/desk", "assess", "yield", "data/record", "data/geo"},
	"data/publish/pgtest":   {},
	"cmd/bale":              {"data/desk", "assess", "yield", "data/record", "data/geo", "data/publish", "data/report"},
	"ui/...":                {"data/desk", "assess", "yield", "data/record", "data/geo", "data/transfer", "ui/...", gio},
	"cmd/baleassay":         {"ui/...", "data/desk", gio},
}

// testOnly are extra imports some packages' tests need.
var testOnly = map[string][]string{
	"cmd/bale":      {"data/store", "data/transfer", "data/publish/pgtest"},
	"data/transfer": {"assess"},
	"data/demo":     {"data/geo"},
	"data/report":   {"data/demo"},
	"data/publish":  {"data/demo", "data/geo", "data/publish/pgtest"},
	"data/desk":     {"data/publish/pgtest"},
}

func TestImportAllowList(t *testing.T) {
	root, err := filepath.Abs("..")
	if err != nil {
		t.Fatal(err)
	}
	pkgs := map[string][2]map[string]bool{} // rel dir → {non-test imports, test imports}
	err = filepath.WalkDir(root, func(path string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() {
			if n := d.Name(); path != root && (n == "testdata" || n == "bin" || strings.HasPrefix(n, ".") || strings.HasPrefix(n, "_")) {
				return filepath.SkipDir
			}
			return nil
		}
		if !strings.HasSuffix(path, ".go") {
			return nil
		}
		rel, _ := filepath.Rel(root, filepath.Dir(path))
		rel = filepath.ToSlash(rel)
		f, err := parser.ParseFile(token.NewFileSet(), path, nil, parser.ImportsOnly)
		if err != nil {
			return err
		}
		sets, ok := pkgs[rel]
		if !ok {
			sets = [2]map[string]bool{{}, {}}
			pkgs[rel] = sets
		}
		which := 0
		if strings.HasSuffix(path, "_test.go") {
			which = 1
		}
		for _, im := range f.Imports {
			p, _ := strconv.Unquote(im.Path.Value)
			sets[which][p] = true
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if len(pkgs) < 8 {
		t.Fatalf("found only %d packages under %s: the walk is broken", len(pkgs), root)
	}
	for rel, sets := range pkgs {
		if rel == "." {
			continue
		}
		list, ok := lookup(allowed, rel)
		if !ok {
			t.Errorf("package %s is not in the allow-list of data/imports_test.go: add it with the project packages it may import", rel)
			continue
		}
		extra, _ := lookup(testOnly, rel)
		for which, set := range sets {
			for p := range set {
				var rule string
				switch {
				case strings.HasPrefix(p, gio+"/") || p == gio:
					rule = gio
				case strings.HasPrefix(p, module+"/"):
					rule = strings.TrimPrefix(p, module+"/")
				default:
					continue // standard library and third-party modules
				}
				if permits(list, rule) || which == 1 && (rule == rel || rule == "data/internal/testkit" || permits(extra, rule)) {
					continue
				}
				kind := ""
				if which == 1 {
					kind = " (in a test)"
				}
				t.Errorf("%s imports %s%s, which its allow-list does not permit: %v", rel, p, kind, list)
			}
		}
	}
}

// lookup finds rel's entry, exact or by a "x/..." pattern.
func lookup(m map[string][]string, rel string) ([]string, bool) {
	if l, ok := m[rel]; ok {
		return l, true
	}
	for k, l := range m {
		if base, ok := strings.CutSuffix(k, "/..."); ok && (rel == base || strings.HasPrefix(rel, base+"/")) {
			return l, true
		}
	}
	return nil, false
}

// permits reports whether rule (a package path below the module, or gio)
// is in list, directly or through a "x/..." entry.
func permits(list []string, rule string) bool {
	if slices.Contains(list, rule) {
		return true
	}
	for _, k := range list {
		if base, ok := strings.CutSuffix(k, "/..."); ok && (rule == base || strings.HasPrefix(rule, base+"/")) {
			return true
		}
	}
	return false
}

// TestImportAllowListCatches proves the check fails on a package that is
// missing from the list and on a forbidden import.
func TestImportAllowListCatches(t *testing.T) {
	if _, ok := lookup(allowed, "data/newroom"); ok {
		t.Error("an unlisted package was found in the allow-list")
	}
	if list, _ := lookup(allowed, "data/record"); permits(list, "data/store") {
		t.Error("record may import store: imports would point both ways")
	}
	if list, _ := lookup(allowed, "cmd/bale"); permits(list, "data/transfer") || permits(list, "data/store") {
		t.Error("the CLI may reach past the desk into transfer or the store")
	}
	for _, p := range []string{"assess", "yield", "data/record", "data/store", "data/transfer"} {
		if list, _ := lookup(allowed, p); permits(list, gio) {
			t.Errorf("domain package %s may import Gio", p)
		}
	}
	if list, _ := lookup(allowed, "ui/screens"); !permits(list, "ui/widget") || !permits(list, gio) {
		t.Error("ui sub-packages should follow the ui/... rule")
	}
	if _, err := os.Stat("../go.mod"); err != nil {
		t.Fatalf("the module root is not one folder up: %v", err)
	}
}
