package main

// Source: the sites, bales and spec in this file are invented test inputs
// (the demo scenario and names of our own), not check values.

import (
	"bytes"
	"encoding/binary"
	"encoding/json"
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"testing"
)

// The byte-flip test: one byte of records.db changed at a time, at
// hundreds of offsets chosen on every kind of page (the two header
// copies, the free-page list, branch pages, leaf pages, overflow pages
// and free pages), and on each damaged copy reading commands (listings,
// show, conflicts, a nearest-site query, the store check) and writing
// commands (adding a site, importing a bundle) are run as a user would.
// Each must answer exactly as on the sound store, or say that the store
// is damaged; a panic, a different answer or another error fails the
// test. BALEASSAY_FLIP_OFFSETS sets how many offsets (default 520),
// BALEASSAY_FLIP_SEED the choice of offsets.

// flipCmd is one command run on each damaged copy. For a write, after
// is a reading command whose answer must then match the sound store's
// after the same write (ids, which differ from run to run, removed).
type flipCmd struct {
	name  string
	args  []string
	after []string
}

type flipOutcome int

const (
	flipCorrect flipOutcome = iota
	flipDamage
	flipWrong
	flipPanic
)

var flipOutcomeNames = [...]string{"correct", "damage reported", "WRONG", "PANIC"}

func (o flipOutcome) String() string { return flipOutcomeNames[o] }

// flipStore makes the sound store: two weeks of the demo scenario, a
// spec larger than a page (an overflow page), and a bundle from another
// device imported (transfer records in meta). It returns the store
// folder, a second bundle of that device (some events new, some
// present) and ids to show.
func flipStore(t *testing.T) (dir, bundle string, show []string) {
	tmp := t.TempDir()
	dir, other := filepath.Join(tmp, "p"), filepath.Join(tmp, "q")
	recMust(t, "demo", "--weeks", "2", "--store", dir)
	spec := filepath.Join(tmp, "big-spec.json")
	doc := fmt.Sprintf(`{"name": "long-notes", "description": %q, "limits": [{"item": "pet", "min": 0.8}]}`, strings.Repeat("Invented notes on the feed. ", 220))
	if err := os.WriteFile(spec, []byte(doc), 0o644); err != nil {
		t.Fatal(err)
	}
	recMust(t, "settings", "add", "spec", spec, "--store", dir)
	recMust(t, "sites", "add", "--name", "Quarry Lane Yard", "--lat", "45.31", "--lon", "4.93", "--store", other)
	first := filepath.Join(tmp, "q1.bale")
	recMust(t, "export", "--to", first, "--all", "--store", other)
	recMust(t, "trust", "add", first, "--name", "quarry tablet", "--yes", "--store", dir)
	recMust(t, "import", first, "--store", dir)
	recMust(t, "sites", "add", "--name", "Quarry Lane Depot", "--lat", "45.29", "--lon", "4.95", "--kind", "depot", "--store", other)
	bundle = filepath.Join(tmp, "q2.bale")
	recMust(t, "export", "--to", bundle, "--all", "--store", other)
	var sites []struct{ ID string }
	if err := json.Unmarshal([]byte(recMust(t, "sites", "list", "--json", "--store", dir)), &sites); err != nil || len(sites) < 3 {
		t.Fatalf("sites %v %v", sites, err)
	}
	var conf []struct{ ID string }
	if err := json.Unmarshal([]byte(recMust(t, "conflicts", "--json", "--store", dir)), &conf); err != nil || len(conf) == 0 {
		t.Fatalf("conflicts %v %v", conf, err)
	}
	var bales []struct{ ID string }
	if err := json.Unmarshal([]byte(recMust(t, "bales", "list", "--json", "--store", dir)), &bales); err != nil || len(bales) == 0 {
		t.Fatalf("bales %v %v", bales, err)
	}
	return dir, bundle, []string{sites[0].ID, conf[0].ID, bales[len(bales)/2].ID}
}

// flipCommands are the commands run on every damaged copy.
func flipCommands(bundle string, show []string) []flipCmd {
	return []flipCmd{
		{name: "sites list", args: []string{"sites", "list", "--json"}},
		{name: "bales list", args: []string{"bales", "list", "--json"}},
		{name: "pulls list", args: []string{"pulls", "list", show[2], "--json"}},
		{name: "show site", args: []string{"show", show[0], "--json"}},
		{name: "show conflict", args: []string{"show", show[1], "--json"}},
		{name: "conflicts", args: []string{"conflicts", "--json"}},
		{name: "sites near", args: []string{"sites", "near", "45.0", "4.7", "-k", "4", "--json"}},
		{name: "settings list", args: []string{"settings", "list", "--json"}},
		{name: "store check", args: []string{"store", "check"}},
		{name: "sites add (write)", args: []string{"sites", "add", "--name", "Flip Test Yard", "--lat", "44.95", "--lon", "4.61", "--yes"}, after: []string{"sites", "list", "--json"}},
		{name: "import (write)", args: []string{"import", bundle}, after: []string{"conflicts", "--json"}},
	}
}

var (
	flipIDs    = regexp.MustCompile(`[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}|[0-9a-f]{64}`)
	flipTook   = regexp.MustCompile(`checked in [0-9.]+[µm]?s`)
	flipClocks = regexp.MustCompile(`"clock": "[^"]*"`)
)

// flipNorm removes what differs between two runs of the same command on
// equal stores: new ids and clock stamps of a write, the check's time.
func flipNorm(s string, write bool) string {
	s = flipTook.ReplaceAllString(s, "checked in T")
	if write {
		s = flipIDs.ReplaceAllString(s, "ID")
		s = flipClocks.ReplaceAllString(s, `"clock": "C"`)
	}
	return s
}

// flipRun runs one command line on a store folder and catches a panic.
func flipRun(args []string, dir string) (code int, out, errs string, panicked bool) {
	defer func() {
		if r := recover(); r != nil {
			panicked, errs = true, fmt.Sprint(r)
		}
	}()
	var o, e bytes.Buffer
	code = run(append(append([]string(nil), args...), "--store", dir), &o, &e)
	return code, o.String(), e.String(), false
}

// firstDiff shows the first line where got differs from want.
func firstDiff(want, got string) string {
	w, g := strings.Split(want, "\n"), strings.Split(got, "\n")
	for i := range max(len(w), len(g)) {
		var a, b string
		if i < len(w) {
			a = w[i]
		}
		if i < len(g) {
			b = g[i]
		}
		if a != b {
			return fmt.Sprintf("line %d: want %.200q\n         got %.200q", i+1, a, b)
		}
	}
	return "same output"
}

func isDamage(code int, out, errs string) bool {
	return code != 0 && (strings.Contains(errs+out, "is damaged") || strings.Contains(out, "DAMAGED"))
}

// flipPage is one page of the sound file and what it holds.
type flipPage struct {
	id    uint64
	kind  string // meta, freelist, branch, leaf, overflow, free
	count int    // elements on a branch or leaf page
}

// flipPages classifies the pages of a bbolt file from its own headers
// (bbolt's file format: page header id u64, flags u16, count u16,
// overflow u32; meta after the header; little-endian), independently of
// the store's code.
func flipPages(t *testing.T, b []byte) ([]flipPage, int) {
	t.Helper()
	le := binary.LittleEndian
	ps := int(le.Uint32(b[16+8:]))
	meta := func(p int) (txid, freelist uint64) {
		m := b[p*ps+16:]
		return le.Uint64(m[48:]), le.Uint64(m[32:])
	}
	t0, f0 := meta(0)
	t1, f1 := meta(1)
	fl, hwm := f0, le.Uint64(b[16+40:])
	if t1 > t0 {
		fl, hwm = f1, le.Uint64(b[ps+16+40:])
	}
	b = b[:int(hwm)*ps] // bbolt grows the file ahead; pages past the high-water mark are unused zeros
	free := map[uint64]bool{}
	fp := b[int(fl)*ps:]
	n, at := int(le.Uint16(fp[10:])), 16
	if n == 0xFFFF {
		n, at = int(le.Uint64(fp[16:])), 24
	}
	for i := 0; i < n; i++ {
		free[le.Uint64(fp[at+8*i:])] = true
	}
	var out []flipPage
	for id := 0; id < len(b)/ps; {
		h := b[id*ps:]
		flags, count, over := le.Uint16(h[8:]), int(le.Uint16(h[10:])), int(le.Uint32(h[12:]))
		kind := "free"
		switch {
		case id < 2:
			kind = "meta"
		case free[uint64(id)]:
		case uint64(id) == fl:
			kind = "freelist"
		case flags == 0x01:
			kind = "branch"
		case flags == 0x02:
			kind = "leaf"
		}
		out = append(out, flipPage{uint64(id), kind, count})
		if kind == "free" {
			over = 0
		}
		for o := 1; o <= over && id+o < len(b)/ps; o++ {
			out = append(out, flipPage{uint64(id + o), "overflow", 0})
		}
		id += over + 1
	}
	return out, ps
}

// flipOffsets picks offsets on every kind of page: the meta structs of
// both header copies and the free-page list densely, then on each branch
// and leaf page one byte of the page header, one of the element headers
// and one of the keys and values, a byte of each overflow page, and a
// byte of some free pages; then random bytes of used pages up to n.
func flipOffsets(pages []flipPage, ps, n int, r *rand.Rand) ([]int, map[string]int) {
	seen := map[int]bool{}
	var offs []int
	kinds := map[string]int{}
	add := func(p flipPage, lo, hi int) {
		if hi <= lo {
			return
		}
		o := int(p.id)*ps + lo + r.IntN(hi-lo)
		if !seen[o] {
			seen[o] = true
			offs = append(offs, o)
			kinds[p.kind]++
		}
	}
	free := 0
	for _, p := range pages {
		switch p.kind {
		case "meta":
			for range 14 {
				add(p, 0, 16+64)
			}
		case "freelist":
			for range 8 {
				add(p, 0, 16+8*max(1, p.count))
			}
		case "branch", "leaf":
			add(p, 0, 16)
			add(p, 16, 16+16*max(1, p.count))
			add(p, 16+16*p.count, ps)
		case "overflow":
			add(p, 0, ps)
		case "free":
			if free < 24 {
				add(p, 0, ps)
				free++
			}
		}
	}
	var used []flipPage
	for _, p := range pages {
		if p.kind != "free" {
			used = append(used, p)
		}
	}
	for len(offs) < n {
		add(used[r.IntN(len(used))], 0, ps)
	}
	r.Shuffle(len(offs), func(i, j int) { offs[i], offs[j] = offs[j], offs[i] })
	return offs, kinds
}

func TestStoreByteFlips(t *testing.T) {
	if testing.Short() {
		t.Skip("byte-flip test skipped in -short mode")
	}
	n, seed := 520, uint64(1)
	if v, err := strconv.Atoi(os.Getenv("BALEASSAY_FLIP_OFFSETS")); err == nil && v > 0 {
		n = v
	}
	if v, err := strconv.ParseUint(os.Getenv("BALEASSAY_FLIP_SEED"), 10, 64); err == nil {
		seed = v
	}
	sound, bundle, show := flipStore(t)
	cmds := flipCommands(bundle, show)
	raw, err := os.ReadFile(filepath.Join(sound, "records.db"))
	if err != nil {
		t.Fatal(err)
	}
	pages, ps := flipPages(t, raw)
	used := len(pages) * ps
	// On a memory file system when there is one: each write syncs, and a
	// run of the test writes a few thousand times.
	tmp := t.TempDir()
	if shm, err := os.MkdirTemp("/dev/shm", "baleflip-"); err == nil {
		tmp = shm
		t.Cleanup(func() { os.RemoveAll(shm) })
	}
	work := filepath.Join(tmp, "work")
	others := map[string][]byte{} // the store folder's other files: key, trust list
	ents, _ := os.ReadDir(sound)
	for _, e := range ents {
		if e.Name() != "records.db" {
			if others[e.Name()], err = os.ReadFile(filepath.Join(sound, e.Name())); err != nil {
				t.Fatal(err)
			}
		}
	}
	fresh := func(db []byte) {
		os.RemoveAll(work)
		if err := os.MkdirAll(work, 0o700); err != nil {
			t.Fatal(err)
		}
		for name, b := range others {
			if err := os.WriteFile(filepath.Join(work, name), b, 0o600); err != nil {
				t.Fatal(err)
			}
		}
		f := filepath.Join(work, "records.db")
		if err := os.WriteFile(f, db[:used], 0o600); err != nil {
			t.Fatal(err)
		}
		if err := os.Truncate(f, int64(len(db))); err != nil { // the zeros bbolt grew the file by, as a hole
			t.Fatal(err)
		}
	}
	// What each command answers on the sound store.
	want := make([]string, len(cmds))
	wantAfter := make([]string, len(cmds))
	for i, c := range cmds {
		fresh(raw)
		code, out, errs, _ := flipRun(c.args, work)
		if code != 0 {
			t.Fatalf("%s on the sound store: exit %d %s", c.name, code, errs)
		}
		want[i] = flipNorm(out, c.after != nil)
		if c.after != nil {
			code, out, errs, _ = flipRun(c.after, work)
			if code != 0 {
				t.Fatalf("%s, then %v on the sound store: exit %d %s", c.name, c.after, code, errs)
			}
			wantAfter[i] = flipNorm(out, true)
		}
	}
	r := rand.New(rand.NewPCG(seed, 0xf11b))
	offs, kinds := flipOffsets(pages, ps, n, r)
	tally := make([][4]int, len(cmds))
	var wrongs []string
	for k, off := range offs {
		db := bytes.Clone(raw)
		if k%2 == 0 {
			db[off] ^= 1 << r.IntN(8) // one bit
		} else {
			db[off] ^= byte(1 + r.IntN(255)) // any other value
		}
		// Every command on each offset would take minutes: each offset
		// gets four reading commands in turn, the check, and a write.
		picks := []int{(k * 4) % 8, (k*4 + 1) % 8, (k*4 + 2) % 8, (k*4 + 3) % 8, 8, 9 + k%2}
		for _, i := range picks {
			c := cmds[i]
			fresh(db)
			code, out, errs, panicked := flipRun(c.args, work)
			o := flipWrong
			switch {
			case panicked:
				o = flipPanic
			case isDamage(code, out, errs):
				o = flipDamage
			case code == 0 && flipNorm(out, c.after != nil) == want[i]:
				o = flipCorrect
				if c.after != nil {
					code, out, errs, panicked = flipRun(c.after, work)
					switch {
					case panicked:
						o = flipPanic
					case isDamage(code, out, errs):
						o = flipDamage // the write was right; the next read reports what the flip broke
					case code != 0 || flipNorm(out, true) != wantAfter[i]:
						o = flipWrong
					}
				}
			}
			tally[i][o]++
			if o >= flipWrong && len(wrongs) < 20 {
				wrongs = append(wrongs, fmt.Sprintf("offset %d (page %d, %s) %#02x → %#02x: %s: %s, exit %d\n%s\nstderr %.300q",
					off, off/ps, pages[off/ps].kind, raw[off], db[off], c.name, o, code, firstDiff(want[i], flipNorm(out, c.after != nil)), errs))
			}
		}
	}
	var kindList []string
	for k, v := range kinds {
		kindList = append(kindList, fmt.Sprintf("%s %d", k, v))
	}
	sort.Strings(kindList)
	t.Logf("%d offsets over %d pages of %d bytes: %s", len(offs), len(pages), ps, strings.Join(kindList, ", "))
	var total [4]int
	for i, c := range cmds {
		t.Logf("%-18s correct %4d, damage reported %4d, wrong %d, panics %d", c.name, tally[i][0], tally[i][1], tally[i][2], tally[i][3])
		for o := range total {
			total[o] += tally[i][o]
		}
	}
	t.Logf("all runs: correct %d, damage reported %d, wrong %d, panics %d", total[0], total[1], total[2], total[3])
	for _, k := range []string{"meta", "freelist", "branch", "leaf", "overflow", "free"} {
		if kinds[k] == 0 {
			t.Errorf("no offset on a %s page: the store is too small to cover every page type", k)
		}
	}
	if total[2]+total[3] > 0 {
		t.Fatalf("%d wrong answers and %d panics; first ones:\n%s", total[2], total[3], strings.Join(wrongs, "\n\n"))
	}
}
