package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestSettingsAddListShowTravel(t *testing.T) {
	tablet, lab, usb := t.TempDir(), t.TempDir(), t.TempDir()
	spec := filepath.Join(t.TempDir(), "spec.json")
	// The limits are illustrative inputs; the test checks storage, not grading.
	v1 := `{"name":"yard-7-glycol","limits":[{"item":"pvc","max":0.01}]}`
	v2 := `{"name":"yard-7-glycol","limits":[{"item":"pvc","max":0.005}]}`
	os.WriteFile(spec, []byte(v1), 0o644)
	if code, _, errs := runCLI(t, "settings", "add", "spec", spec, "--store", tablet); code != 0 {
		t.Fatalf("add: %d %s", code, errs)
	}
	os.WriteFile(spec, []byte(v2), 0o644)
	code, out, errs := runCLI(t, "settings", "add", "spec", spec, "--store", tablet)
	if code != 0 || !strings.Contains(out, "updated") {
		t.Fatalf("update: %d %q %s", code, out, errs)
	}
	code, out, _ = runCLI(t, "settings", "list", "--json", "--store", tablet)
	var rows []struct{ Kind, Name string }
	if code != 0 || json.Unmarshal([]byte(out), &rows) != nil || len(rows) != 1 || rows[0].Name != "yard-7-glycol" || rows[0].Kind != "spec" {
		t.Fatalf("list: %d %s", code, out)
	}
	if code, out, _ := runCLI(t, "settings", "show", "yard-7-glycol", "--store", tablet); code != 0 || out != v2 {
		t.Fatalf("show: %d %q", code, out)
	}
	// The spec travels in a bundle to the lab.
	if code, _, errs := runCLI(t, "export", "--to", usb+string(os.PathSeparator), "--all", "--store", tablet); code != 0 {
		t.Fatalf("export: %s", errs)
	}
	files, _ := filepath.Glob(filepath.Join(usb, "*.bale"))
	if len(files) != 1 {
		t.Fatalf("bundles: %v", files)
	}
	if code, _, errs := runCLI(t, "trust", "add", files[0], "--name", "tablet", "--yes", "--store", lab); code != 0 {
		t.Fatalf("trust: %s", errs)
	}
	if code, _, errs := runCLI(t, "import", files[0], "--store", lab); code != 0 {
		t.Fatalf("import: %s", errs)
	}
	if code, out, _ := runCLI(t, "settings", "show", "yard-7-glycol", "--store", lab); code != 0 || out != v2 {
		t.Fatalf("show at the lab: %d %q", code, out)
	}
}

func TestSettingsRefuseBadDocuments(t *testing.T) {
	store := t.TempDir()
	dir := t.TempDir()
	good := filepath.Join(dir, "good.json")
	os.WriteFile(good, []byte(`{"name":"kept","limits":[{"item":"pvc","max":0.01}]}`), 0o644)
	if code, _, errs := runCLI(t, "settings", "add", "spec", good, "--store", store); code != 0 {
		t.Fatalf("add: %s", errs)
	}
	cases := []struct {
		kind, body string
		code       int
		mention    string
	}{
		{"spec", `{"name":"x","limits":[{"item":"pvc","max":5}]}`, 1, "0 to 1"},
		{"spec", `{"name":"x","limits":[],"colour":"red"}`, 1, "colour"},
		{"spec", `{"limits":[]`, 1, "malformed"},
		{"line", `{"name":"l","stages":[{"kind":"boil"}]}`, 1, "boil"},
		{"recipe", `{}`, 2, "spec or line"},
	}
	for i, c := range cases {
		p := filepath.Join(dir, "doc.json")
		os.WriteFile(p, []byte(c.body), 0o644)
		code, out, errs := runCLI(t, "settings", "add", c.kind, p, "--store", store)
		if code != c.code || !strings.Contains(errs, c.mention) || out != "" {
			t.Errorf("case %d: exit %d, %q; want %d mentioning %q", i, code, errs, c.code, c.mention)
		}
	}
	code, out, _ := runCLI(t, "settings", "list", "--json", "--store", store)
	var rows []struct{ Name string }
	if code != 0 || json.Unmarshal([]byte(out), &rows) != nil || len(rows) != 1 || rows[0].Name != "kept" {
		t.Errorf("a refused document changed the settings: %s", out)
	}
}
