package yield

import (
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"testing"

	"baleassay/assess"
	"pgregory.net/rapid"
)

func catIdx(t testing.TB, key string) int {
	i, ok := assess.CategoryIndex(key)
	if !ok {
		t.Fatalf("no category %q", key)
	}
	return i
}

func TestSinkShareWater(t *testing.T) {
	// From memory (handbook densities: polyolefins 0.90–0.965 g/cm³, PVC
	// 1.35–1.45, PLA ≈1.24, PS ≈1.05; PET amorphous 1.333–1.335, Daubeny,
	// Bunn & Brown, Proc. R. Soc. A 226 (1954) 531): polyolefin caps,
	// rings and film float in water; PET, PVC, PETG, PLA and PS sink.
	for key, want := range map[string]float64{
		"hdpe": 0, "ldpe": 0, "pp": 0, "closures": 0, "film": 0,
		"pet_clear": 1, "pet_thermoform": 1, "pvc": 1, "pla": 1, "ps": 1, "other_resin": 1,
		"aluminium": 1, "glass": 1,
	} {
		got, ok := SinkShare(assess.CategoryAt(catIdx(t, key)).Density, 1.0)
		if !ok || got != want {
			t.Errorf("%s in water: sink share %g (ok %v), want %g", key, got, ok, want)
		}
	}
	// Labels 0.90–1.40 straddle water: (1.40 − 1.00)/(1.40 − 0.90) sink.
	// Source: common practice (overlap share of a uniform range).
	got, _ := SinkShare(assess.DensityRange{Min: 0.90, Max: 1.40}, 1.0)
	if math.Abs(got-0.8) > 1e-12 {
		t.Errorf("straddling range: %g, want 0.8", got)
	}
	if got, _ := SinkShare(assess.DensityRange{Min: 1, Max: 1}, 1); got != 0.5 {
		t.Errorf("neutral point density: %g, want 0.5", got)
	}
	if _, ok := SinkShare(assess.DensityRange{}, 1); ok {
		t.Error("unknown density reported as known")
	}
	// No salt bath separates PVC from PET: their density ranges overlap
	// (common practice: PVC must be sorted out before grinding).
	pvc, _ := SinkShare(assess.CategoryAt(catIdx(t, "pvc")).Density, 1.38)
	pet, _ := SinkShare(assess.CategoryAt(catIdx(t, "pet_clear")).Density, 1.38)
	if pvc <= 0 || pet <= 0 || pvc >= 1 || pet >= 1 {
		t.Errorf("bath 1.38: PVC %g and PET %g should both split", pvc, pet)
	}
}

// waterBathOnly is a line with one sink–float tank in water.
func waterBathOnly(eff float64) Line {
	return Line{Name: "water bath", Stages: []Stage{{Kind: StageSinkFloat, BathDensity: 1, Efficiency: Fixed(eff)}}}
}

func TestClosuresFloatPVCSinksWithPET(t *testing.T) {
	m, err := Compile(waterBathOnly(1))
	if err != nil {
		t.Fatal(err)
	}
	kg := make([]float64, assess.NumCategories())
	for _, k := range []string{"pet_clear", "pvc", "pla", "ps", "other_resin", "closures", "film", "hdpe"} {
		kg[catIdx(t, k)] = 1
	}
	b, err := m.Run(kg)
	if err != nil {
		t.Fatal(err)
	}
	// From memory (handbook densities, see TestSinkShareWater): polyolefins
	// float; PVC, PETG, PLA and PS stay with the PET unless a sort
	// removed them.
	for _, k := range []string{"pet_clear", "pvc", "pla", "ps", "other_resin"} {
		if b.Flake[catIdx(t, k)] != 1 {
			t.Errorf("%s: %g kg in the flake, want all 1 kg", k, b.Flake[catIdx(t, k)])
		}
	}
	for _, k := range []string{"closures", "film", "hdpe"} {
		if b.Flake[catIdx(t, k)] != 0 {
			t.Errorf("%s: %g kg in the flake, want 0", k, b.Flake[catIdx(t, k)])
		}
	}
	if math.Abs(b.StreamKg("floats")-3) > 1e-12 {
		t.Errorf("floats %g kg, want 3", b.StreamKg("floats"))
	}
	// Source: common practice — the PVC share of the bale's solids passes
	// through a water bath unchanged: 1 kg in 5 kg of flake = 200,000 ppm.
	if ppm := b.ResidualPPM()["pvc"]; math.Abs(ppm-200000) > 1e-6 {
		t.Errorf("PVC %g ppm, want 200000", ppm)
	}
}

// typicalBale is an invented curbside bale of 548 kg.
func typicalBale(t testing.TB) []float64 {
	kg := make([]float64, assess.NumCategories())
	for k, v := range map[string]float64{
		"pet_clear": 380, "pet_tinted": 40, "pet_green": 25, "pet_amber": 5, "pet_thermoform": 10,
		"hdpe": 8, "pvc": 2, "pp": 3, "closures": 15, "labels": 12, "film": 6, "paper": 5,
		"aluminium": 2, "steel": 1, "glass": 2, "liquid": 15, "fines": 10, "pla": 0.5, "ps": 1, "other_resin": 6,
	} {
		kg[catIdx(t, k)] = v
	}
	return kg
}

func TestBuiltinLineOnTypicalBale(t *testing.T) {
	m, err := Compile(BuiltinLine())
	if err != nil {
		t.Fatal(err)
	}
	b, err := m.Run(typicalBale(t))
	if err != nil {
		t.Fatal(err)
	}
	// From memory: a bale-to-clean-flake yield of roughly 60–80 %.
	if b.FlakeShare < 0.60 || b.FlakeShare > 0.85 {
		t.Errorf("flake share %.3f outside 0.60–0.85", b.FlakeShare)
	}
	if b.Closure > ClosureTolerance {
		t.Errorf("closure %g", b.Closure)
	}
	want := []string{"sorted_out", "fines", "lights", "floats", "water_and_dirt", "sinks", "flake_sort_rejects"}
	for _, s := range want {
		if b.StreamKg(s) <= 0 {
			t.Errorf("stream %s is empty", s)
		}
	}
	// Source: common practice (shares of a whole sum to 1).
	sum := 0.0
	for _, v := range b.Composition() {
		sum += v
	}
	if math.Abs(sum-1) > 1e-12 || len(m.Streams()) != len(want) {
		t.Errorf("composition sums to %.15f; streams %v", sum, m.Streams())
	}
	// Source: common practice — drying leaves the stated moisture, 0.75 %
	// at the range's midpoint, before the later stages take flake out.
	var v [numFlakeItems]float64
	flakeValues(b.Flake, b.FlakeDryKg, b.MoistureKg, &v)
	if math.Abs(v[ItemMoisture]-0.75) > 1e-9 {
		t.Errorf("moisture %.6f %%, want 0.75", v[ItemMoisture])
	}
}

func TestMassBalanceCloses(t *testing.T) {
	lines := []Line{BuiltinLine(), waterBathOnly(0.9)}
	l, err := ReadLineFile("testdata/line-example.json")
	if err != nil {
		t.Fatal(err)
	}
	lines = append(lines, l)
	rapid.Check(t, func(t *rapid.T) {
		l := rapid.SampledFrom(lines).Draw(t, "line")
		m, err := Compile(l)
		if err != nil {
			t.Fatal(err)
		}
		kg := make([]float64, assess.NumCategories())
		for i := range kg {
			kg[i] = rapid.Float64Range(0, 500).Draw(t, assess.CategoryAt(i).Key)
		}
		kg[0] += 1
		par := make([]float64, len(m.params))
		for i, p := range m.params {
			par[i] = p.Lo + rapid.Float64Range(0, 1).Draw(t, "u")*(p.Hi-p.Lo)
		}
		b, err := m.balance(kg, par)
		// Source: common practice (conservation of mass), 1e-9 relative.
		if err != nil || b.Closure > 1e-9 {
			t.Fatalf("balance: %v, closure %g", err, b.Closure)
		}
		for _, s := range b.Streams {
			if s.Kg < 0 {
				t.Fatalf("stream %s negative: %g", s.Name, s.Kg)
			}
		}
	})
}

func TestCleanerBaleNeverLowersFlake(t *testing.T) {
	m, err := Compile(BuiltinLine())
	if err != nil {
		t.Fatal(err)
	}
	rapid.Check(t, func(t *rapid.T) {
		kg := make([]float64, assess.NumCategories())
		for i := range kg {
			kg[i] = rapid.Float64Range(0, 100).Draw(t, assess.CategoryAt(i).Key)
		}
		from := rapid.IntRange(0, len(kg)-1).Filter(func(i int) bool { return !assess.CategoryAt(i).IsTargetPET() }).Draw(t, "from")
		to := rapid.IntRange(0, 6).Draw(t, "to")
		move := kg[from] * rapid.Float64Range(0, 1).Draw(t, "share")
		a, _ := m.Run(kg)
		kg[from] -= move
		kg[to] += move
		b, err := m.Run(kg)
		if err != nil {
			t.Fatal(err)
		}
		// Source: common practice — swapping contaminant for PET in the
		// same bale mass never lowers the clean flake.
		if b.FlakeKg < a.FlakeKg*(1-1e-12) {
			t.Fatalf("moving %g kg %s → %s lowered flake %g → %g", move, assess.CategoryAt(from).Key, assess.CategoryAt(to).Key, a.FlakeKg, b.FlakeKg)
		}
	})
}

func TestLineProfileErrors(t *testing.T) {
	cases := []struct {
		file  string
		err   error
		field string
	}{
		{"testdata/line-efficiency-above-one.json", ErrOutOfRange, "efficiency"},
		{"testdata/line-not-closed.json", ErrNotClosed, "removal.pet_thermoform"},
		{"testdata/line-unknown-field.json", ErrBadLine, ""},
		{"testdata/line-unknown-key.json", ErrUnknownKey, "removal.pvcc"},
		{"testdata/no-such-file.json", ErrBadLine, ""},
	}
	for _, c := range cases {
		_, err := ReadLineFile(c.file)
		var fe *FieldError
		if !errors.Is(err, c.err) || !errors.As(err, &fe) || fe.Field != c.field {
			t.Errorf("%s: got %v, want %v on field %q", c.file, err, c.err, c.field)
		}
	}
	inline := []struct {
		name string
		line Line
		err  error
	}{
		{"no stages", Line{Name: "x"}, ErrBadLine},
		{"no name", Line{Stages: []Stage{{Kind: StageGrind}}}, ErrBadLine},
		{"NaN loss", Line{Name: "x", Stages: []Stage{{Kind: StageGrind, PETLoss: Fixed(math.NaN())}}}, ErrBadNumber},
		{"range backwards", Line{Name: "x", Stages: []Stage{{Kind: StageGrind, PETLoss: Range(0.2, 0.1)}}}, ErrOutOfRange},
		{"bath on a grinder", Line{Name: "x", Stages: []Stage{{Kind: StageGrind, BathDensity: 1}}}, ErrBadLine},
		{"dry without moisture", Line{Name: "x", Stages: []Stage{{Kind: StageDry}}}, ErrBadLine},
		{"grind dust and loss over 1", Line{Name: "x", Stages: []Stage{{Kind: StageGrind, PETLoss: Fixed(0.6), DustMade: Fixed(0.6)}}}, ErrNotClosed},
		{"keep sideways", Line{Name: "x", Stages: []Stage{{Kind: StageSinkFloat, BathDensity: 1, Efficiency: Fixed(1), Keep: Side(7)}}}, ErrBadLine},
	}
	for _, c := range inline {
		if err := c.line.Validate(); !errors.Is(err, c.err) {
			t.Errorf("%s: got %v, want %v", c.name, err, c.err)
		}
	}
}

func TestLineJSONRoundTrip(t *testing.T) {
	b, err := json.Marshal(BuiltinLine())
	if err != nil {
		t.Fatal(err)
	}
	l, err := ReadLine(bytes.NewReader(b), "builtin.json")
	if err != nil {
		t.Fatal(err)
	}
	m1, _ := Compile(BuiltinLine())
	m2, err := Compile(l)
	if err != nil {
		t.Fatal(err)
	}
	b1, _ := m1.Run(typicalBale(t))
	b2, _ := m2.Run(typicalBale(t))
	// Source: common practice (a round trip changes nothing).
	if b1.FlakeKg != b2.FlakeKg || len(b1.Streams) != len(b2.Streams) {
		t.Errorf("round trip changed the line: %g vs %g kg", b1.FlakeKg, b2.FlakeKg)
	}
}

func TestGroupRemovalAndOverride(t *testing.T) {
	l := Line{Name: "x", Stages: []Stage{{Kind: StageSort, Removal: map[string]Param{"other_plastics": Fixed(0.5), "pvc": Fixed(1)}}}}
	m, err := Compile(l)
	if err != nil {
		t.Fatal(err)
	}
	kg := make([]float64, assess.NumCategories())
	kg[catIdx(t, "pvc")], kg[catIdx(t, "hdpe")], kg[catIdx(t, "pet_clear")] = 1, 1, 1
	b, _ := m.Run(kg)
	// Source: common practice (a category entry overrides its group's).
	if b.Flake[catIdx(t, "pvc")] != 0 || b.Flake[catIdx(t, "hdpe")] != 0.5 || b.Flake[catIdx(t, "pet_clear")] != 1 {
		t.Errorf("flake pvc %g hdpe %g pet %g", b.Flake[catIdx(t, "pvc")], b.Flake[catIdx(t, "hdpe")], b.Flake[catIdx(t, "pet_clear")])
	}
}

func TestFlakeSpec(t *testing.T) {
	s, err := ReadFlakeSpecFile("testdata/flake-spec-example.json")
	if err != nil {
		t.Fatal(err)
	}
	m, _ := Compile(waterBathOnly(1))
	kg := make([]float64, assess.NumCategories())
	kg[catIdx(t, "pet_clear")] = 999.98
	kg[catIdx(t, "pvc")] = 0.02
	b, _ := m.Run(kg)
	checks := s.Check(b)
	if len(checks) != 4 {
		t.Fatalf("%d checks, want 4", len(checks))
	}
	// Source: common practice — 0.02 kg in 1000 kg is 20 ppm, under 30.
	if checks[0].Item != ItemPVC || math.Abs(checks[0].Value-20) > 1e-9 || !checks[0].Pass {
		t.Errorf("PVC check %+v", checks[0])
	}
	bad := []string{`{"name": "x"}`, `{"name": "x", "pvc_ppm": -1}`, `{"name": "x", "moisture_pct": 150}`, `{"pvc_ppm": 1}`, `{"name": "x", "pvc": 1}`}
	for _, j := range bad {
		if _, err := ReadFlakeSpec(bytes.NewReader([]byte(j)), "spec.json"); !errors.Is(err, ErrBadSpec) && !errors.Is(err, ErrOutOfRange) {
			t.Errorf("%s: got %v", j, err)
		}
	}
	if err := BuiltinFlakeSpec().Validate(); err != nil {
		t.Error(err)
	}
}

func TestStageKindsComplete(t *testing.T) {
	// Source: common practice (every kind has a key, a stream and a round trip).
	for k := StageSort; k < stageKindEnd; k++ {
		back, err := ParseStageKind(k.String())
		if stageKeys[k] == "" || defaultStream[k] == "" || err != nil || back != k {
			t.Errorf("kind %d: key %q, stream %q, round trip %v %v", k, stageKeys[k], defaultStream[k], back, err)
		}
	}
	if _, err := ParseStageKind("rinse"); !errors.Is(err, ErrUnknownKey) {
		t.Errorf("unknown kind: %v", err)
	}
}

func TestLineJSONOddities(t *testing.T) {
	// Source: common practice (strict reading: no nulls, one document).
	for _, j := range []string{
		`{"name": "x", "stages": [{"kind": "grind", "pet_loss": null}]}`,
		`{"name": "x", "stages": [{"kind": "grind", "pet_loss": [0.1]}]}`,
		`{"name": "x", "stages": [{"kind": "grind", "pet_loss": "1 %"}]}`,
		`{"name": "x", "stages": [{"kind": "grind"}]} {"name": "y"}`,
		`{"name": "x", "stages": [{"kind": "rinse"}]}`,
	} {
		if _, err := ReadLine(bytes.NewReader([]byte(j)), "l.json"); !errors.Is(err, ErrBadLine) {
			t.Errorf("%s: got %v", j, err)
		}
	}
}

func TestBathNotesShowWhatStaysWithPET(t *testing.T) {
	m, err := Compile(waterBathOnly(0.99))
	if err != nil {
		t.Fatal(err)
	}
	notes := m.BathNotes(nil)
	if len(notes) != 1 || notes[0].Keep != SideSink || notes[0].BathDensity != 1 {
		t.Fatalf("notes %+v", notes)
	}
	got := map[string]float64{}
	for _, s := range notes[0].WithPET {
		got[s.Key] = s.Share
	}
	// From memory (handbook densities, see TestSinkShareWater): PVC, PETG,
	// PLA and PS sink with PET in water; polyolefins float. Labels
	// 0.90–1.40: 0.8 by overlap (computed).
	for key, want := range map[string]float64{"pvc": 1, "ps": 1, "pla": 1, "other_resin": 1, "labels": 0.8} {
		if math.Abs(got[key]-want) > 1e-12 {
			t.Errorf("%s stays with PET at %g, want %g", key, got[key], want)
		}
	}
	for _, key := range []string{"hdpe", "pp", "ldpe", "closures", "film", "pet_clear"} {
		if _, ok := got[key]; ok {
			t.Errorf("%s listed as staying with the PET", key)
		}
	}
	kg := make([]float64, assess.NumCategories())
	kg[catIdx(t, "pvc")] = 1
	if n := m.BathNotes(kg); len(n[0].WithPET) != 1 || n[0].WithPET[0].Key != "pvc" {
		t.Errorf("present-only notes: %+v", n)
	}
}
