package main

// Source: invented sites, bales, pulls and piece counts; the checks
// follow the documented behaviour (README: the pulls CSV, total_count;
// data/record/ranges.go: the physical ranges of a save).

import (
	"encoding/json"
	"strings"
	"testing"
)

// piecesCSV counts PVC and closures and gives the pieces examined per
// pull (invented).
const piecesCSV = "pull,pet_clear,pvc,closures,pvc_count,closures_count,total_count\n" +
	"P1,23.9,0.1,1.7,3,40,612\nP2,12.8,0.16,0.7,5,22,340\nP3,20.1,0.05,1.1,2,31,498\n"

// piecesOf runs an assess --json and returns its pieces rows, raw.
func piecesOf(t *testing.T, args ...string) []json.RawMessage {
	t.Helper()
	var rep struct{ Pieces []json.RawMessage }
	if err := json.Unmarshal([]byte(recMust(t, args...)), &rep); err != nil {
		t.Fatal(err)
	}
	return rep.Pieces
}

// The pieces examined are stored with a pull, so a stored bale's piece
// shares are counted out of them exactly as the same file's are.
func TestPiecesExaminedStoredAndAssessed(t *testing.T) {
	dir := t.TempDir()
	st := []string{"--store", dir}
	file := writeFile(t, "pieces.csv", piecesCSV)
	recMust(t, append([]string{"sites", "add", "--name", "Orrin Bridge Yard", "--lat", "45.112", "--lon", "4.688"}, st...)...)
	recMust(t, append([]string{"bales", "add", "--site", "Orrin Bridge Yard", "--kg", "548", "--tag", "VO-88"}, st...)...)
	recMust(t, append([]string{"pulls", "add", "VO-88", file}, st...)...)

	fromFile := piecesOf(t, "assess", file, "--bale-kg", "548", "--json")
	fromStore := piecesOf(t, append([]string{"assess", "VO-88", "--json"}, st...)...)
	if len(fromFile) != 2 || len(fromStore) != len(fromFile) {
		t.Fatalf("%d piece rows from the file, %d from the store; want 2 each", len(fromFile), len(fromStore))
	}
	for i := range fromFile {
		if string(fromFile[i]) != string(fromStore[i]) {
			t.Errorf("piece row %d differs:\nfile  %s\nstore %s", i, fromFile[i], fromStore[i])
		}
	}
	var pvc struct {
		Key, Basis string
		Total      int
		Fraction   *float64
	}
	if err := json.Unmarshal(fromStore[0], &pvc); err != nil {
		t.Fatal(err)
	}
	// 3 + 5 + 2 PVC pieces of 612 + 340 + 498 examined: 10/1450.
	if pvc.Key != "pvc" || pvc.Basis != "examined" || pvc.Total != 1450 || pvc.Fraction == nil || *pvc.Fraction != 10.0/1450 {
		t.Fatalf("stored bale's PVC pieces: %+v", pvc)
	}
	var pulls []pullJSON
	if err := json.Unmarshal([]byte(recMust(t, append([]string{"pulls", "list", "VO-88", "--json"}, st...)...)), &pulls); err != nil {
		t.Fatal(err)
	}
	if len(pulls) != 3 || pulls[0].TotalCount+pulls[1].TotalCount+pulls[2].TotalCount != 1450 {
		t.Fatalf("pulls list: %+v", pulls)
	}
	if out := recMust(t, append([]string{"show", pulls[0].ID}, st...)...); !strings.Contains(out, "pieces examined") {
		t.Errorf("show of a pull does not say the pieces examined:\n%s", out)
	}

	// Fewer pieces examined than counted, a total beyond the range, a
	// header nearly right: refused, nothing saved.
	for _, c := range []struct{ csv, want string }{
		{"pull,pet_clear,pvc,pvc_count,total_count\nP7,20,0.2,12,11\n", "12"},
		{"pull,pet_clear,total_count\nP7,20,1000001\n", "1000000"},
		{"pull,pet_clear,total_pieces\nP7,20,400\n", `did you mean "total_count"`},
	} {
		stdin = strings.NewReader(c.csv)
		code, _, errs := recRun(t, append([]string{"pulls", "add", "VO-88", "-"}, st...)...)
		if code != 1 || !strings.Contains(errs, c.want) {
			t.Errorf("pulls add of %q: exit %d %q; want exit 1 mentioning %q", c.csv, code, errs, c.want)
		}
	}
	if err := json.Unmarshal([]byte(recMust(t, append([]string{"pulls", "list", "VO-88", "--json"}, st...)...)), &pulls); err != nil || len(pulls) != 3 {
		t.Fatalf("a refused add left %d pulls (%v)", len(pulls), err)
	}
}

// A pulls file assessed without a store meets the bounds of a save: what
// the store would refuse, the audit refuses too, with the same reason.
func TestAssessFileHeldToTheBoundsOfASave(t *testing.T) {
	dir := t.TempDir()
	st := []string{"--store", dir}
	recMust(t, append([]string{"sites", "add", "--name", "Calder Mere MRF", "--lat", "45.021", "--lon", "4.552"}, st...)...)
	recMust(t, append([]string{"bales", "add", "--site", "Calder Mere MRF", "--kg", "4900", "--tag", "VO-89", "--yes"}, st...)...)
	// The store refuses the first two by the bale's gross mass (4,900 kg)
	// before the range; same says whether its reason is the same.
	for _, c := range []struct {
		name, csv, want string
		same            bool
	}{
		{"a part above 5,000 kg", "pull,pet_clear,pvc\nP1,6000,0.2\n", "above 5000 kg", false},
		{"parts above 5,000 kg together", "pull,pet_clear,pvc\nP1,2600,2600\n", "at most 5000 kg", false},
		{"pieces beyond 10⁶", "pull,pet_clear,pvc_count\nP1,20,1000001\n", "1000000", true},
		{"parts far above the weighed mass", "pull,pet_clear,weighed\nP1,20,10\n", "stated", true},
	} {
		file := writeFile(t, "p.csv", c.csv)
		code, out, errs := recRun(t, "assess", file)
		if code != 1 || out != "" || !strings.Contains(errs, c.want) {
			t.Errorf("assess, %s: exit %d, stdout %q, stderr %q; want exit 1 mentioning %q", c.name, code, out, errs, c.want)
		}
		code, _, errs2 := recRun(t, append([]string{"pulls", "add", "VO-89", file}, st...)...)
		if code != 1 || c.same && !strings.Contains(errs2, c.want) {
			t.Errorf("pulls add, %s: exit %d %q; want the same refusal", c.name, code, errs2)
		}
	}
	pulls := writeFile(t, "ok.csv", "pull,pet_clear,pvc\nP1,20,0.2\nP2,21,0.1\n")
	for _, args := range [][]string{
		{"assess", pulls, "--bale-kg", "6000"},
		{"yield", pulls, "--bale-kg", "6000", "--draws", "100"},
		{"load", pulls + ":6000", pulls + ":500", "--bales", "20"},
	} {
		code, _, errs := recRun(t, args...)
		if code != 1 || !strings.Contains(errs, "above 5000 kg") {
			t.Errorf("%v: exit %d %q; want exit 1, the bale mass above 5000 kg", args, code, errs)
		}
	}
	if code, _, errs := recRun(t, "assess", pulls, "--bale-kg", "30"); code != 1 || !strings.Contains(errs, "below the 41.3 kg sampled") {
		t.Errorf("a bale lighter than its pulls: exit %d %q", code, errs)
	}
}
