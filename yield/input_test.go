package yield

import (
	"baleassay/assess"
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// Line profiles and flake specs refuse a repeated key (encoding/json
// keeps the last silently), a control character in a string, and a file
// over the document cap or that is not a regular file.
func TestReadersRefuseAmbiguousJSON(t *testing.T) {
	b, err := json.Marshal(BuiltinLine())
	if err != nil {
		t.Fatal(err)
	}
	doc := string(b)
	twice := strings.Replace(doc, `{`, `{"name":"first",`, 1)
	if _, err := ReadLine(strings.NewReader(twice), "twice.json"); !errors.Is(err, assess.ErrDuplicateKey) {
		t.Errorf("line with a repeated key: %v", err)
	}
	esc := strings.Replace(doc, `"name":"`, `"name":"\u001b[2J`, 1)
	if _, err := ReadLine(strings.NewReader(esc), "esc.json"); !errors.Is(err, assess.ErrControlText) {
		t.Errorf("line with an escape: %v", err)
	}
	if _, err := ReadFlakeSpec(strings.NewReader(`{"name":"a","name":"b"}`), "flake.json"); !errors.Is(err, assess.ErrDuplicateKey) {
		t.Errorf("flake spec with a repeated key: %v", err)
	}
	dir := t.TempDir()
	if _, err := ReadLineFile(dir); !errors.Is(err, assess.ErrNotRegular) {
		t.Errorf("a folder as line profile: %v", err)
	}
	big := filepath.Join(dir, "big.json")
	os.WriteFile(big, []byte(strings.Repeat(" ", assess.MaxDocumentFileBytes)+"{}"), 0o600)
	if _, err := ReadFlakeSpecFile(big); !errors.Is(err, assess.ErrFileTooLarge) {
		t.Errorf("oversized flake spec: %v", err)
	}
}
