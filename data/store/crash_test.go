package store

import (
	"baleassay/data/record"
	"bufio"
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"math/rand/v2"
	"os"
	"os/exec"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"
)

// Crash safety, tested the way embedded stores are usually tested: a child
// process saves events in a loop and is killed with SIGKILL at random
// moments. After every kill the store must open, hold every event the
// child was told was saved, byte for byte, hold nothing the child did not
// generate, hold each transaction whole or not at all, and take more
// saves. The default suite kills 200 times; BALEASSAY_CRASH_KILLS sets
// another count for a longer run.

const (
	envCrashDir = "BALEASSAY_CRASH_CHILD"
	envCrashRun = "BALEASSAY_CRASH_RUN"
)

// crashBatch is the deterministic content of save number b of run r: one
// to three sites, each entity id derived from its name.
func crashBatch(run, b int) []record.Event {
	n := 1 + b%3
	out := make([]record.Event, n)
	for j := range out {
		name := fmt.Sprintf("crash r%d b%d e%d", run, b, j)
		sum := sha256.Sum256([]byte(name))
		var id record.EntityID
		copy(id[:], sum[:16])
		id[6] = id[6]&0x0f | 0x70
		id[8] = id[8]&0x3f | 0x80
		out[j] = record.Event{Entity: id, Kind: record.KindSite, Site: &record.SiteRecord{Name: name,
			Lat: float64((run*7+b*3+j)%180) - 89.5, Lon: float64((run*13+b*5+j)%360) - 179.5}}
	}
	return out
}

// TestCrashChild is the child process of TestCrashSafety; run directly it
// only reports that it is a helper.
func TestCrashChild(t *testing.T) {
	dir := os.Getenv(envCrashDir)
	if dir == "" {
		t.Skip("helper process of TestCrashSafety")
	}
	run, _ := strconv.Atoi(os.Getenv(envCrashRun))
	s, err := Open(dir)
	if err != nil {
		fmt.Fprintf(os.Stdout, "error %v\n", err)
		os.Exit(3)
	}
	os.Stdout.WriteString("ready\n")
	for b := 0; b < 100000; b++ {
		ids, err := s.Save(crashBatch(run, b), SaveOptions{})
		if err != nil {
			fmt.Fprintf(os.Stdout, "error %v\n", err)
			os.Exit(4)
		}
		var line strings.Builder
		fmt.Fprintf(&line, "ack %d", b)
		for _, id := range ids {
			raw, _ := s.Raw(id)
			fmt.Fprintf(&line, " %s", hex.EncodeToString(raw))
		}
		line.WriteString("\n")
		os.Stdout.WriteString(line.String()) // acknowledged only after the commit returned
		// A pull being typed: each keystroke's draft is synced too.
		if err := s.PutDraft("typing", record.PullRecord{Label: strconv.Itoa(b), Kg: map[string]float64{"pet_clear": float64(b)}}); err != nil {
			fmt.Fprintf(os.Stdout, "error %v\n", err)
			os.Exit(5)
		}
		fmt.Fprintf(os.Stdout, "draft %d\n", b)
	}
	os.Exit(0)
}

func crashKills() int {
	if n, err := strconv.Atoi(os.Getenv("BALEASSAY_CRASH_KILLS")); err == nil && n > 0 {
		return n
	}
	return 200
}

func TestCrashSafety(t *testing.T) {
	if os.Getenv(envCrashDir) != "" {
		t.Skip("inside the child")
	}
	if os.Getenv(envCrashProbe) != "" {
		t.Skip("inside the probe")
	}
	if testing.Short() {
		t.Skip("crash test skipped in -short mode")
	}
	exe, err := os.Executable()
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	acked := map[record.EventID][]byte{} // every event acknowledged to the child
	lastAck := map[int]int{}             // run → last acknowledged batch
	r := rand.New(rand.NewPCG(uint64(time.Now().UnixNano()), 99))
	kills, inFlightSeen, maxSaves := crashKills(), 0, 0
	for run := 0; run < kills; run++ {
		cmd := exec.Command(exe, "-test.run=^TestCrashChild$", "-test.count=1")
		cmd.Env = append(os.Environ(), envCrashDir+"="+dir, envCrashRun+"="+strconv.Itoa(run))
		out, err := cmd.StdoutPipe()
		if err != nil {
			t.Fatal(err)
		}
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		lines := make(chan string, 1024)
		go func() {
			sc := bufio.NewScanner(out)
			sc.Buffer(make([]byte, 1<<20), 1<<20)
			for sc.Scan() {
				lines <- sc.Text()
			}
			close(lines)
		}()
		// Wait for the store to open, then kill after a random moment
		// (0–12 ms: a few saves, often mid-transaction).
		select {
		case l := <-lines:
			if l != "ready" {
				cmd.Process.Kill()
				cmd.Wait()
				t.Fatalf("run %d: child said %q", run, l)
			}
		case <-time.After(20 * time.Second):
			cmd.Process.Kill()
			t.Fatalf("run %d: child never opened the store", run)
		}
		time.Sleep(time.Duration(r.IntN(12000)) * time.Microsecond)
		if err := cmd.Process.Signal(syscall.SIGKILL); err != nil {
			t.Fatal(err)
		}
		lastAck[run] = -1
		lastDraft := -1
		saves := 0
		for l := range lines {
			f := strings.Fields(l)
			if len(f) == 2 && f[0] == "draft" {
				lastDraft, _ = strconv.Atoi(f[1])
				continue
			}
			if len(f) < 3 || f[0] != "ack" {
				if strings.HasPrefix(l, "error") {
					t.Fatalf("run %d: child: %s", run, l)
				}
				continue // a line cut by the kill: not acknowledged
			}
			b, _ := strconv.Atoi(f[1])
			if b != lastAck[run]+1 {
				t.Fatalf("run %d: ack %d after %d", run, b, lastAck[run])
			}
			lastAck[run] = b
			for _, h := range f[2:] {
				raw, _ := hex.DecodeString(h)
				acked[record.IDOf(raw)] = raw
			}
			saves++
		}
		cmd.Wait()
		maxSaves = max(maxSaves, saves)
		inFlightSeen += verifyCrashStore(t, dir, run, acked, lastAck)
		verifyCrashDraft(t, dir, run, lastDraft)
	}
	// Saving continues after the last kill.
	s, err := Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := s.Save(crashBatch(kills, 0), SaveOptions{}); err != nil {
		t.Fatalf("save after %d kills: %v", kills, err)
	}
	s.Close()
	t.Logf("%d SIGKILLs, %d acknowledged events all present and byte-identical; %d kills landed between a commit and its acknowledgement; up to %d saves per run",
		kills, len(acked), inFlightSeen, maxSaves)
}

// verifyCrashStore opens the store after a kill and checks it; it returns
// 1 when the killed run's next batch was committed but not acknowledged.
func verifyCrashStore(t *testing.T, dir string, run int, acked map[record.EventID][]byte, lastAck map[int]int) int {
	t.Helper()
	s, err := Open(dir)
	if err != nil {
		t.Fatalf("after kill %d the store does not open: %v", run, err)
	}
	defer s.Close()
	stored := map[record.EventID][]byte{}
	err = s.ForEachRawSince(0, func(_ uint64, id record.EventID, raw []byte) error {
		stored[id] = bytes.Clone(raw)
		return nil
	})
	if err != nil {
		t.Fatalf("after kill %d: %v", run, err)
	}
	for id, raw := range acked {
		got, ok := stored[id]
		if !ok {
			t.Fatalf("after kill %d: acknowledged event %s is missing", run, id.Short())
		}
		if !bytes.Equal(got, raw) {
			t.Fatalf("after kill %d: acknowledged event %s changed", run, id.Short())
		}
	}
	// Every other event must be the whole next batch of some run.
	extra := map[[2]int]int{}
	for id, raw := range stored {
		if record.IDOf(raw) != id {
			t.Fatalf("after kill %d: event %s does not match its bytes", run, id.Short())
		}
		e, err := record.DecodeEvent(raw)
		if err != nil {
			t.Fatalf("after kill %d: stored event unreadable: %v", run, err)
		}
		var rr, b, j int
		if e.Site == nil {
			t.Fatalf("after kill %d: event that was never generated", run)
		}
		if _, err := fmt.Sscanf(e.Site.Name, "crash r%d b%d e%d", &rr, &b, &j); err != nil {
			t.Fatalf("after kill %d: event %q was never generated", run, e.Site.Name)
		}
		want := crashBatch(rr, b)
		if j >= len(want) || want[j].Entity != e.Entity || *want[j].Site != *e.Site || e.Device != s.DeviceID() {
			t.Fatalf("after kill %d: event %q differs from what was generated", run, e.Site.Name)
		}
		if _, ok := acked[id]; ok {
			continue
		}
		if last, ok := lastAck[rr]; !ok || b != last+1 {
			t.Fatalf("after kill %d: unacknowledged event %q is not the batch in flight", run, e.Site.Name)
		}
		extra[[2]int{rr, b}]++
	}
	inFlight := 0
	for k, n := range extra {
		if n != len(crashBatch(k[0], k[1])) {
			t.Fatalf("after kill %d: batch %v is only partly stored (%d events)", run, k, n)
		}
		if k[0] == run {
			inFlight = 1
		}
	}
	return inFlight
}

// verifyCrashDraft checks that the draft of the killed run is the last
// acknowledged one or the one after it (in flight), never older or torn.
func verifyCrashDraft(t *testing.T, dir string, run, last int) {
	t.Helper()
	if last < 0 {
		return
	}
	s, err := Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	d, ok, err := s.Draft("typing")
	if err != nil || !ok {
		t.Fatalf("after kill %d: draft lost (%v)", run, err)
	}
	n, err := strconv.Atoi(d.Label)
	if err != nil || (n != last && n != last+1) || d.Kg["pet_clear"] != float64(n) {
		t.Fatalf("after kill %d: draft %q, last acknowledged %d", run, d.Label, last)
	}
}

const envCrashProbe = "BALEASSAY_CRASH_PROBE"

// TestSecondProcessProbe is the child of TestSecondProcessRefused.
func TestSecondProcessProbe(t *testing.T) {
	dir := os.Getenv(envCrashProbe)
	if dir == "" {
		t.Skip("helper process of TestSecondProcessRefused")
	}
	start := time.Now()
	_, err := Open(dir)
	fmt.Printf("%v %d\n", errors.Is(err, ErrStoreInUse), time.Since(start).Milliseconds())
	os.Exit(0)
}

// A second process opening a store in use gets ErrStoreInUse quickly.
func TestSecondProcessRefused(t *testing.T) {
	if os.Getenv(envCrashProbe) != "" || os.Getenv(envCrashDir) != "" {
		t.Skip("inside a child")
	}
	exe, err := os.Executable()
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	s, err := Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	cmd := exec.Command(exe, "-test.run=^TestSecondProcessProbe$", "-test.count=1")
	cmd.Env = append(os.Environ(), envCrashProbe+"="+dir)
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("probe: %v %s", err, out)
	}
	var inUse bool
	var ms int
	if _, err := fmt.Sscanf(string(out), "%t %d", &inUse, &ms); err != nil || !inUse {
		t.Fatalf("probe said %q, want ErrStoreInUse", out)
	}
	// common practice: a refusal within a second, not a hang (OpenTimeout is 300 ms).
	if ms > 1000 {
		t.Fatalf("refusal took %d ms", ms)
	}
}
