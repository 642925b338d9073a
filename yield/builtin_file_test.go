package yield

import (
	"bytes"
	"encoding/json"
	"flag"
	"os"
	"testing"
)

var update = flag.Bool("update", false, "rewrite ../testdata/lines/builtin-hot-wash.json from BuiltinLine")

const builtinLineFile = "../testdata/lines/builtin-hot-wash.json"

// TestBuiltinLineFile keeps the JSON copy of the built-in line, the one
// users start from, equal to BuiltinLine. Regenerate with -update.
func TestBuiltinLineFile(t *testing.T) {
	want, err := json.MarshalIndent(BuiltinLine(), "", "  ")
	if err != nil {
		t.Fatal(err)
	}
	want = append(want, '\n')
	if *update {
		if err := os.WriteFile(builtinLineFile, want, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	got, err := os.ReadFile(builtinLineFile)
	if err != nil {
		t.Fatalf("%v (run go test ./yield -run TestBuiltinLineFile -update)", err)
	}
	// Source: common practice (golden file of our own built-in profile).
	if !bytes.Equal(got, want) {
		t.Errorf("%s differs from BuiltinLine; run with -update", builtinLineFile)
	}
	if _, err := ReadLineFile(builtinLineFile); err != nil {
		t.Error(err)
	}
}
