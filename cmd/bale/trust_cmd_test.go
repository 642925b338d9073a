package main

// Source: names and keys here are invented test inputs; checks compare
// against the rules of the trust list and the transfer layer.

import (
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"
)

// TestMain lets the trust race test run this binary as the bale command
// in child processes (env BALE_TEST_AS_CLI=1), as separate bale
// processes race in use.
func TestMain(m *testing.M) {
	if os.Getenv("BALE_TEST_AS_CLI") == "1" {
		os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
	}
	os.Exit(m.Run())
}

// tabletKey makes a tablet store and returns its fingerprint and the
// path of its public key file.
func tabletKey(t *testing.T) (fp, pem string) {
	t.Helper()
	dir := t.TempDir()
	pem = filepath.Join(t.TempDir(), "tablet.pem")
	if code, _, e := bale(t, "key", "--store", dir, "--public", pem); code != 0 {
		t.Fatalf("key: %s", e)
	}
	_, out, _ := bale(t, "key", "--store", dir, "--json")
	var k struct{ Fingerprint string }
	if err := json.Unmarshal([]byte(out), &k); err != nil {
		t.Fatal(err)
	}
	return k.Fingerprint, pem
}

func trustedNames(t *testing.T, lab string) []string {
	t.Helper()
	_, out, _ := bale(t, "trust", "list", "--json", "--store", lab)
	var l []struct{ Name, Fingerprint, Device string }
	if err := json.Unmarshal([]byte(out), &l); err != nil {
		t.Fatalf("%v: %q", err, out)
	}
	var names []string
	for _, e := range l {
		if !strings.HasPrefix(strings.ReplaceAll(e.Fingerprint, "-", ""), e.Device) {
			t.Fatalf("device %s is not its key's %s", e.Device, e.Fingerprint)
		}
		names = append(names, e.Name)
	}
	return names
}

// trust add shows the key and its device and trusts only when confirmed:
// on a terminal by answering y, in scripts with --yes or --expect.
func TestTrustAddConfirms(t *testing.T) {
	defer func(i func() bool) { interactive = i }(interactive)
	fp, pem := tabletKey(t)
	lab := t.TempDir()
	interactive = func() bool { return false }
	code, out, e := bale(t, "trust", "add", pem, "--name", "tablet", "--store", lab)
	if code != 2 || !strings.Contains(e, "no terminal") || !strings.Contains(out, "key:     "+fp) || !strings.Contains(out, "device:  "+strings.ReplaceAll(fp, "-", "")[:32]) {
		t.Fatalf("unconfirmed add: %d %q %q", code, out, e)
	}
	interactive = func() bool { return true }
	confirmIn = strings.NewReader("n\n")
	if code, out, _ := bale(t, "trust", "add", pem, "--name", "tablet", "--store", lab); code != 0 || !strings.Contains(out, "not trusted") {
		t.Fatalf("answer n: %d %q", code, out)
	}
	if n := trustedNames(t, lab); len(n) != 0 {
		t.Fatalf("trusted after no: %v", n)
	}
	confirmIn = strings.NewReader("y\n")
	if code, out, e := bale(t, "trust", "add", pem, "--name", "tablet", "--store", lab); code != 0 || !strings.Contains(out, "trusted "+fp) {
		t.Fatalf("answer y: %d %q %q", code, out, e)
	}
	interactive = func() bool { return false }
	fp2, pem2 := tabletKey(t)
	wrong := []byte(fp2[:17])
	wrong[0] = "01"[map[bool]int{true: 1, false: 0}[wrong[0] == '0']]
	if code, _, e := bale(t, "trust", "add", pem2, "--name", "south", "--expect", string(wrong), "--store", lab); code != 1 || !strings.Contains(e, "does not match") {
		t.Fatalf("wrong --expect: %d %q", code, e)
	}
	if code, _, e := bale(t, "trust", "add", pem2, "--name", "south", "--expect", fp2[:8], "--store", lab); code != 2 || !strings.Contains(e, "at least 16") {
		t.Fatalf("short --expect: %d %q", code, e)
	}
	if code, _, e := bale(t, "trust", "add", pem2, "--name", "This Device", "--expect", fp2[:17], "--store", lab); code != 1 || !strings.Contains(e, "own key is called") {
		t.Fatalf("reserved name: %d %q", code, e)
	}
	if code, _, e := bale(t, "trust", "add", pem2, "--name", "TABLET", "--expect", fp2[:17], "--store", lab); code != 1 || !strings.Contains(e, "already used") {
		t.Fatalf("name in other case: %d %q", code, e)
	}
	if code, _, e := bale(t, "trust", "add", pem2, "--name", "south", "--expect", fp2[:17], "--store", lab); code != 0 {
		t.Fatalf("right --expect: %d %q", code, e)
	}
	if n := trustedNames(t, lab); strings.Join(n, ",") != "south,tablet" {
		t.Fatalf("trusted %v", n)
	}
}

// A repeated flag and a number that is not a plain decimal are usage
// errors (before, the last flag won and 0x1p9 read as 512).
func TestFlagsStrict(t *testing.T) {
	dir := t.TempDir()
	for _, args := range [][]string{
		{"sites", "add", "--name", "A yard", "--name", "B yard", "--lat", "52", "--lon", "1", "--store", dir},
		{"sites", "add", "--name", "A yard", "--lat", "0x1p5", "--lon", "1", "--store", dir},
		{"sites", "add", "--name", "A yard", "--lat", "5_2", "--lon", "1", "--store", dir},
		{"sites", "add", "--name", "A yard", "--lat", "52", "--lon", "Inf", "--store", dir},
		{"assess", "../../testdata/demo-bale-0417.csv", "--bale-kg", "0x1p9"},
		{"assess", "../../testdata/demo-bale-0417.csv", "--bale-kg", "548", "--bale-kg", "600"},
		{"export", "--to", dir, "--part-mb", "0x4", "--store", dir},
		{"sites", "near", "0x1p4", "4", "--store", dir},
	} {
		code, out, e := bale(t, args...)
		if code != 2 || out != "" {
			t.Errorf("%v: exit %d, out %q, err %q; want a usage error", args, code, out, e)
		}
	}
}

// Export never replaces a file without --force; import and inspect
// refuse a FIFO at once.
func TestExportForceAndFIFO(t *testing.T) {
	tablet := grader(t)
	stick := t.TempDir()
	file := filepath.Join(stick, "north.bale")
	os.WriteFile(file, []byte("someone else's bundle"), 0o644)
	if code, _, e := bale(t, "export", "--to", file, "--store", tablet); code != 1 || !strings.Contains(e, "--force") {
		t.Fatalf("export over a file: %d %q", code, e)
	}
	if b, _ := os.ReadFile(file); string(b) != "someone else's bundle" {
		t.Fatal("the file was replaced")
	}
	if code, out, e := bale(t, "export", "--to", file, "--force", "--store", tablet); code != 0 || !strings.Contains(out, "wrote "+file) {
		t.Fatalf("--force: %d %q %q", code, out, e)
	}
	fifo := filepath.Join(stick, "pipe.bale")
	if err := mkfifo(fifo); err != nil {
		t.Skipf("no FIFO: %v", err)
	}
	for _, cmd := range [][]string{{"inspect", fifo}, {"import", fifo, "--store", t.TempDir()}} {
		done := make(chan int, 1)
		go func() { code, _, _ := bale(t, cmd...); done <- code }()
		select {
		case code := <-done:
			if code != 1 {
				t.Errorf("%v: exit %d, want 1", cmd, code)
			}
		case <-time.After(10 * time.Second):
			t.Fatalf("%v blocked on a FIFO", cmd)
		}
	}
}

// TestTrustRaceProcesses: separate bale processes remove one key and add
// two others at once, 100 rounds (issue 10 §7: at least 100): every
// change a process reported done is in the list afterwards. Before the
// store's lock guarded the list, 12 of 30 such rounds kept a removed key.
func TestTrustRaceProcesses(t *testing.T) {
	if testing.Short() {
		t.Skip("spawns 300 processes")
	}
	exe, err := os.Executable()
	if err != nil {
		t.Fatal(err)
	}
	fps := make([]string, 3)
	for i := range fps {
		fps[i], _ = tabletKey(t)
	}
	rounds := 100 // Source: issue 10 §7
	lost, done := 0, 0
	for round := range rounds {
		lab := t.TempDir()
		if code, _, e := bale(t, "trust", "add", fps[0], "--name", "old", "--yes", "--store", lab); code != 0 {
			t.Fatal(e)
		}
		cmds := [][]string{
			{"trust", "remove", "old", "--store", lab},
			{"trust", "add", fps[1], "--name", "first", "--yes", "--store", lab},
			{"trust", "add", fps[2], "--name", "second", "--yes", "--store", lab},
		}
		ok := make([]bool, len(cmds))
		var wg sync.WaitGroup
		for i, c := range cmds {
			wg.Add(1)
			go func() {
				defer wg.Done()
				cmd := exec.Command(exe, c...)
				cmd.Env = append(os.Environ(), "BALE_TEST_AS_CLI=1")
				out, err := cmd.CombinedOutput()
				ok[i] = err == nil
				if err != nil {
					t.Errorf("round %d: %v: %v: %s", round, c, err, out)
				}
			}()
		}
		wg.Wait()
		names := strings.Join(trustedNames(t, lab), ",")
		effect := []bool{!strings.Contains(names, "old"), strings.Contains(names, "first"), strings.Contains(names, "second")}
		for i := range cmds {
			if ok[i] {
				done++
				if !effect[i] {
					lost++
				}
			}
		}
	}
	t.Logf("%d rounds of 3 racing bale processes: %d changes reported done, %d lost", rounds, done, lost)
	if lost != 0 || done != 3*rounds {
		t.Fatalf("%d of %d changes lost (%d failed)", lost, done, 3*rounds-done)
	}
}
