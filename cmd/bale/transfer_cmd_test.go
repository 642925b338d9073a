package main

import (
	"baleassay/data/desk"
	"baleassay/data/record"
	"baleassay/data/store"
	"baleassay/data/transfer"
	"bytes"
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// bale runs one command line and returns status, stdout and stderr.
func bale(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(args, &out, &errb)
	return code, out.String(), errb.String()
}

// grader makes a store with three invented sites saved on it.
func grader(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	s, _, err := transfer.OpenStore(dir, store.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	var evs []record.Event
	for i, n := range []string{"Eastfield yard", "Canal depot", "Mill lane MRF"} {
		evs = append(evs, record.Event{Kind: record.KindSite, Site: &record.SiteRecord{Name: n, Lat: 51.5 + float64(i)/10, Lon: -0.1}})
	}
	if _, err := s.Save(evs, store.SaveOptions{}); err != nil {
		t.Fatal(err)
	}
	return dir
}

func TestKeyCommand(t *testing.T) {
	dir := t.TempDir()
	pub := filepath.Join(t.TempDir(), "tablet.pem")
	code, out, errs := bale(t, "key", "--store", dir, "--public", pub)
	if code != 0 || !strings.Contains(out, "fingerprint: ") || !strings.Contains(out, "A new signing key") {
		t.Fatalf("key: %d %q %q", code, out, errs)
	}
	st, err := os.Stat(filepath.Join(dir, transfer.KeyFileName))
	if err != nil || st.Mode().Perm() != 0o600 { // common practice: private keys owner-only
		t.Fatalf("key file mode %v, err %v; want 0600", st.Mode().Perm(), err)
	}
	code, out2, _ := bale(t, "key", "--store", dir, "--json")
	var j struct{ Device, Fingerprint string }
	if code != 0 || json.Unmarshal([]byte(out2), &j) != nil || !strings.Contains(out, j.Fingerprint) || len(j.Device) != 32 {
		t.Fatalf("key --json: %d %q", code, out2)
	}
	if b, _ := os.ReadFile(pub); !bytes.Contains(b, []byte("BEGIN PUBLIC KEY")) {
		t.Fatalf("public key file %q", b)
	}
	if code, _, _ := bale(t, "key", "extra", "--store", dir); code != 2 {
		t.Fatalf("key with an argument: status %d, want 2", code)
	}
}

func TestTrustCommands(t *testing.T) {
	lab, tablet := t.TempDir(), t.TempDir()
	pub := filepath.Join(t.TempDir(), "tablet.pem")
	bale(t, "key", "--store", tablet, "--public", pub)
	_, kj, _ := bale(t, "key", "--store", tablet, "--json")
	var k struct{ Fingerprint string }
	json.Unmarshal([]byte(kj), &k)
	if code, out, e := bale(t, "trust", "add", pub, "--name", "tablet north", "--yes", "--store", lab); code != 0 || !strings.Contains(out, "public key file") {
		t.Fatalf("trust add FILE: %d %q %q", code, out, e)
	}
	if code, _, e := bale(t, "trust", "add", k.Fingerprint, "--name", "again", "--yes", "--store", lab); code != 1 || !strings.Contains(e, "already trusted") {
		t.Fatalf("trust add twice: %d %q", code, e)
	}
	code, out, _ := bale(t, "trust", "list", "--json", "--store", lab)
	var list []struct{ Name, Fingerprint string }
	if code != 0 || json.Unmarshal([]byte(out), &list) != nil || len(list) != 1 || list[0].Fingerprint != k.Fingerprint {
		t.Fatalf("trust list --json: %q", out)
	}
	if code, _, _ := bale(t, "trust", "add", "not-a-fingerprint", "--name", "x", "--yes", "--store", lab); code != 2 {
		t.Fatalf("bad fingerprint: status %d, want 2 (a wrong argument)", code)
	}
	if code, _, _ := bale(t, "trust", "add", k.Fingerprint, "--yes", "--store", lab); code != 2 {
		t.Fatalf("missing --name: status %d, want 2", code)
	}
	if code, out, _ := bale(t, "trust", "remove", "tablet north", "--store", lab); code != 0 || !strings.Contains(out, "no longer trusted") {
		t.Fatalf("trust remove: %d %q", code, out)
	}
	if code, out, _ := bale(t, "trust", "list", "--store", lab); code != 0 || !strings.Contains(out, "no trusted keys") {
		t.Fatalf("empty list: %q", out)
	}
	if code, _, e := bale(t, "trust", "add", k.Fingerprint, "--name", "me", "--yes", "--store", tablet); code != 1 || !strings.Contains(e, "own key") {
		t.Fatalf("trusting own key: %d %q", code, e)
	}
}

func TestExportImportInspectCommands(t *testing.T) {
	tablet, lab := grader(t), t.TempDir()
	stick := t.TempDir()
	file := filepath.Join(stick, "north.bale")
	code, out, e := bale(t, "export", "--to", file, "--since-last", "lab", "--store", tablet)
	if code != 0 || !strings.Contains(out, "3 events") {
		t.Fatalf("export: %d %q %q", code, out, e)
	}
	if code, out, _ := bale(t, "export", "--to", file, "--since-last", "lab", "--store", tablet); code != 0 || !strings.Contains(out, "nothing new for lab") {
		t.Fatalf("second export: %q", out)
	}
	if code, _, _ := bale(t, "export", "--to", file, "--all", "--since-last", "lab", "--store", tablet); code != 2 {
		t.Fatal("--all with --since-last accepted")
	}
	// Unknown signer: refused with the fingerprint and the trust command.
	code, out, e = bale(t, "import", file, "--store", lab)
	if code != 1 || !strings.Contains(out, "not trusted") || !strings.Contains(out, "bale trust add "+file) {
		t.Fatalf("untrusted import: %d %q %q", code, out, e)
	}
	if code, _, e := bale(t, "trust", "add", file, "--name", "tablet north", "--yes", "--store", lab); code != 0 {
		t.Fatalf("trust add BUNDLE: %q", e)
	}
	code, out, _ = bale(t, "import", file, "--store", lab)
	if code != 0 || !strings.Contains(out, "3 new, 0 already present, 0 conflicts created") {
		t.Fatalf("import: %d %q", code, out)
	}
	code, out, _ = bale(t, "import", file, "--store", lab, "--json")
	var rep struct {
		Files []struct {
			New, Present int
			Replay       bool
			Error        string
		}
	}
	if code != 0 || json.Unmarshal([]byte(out), &rep) != nil || len(rep.Files) != 1 || rep.Files[0].Present != 3 || !rep.Files[0].Replay {
		t.Fatalf("re-import --json: %d %q", code, out)
	}
	// A folder with a good file and a tampered copy: progress lines on
	// stderr, the tampered one refused, exit status 1.
	raw, _ := os.ReadFile(file)
	raw[len(raw)/2] ^= 0x01
	os.WriteFile(filepath.Join(stick, "north-copy.bale"), raw, 0o644)
	code, out, e = bale(t, "import", stick, "--store", lab)
	if code != 1 || !strings.Contains(out, "tampered") || !strings.Contains(e, "import: file 2 of 2") {
		t.Fatalf("folder import: %d\n%s\n%s", code, out, e)
	}
	code, out, _ = bale(t, "inspect", file, "--store", lab)
	if code != 0 || !strings.Contains(out, "signature:  verifies") || !strings.Contains(out, `trusted as "tablet north"`) || !strings.Contains(out, "<<{") {
		t.Fatalf("inspect: %d %q", code, out)
	}
	code, out, e = bale(t, "inspect", filepath.Join(stick, "north-copy.bale"), "--store", lab)
	if code != 1 || !strings.Contains(out, "DOES NOT VERIFY") || !strings.Contains(e, "would be refused") {
		t.Fatalf("inspect tampered: %d %q %q", code, out, e)
	}
}

// TestProgressBar drives the terminal form of the import progress: a bar
// redrawn with carriage returns, ended by a newline after the last file.
func TestProgressBar(t *testing.T) {
	var buf bytes.Buffer
	p := &progress{w: &buf, tty: true, files: 2}
	for i := 1; i <= 2; i++ {
		p.show(desk.Progress{File: "f.bale", Done: i - 1, Of: 2, Step: desk.StepApplying, Events: 10})
		p.show(desk.Progress{File: "f.bale", Done: i, Of: 2, Step: desk.StepDone, Events: 10, EventsSoFar: 10 * i})
	}
	out := buf.String()
	if !strings.HasPrefix(out, "\r[") || !strings.Contains(out, "] 2/2 files, 20 events") || !strings.HasSuffix(out, "\n") ||
		strings.Count(out, "\n") != 1 || !strings.Contains(out, "############") {
		t.Fatalf("progress bar output %q", out)
	}
	// Not a terminal and a single small file: no progress lines at all.
	buf.Reset()
	p = newProgress(&buf, 1)
	p.show(desk.Progress{Done: 0, Of: 1, Step: desk.StepApplying, Events: 5})
	if buf.Len() != 0 || p.tty {
		t.Fatalf("quiet case printed %q (tty %v)", buf.String(), p.tty)
	}
}

func TestExportToMissingFolder(t *testing.T) {
	dir := t.TempDir()
	var out, errb bytes.Buffer
	if code := run([]string{"sites", "add", "--name", "Test Yard", "--lat", "45.1", "--lon", "4.7", "--store", dir}, &out, &errb); code != 0 {
		t.Fatalf("sites add: %d %s", code, errb.String())
	}
	missing := filepath.Join(t.TempDir(), "no-stick") + string(os.PathSeparator)
	out.Reset()
	errb.Reset()
	code := run([]string{"export", "--to", missing, "--store", dir}, &out, &errb)
	if code != 1 || !strings.Contains(errb.String(), "does not exist") {
		t.Errorf("export to a missing folder: exit %d, %q", code, errb.String())
	}
	if _, err := os.Stat(missing); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("export created %s", missing)
	}
}
