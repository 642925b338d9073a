package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"baleassay/yield"
)

const demoPulls = "../../testdata/demo-bale-0417.csv"

func yieldCLI(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(args, &out, &errb)
	return code, out.String(), errb.String()
}

func TestYieldJSONFields(t *testing.T) {
	code, out, errs := yieldCLI(t, "yield", demoPulls, "--bale-kg", "548", "--draws", "2000", "--seed", "7", "--reactor-kg", "500", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var got struct {
		FlakeKg       map[string]*float64 `json:"flake_kg"`
		GlycolysateKg map[string]*float64 `json:"glycolysate_kg"`
		HydroxylValue map[string]*float64 `json:"hydroxyl_value"`
		ResidualPPM   map[string]float64  `json:"residual_ppm"`
		Streams       map[string]float64  `json:"streams"`
		Closure       float64             `json:"closure"`
		Point         struct {
			FlakeKg float64 `json:"flake_kg"`
			Batches *int    `json:"batches"`
		} `json:"point"`
		Draws    int      `json:"draws"`
		Cautions []string `json:"cautions"`
		WithPET  []struct {
			BathDensity float64            `json:"bath_density"`
			Keep        string             `json:"keep"`
			Shares      map[string]float64 `json:"shares"`
		} `json:"with_pet"`
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatal(err)
	}
	for name, s := range map[string]map[string]*float64{"flake_kg": got.FlakeKg, "glycolysate_kg": got.GlycolysateKg, "hydroxyl_value": got.HydroxylValue} {
		for _, f := range []string{"p10", "p50", "p90", "mean"} {
			if s[f] == nil {
				t.Errorf("%s.%s missing", name, f)
			}
		}
		// Source: common practice (percentiles are ordered).
		if s["p10"] != nil && !(*s["p10"] <= *s["p50"] && *s["p50"] <= *s["p90"]) {
			t.Errorf("%s percentiles out of order", name)
		}
	}
	for _, k := range []string{"pvc", "hdpe", "paper", "aluminium", "pla", "glue"} {
		if _, ok := got.ResidualPPM[k]; !ok {
			t.Errorf("residual_ppm lacks %s", k)
		}
	}
	if _, ok := got.ResidualPPM["pet_clear"]; ok {
		t.Error("residual_ppm lists PET")
	}
	for _, k := range []string{"sorted_out", "floats", "sinks", "fines", "water_and_dirt"} {
		if got.Streams[k] <= 0 {
			t.Errorf("stream %s = %g", k, got.Streams[k])
		}
	}
	// Source: common practice (mass balance closes within 1e-9).
	if got.Closure > 1e-9 || got.Draws != 2000 || got.Point.Batches == nil || *got.Point.Batches < 1 {
		t.Errorf("closure %g, draws %d, batches %v", got.Closure, got.Draws, got.Point.Batches)
	}
	// From memory (handbook densities): PVC sinks with PET in water, so
	// the water tanks cannot separate it.
	if len(got.WithPET) == 0 || got.WithPET[0].BathDensity != 1 || got.WithPET[0].Keep != "sink" || got.WithPET[0].Shares["pvc"] != 1 {
		t.Errorf("with_pet: %+v", got.WithPET)
	}
	deg, _ := yield.LookupGlycol("DEG")
	if !strings.Contains(strings.Join(got.Cautions, " "), yield.CautionHotGlycolFor(deg)) {
		t.Error("no hot-glycol caution")
	}
	// Same seed, same output.
	_, again, _ := yieldCLI(t, "yield", demoPulls, "--bale-kg", "548", "--draws", "2000", "--seed", "7", "--reactor-kg", "500", "--json")
	if again != out {
		t.Error("same seed gave different output")
	}
}

func TestYieldPlainMentionsEverything(t *testing.T) {
	code, out, errs := yieldCLI(t, "yield", demoPulls, "--bale-kg", "548", "--draws", "500", "--glycol", "pg", "--glycol-ratio", "1.5", "--strip-eg", "0.2")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"clean flake", "P10", "hydroxyl value", "Reject streams", "Flake spec", "1,2-propylene glycol", "Caution", "boils below EG"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q", want)
		}
	}
}

func TestYieldWithOwnLineAndSpec(t *testing.T) {
	code, out, errs := yieldCLI(t, "yield", demoPulls, "--bale-kg", "548", "--draws", "200", "--json",
		"--line", "../../yield/testdata/line-example.json", "--flake-spec", "../../yield/testdata/flake-spec-example.json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var got struct {
		Line      string `json:"line"`
		FlakeSpec struct {
			Name   string
			Checks []struct{ Item string }
		} `json:"flake_spec"`
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatal(err)
	}
	if got.Line != "example yard line, cold wash" || got.FlakeSpec.Name != "example reactor feed" || len(got.FlakeSpec.Checks) != 4 {
		t.Errorf("got %+v", got)
	}
}

func TestYieldBadInput(t *testing.T) {
	dir := t.TempDir()
	halfValid := filepath.Join(dir, "line.json")
	os.WriteFile(halfValid, []byte(`{"name": "half valid", "stages": [
		{"kind": "grind", "pet_loss": 0.01},
		{"kind": "sink_float", "bath_density": 1, "efficiency": 1.5}]}`), 0o644)
	cases := []struct {
		args []string
		code int
		want string
	}{
		{[]string{"yield", demoPulls}, 2, "--bale-kg is required"},
		{[]string{"yield", "--bale-kg", "548"}, 2, "one pulls CSV"},
		{[]string{"yield", demoPulls, "--bale-kg", "548", "--glycol-ratio", "0"}, 1, "glycol ratio must be above 0"},
		{[]string{"yield", demoPulls, "--bale-kg", "548", "--glycol-ratio", "-1"}, 1, "glycol ratio must be above 0"},
		{[]string{"yield", demoPulls, "--bale-kg", "548", "--glycol", "butanol"}, 1, "not a known glycol"},
		{[]string{"yield", demoPulls, "--bale-kg", "548", "--conversion", "1.5"}, 1, "conversion"},
		// NaN is not a plain decimal: refused as the flag is read (usage).
		{[]string{"yield", demoPulls, "--bale-kg", "548", "--strip-eg", "NaN"}, 2, `for flag -strip-eg: "NaN": give a share`},
		{[]string{"yield", demoPulls, "--bale-kg", "NaN"}, 2, "-bale-kg: give a plain decimal"},
		{[]string{"yield", demoPulls, "--bale-kg", "20"}, 1, "below the"},
		{[]string{"yield", demoPulls, "--bale-kg", "548", "--line", halfValid}, 1, "stage 2 (sink_float): efficiency"},
		{[]string{"yield", demoPulls, "--bale-kg", "548", "--line", "../../yield/testdata/line-not-closed.json"}, 1, "does not close"},
		{[]string{"yield", demoPulls, "--bale-kg", "548", "--draws", "0"}, 1, "draws"},
		{[]string{"yield", "no-such.csv", "--bale-kg", "548"}, 1, "no-such.csv"},
		{[]string{"glycolysis", "--pet-kg", "1", "--glycol", "DEG"}, 2, "--glycol-kg or as --glycol-ratio"},
		{[]string{"glycolysis", "--pet-kg", "1", "--glycol", "DEG", "--glycol-ratio", "0"}, 1, "glycol ratio must be above 0"},
		{[]string{"glycolysis", "--pet-kg", "1", "--glycol", "DEG", "--glycol-kg", "-2"}, 1, "glycol mass must be above 0"},
		{[]string{"glycolysis", "--pet-kg", "0", "--glycol", "DEG", "--glycol-kg", "1"}, 1, "PET mass must be above 0"},
		{[]string{"glycolysis", "--pet-kg", "1", "--glycol", "xyz", "--glycol-kg", "1"}, 1, "not a known glycol"},
		{[]string{"glycolysis", "--pet-kg", "1", "--glycol", "DEG", "--glycol-ratio", "1", "--conversion", "-0.1"}, 1, "conversion"},
		{[]string{"blend", "--polyol", "350:10", "--index", "105"}, 2, "isocyanate"},
		{[]string{"blend", "--polyol", "350:10", "--isocyanate-nco", "31", "--index", "0"}, 1, "index"},
		{[]string{"blend", "--polyol", "350", "--isocyanate-nco", "31", "--index", "105"}, 1, "OHV:KG"},
		{[]string{"blend", "--polyol", "x:10", "--isocyanate-nco", "31", "--index", "105"}, 1, "hydroxyl value"},
		{[]string{"blend", "--polyol", "350:10", "--isocyanate", "HDI", "--index", "105"}, 1, "TDI, MDI or PMDI"},
		{[]string{"blend", "--polyol", "350:10:0.5", "--polyol", "castor:1", "--isocyanate", "TDI", "--index", "105", "--target-pet-share", "0.8"}, 1, "target recycled-PET share"},
	}
	for _, c := range cases {
		code, out, errs := yieldCLI(t, c.args...)
		if code != c.code || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, stderr %q; want exit %d mentioning %q", c.args, code, errs, c.code, c.want)
		}
		if out != "" {
			t.Errorf("%v: printed output despite the error: %q", c.args, out)
		}
	}
}

func TestGlycolysisJSON(t *testing.T) {
	code, out, errs := yieldCLI(t, "glycolysis", "--pet-kg", "1", "--glycol", "DEG", "--glycol-ratio", "1", "--catalyst-pct", "0", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var got struct {
		GlycolysateKg    float64   `json:"glycolysate_kg"`
		HydroxylValue    float64   `json:"hydroxyl_value"`
		EquivalentWeight float64   `json:"equivalent_weight"`
		Mn               float64   `json:"mn"`
		P                float64   `json:"p"`
		NumberFractions  []float64 `json:"number_fractions"`
		WeightFractions  []float64 `json:"weight_fractions"`
		FreeGlycolWt     float64   `json:"free_glycol_wt"`
		LongOligomerWt   float64   `json:"long_oligomer_wt"`
		Cautions         []string  `json:"cautions"`
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatal(err)
	}
	// Computed by our own formulas in yield/testdata/ref/glycolysis_ref.py:
	// PET:DEG 1:1 → 528.70 mg KOH/g, p = 0.3558, n_0 = 64.42 %.
	if math.Abs(got.HydroxylValue-528.70) > 0.005 || math.Abs(got.P-0.3558) > 0.00005 || math.Abs(got.NumberFractions[0]-0.6442) > 0.00005 {
		t.Errorf("OHV %g p %g n0 %g", got.HydroxylValue, got.P, got.NumberFractions[0])
	}
	if got.GlycolysateKg != 2 || len(got.NumberFractions) != yield.DistMaxK+2 || len(got.WeightFractions) != yield.DistMaxK+2 || len(got.Cautions) == 0 {
		t.Errorf("glycolysate %g kg, %d/%d fractions, cautions %d", got.GlycolysateKg, len(got.NumberFractions), len(got.WeightFractions), len(got.Cautions))
	}
	code, out, _ = yieldCLI(t, "glycolysis", "--pet-kg", "1", "--glycol", "glycerol", "--glycol-kg", "0.4", "--json")
	if code != 0 || !strings.Contains(out, `"branched": true`) || !strings.Contains(out, `"number_fractions": []`) {
		t.Errorf("glycerol: exit %d, %s", code, out)
	}
}

func TestBlendJSON(t *testing.T) {
	code, out, errs := yieldCLI(t, "blend", "--polyol", "350:100:0.5", "--polyol", "castor:100", "--isocyanate", "MDI", "--index", "110", "--water-kg", "2", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var got struct {
		BlendHydroxylValue float64  `json:"blend_hydroxyl_value"`
		IsocyanateKg       float64  `json:"isocyanate_kg"`
		RecycledPETShare   float64  `json:"recycled_pet_share"`
		Cautions           []string `json:"cautions"`
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatal(err)
	}
	// Source: yield/testdata/ref/glycolysis_ref.py: blend OHV 257.00, MDI
	// 156.658 kg at index 110 with 2 kg water.
	if math.Abs(got.BlendHydroxylValue-257) > 1e-9 || math.Abs(got.IsocyanateKg-156.658) > 0.001 || got.RecycledPETShare != 0.25 {
		t.Errorf("got %+v", got)
	}
	if len(got.Cautions) == 0 || got.Cautions[0] != yield.CautionMDI {
		t.Error("no isocyanate caution")
	}
}
