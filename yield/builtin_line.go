package yield

// BuiltinLineName is the name of the illustrative built-in line profile.
const BuiltinLineName = "illustrative hot-wash line"

// BuiltinLine returns an illustrative PET bottle wash line. Its figures
// are not measurements of any plant: each is marked from memory (a
// plausible value for a hot-wash line) or common practice. Ranges are
// what the Monte Carlo run draws from. With a typical curbside bale it
// gives a bale-to-flake yield inside the roughly 60–80 % of practice
// (from memory).
func BuiltinLine() Line {
	return Line{
		Name: BuiltinLineName,
		Note: "illustrative figures, from memory or common practice; replace with your line's own",
		// Adhesive is a few per cent of a label's mass (from memory).
		GlueShareOfLabels: Range(0.03, 0.08),
		Stages: []Stage{
			{
				Kind: StageSort, Name: "sensor and manual pre-sort",
				Removal: map[string]Param{
					"hazard":      Fixed(1),          // zero-tolerance items come out by hand (common practice)
					"pvc":         Range(0.90, 0.98), // sensor sorting of PVC bottles (from memory)
					"aluminium":   Range(0.85, 0.95), // eddy-current separator (from memory)
					"steel":       Range(0.95, 0.99), // overband magnet (from memory)
					"glass":       Range(0.80, 0.95), // from memory
					"hdpe":        Range(0.80, 0.95), // whole HDPE bottles (from memory)
					"pp":          Range(0.60, 0.85), // from memory
					"ldpe":        Range(0.40, 0.70), // from memory
					"ps":          Range(0.60, 0.85), // from memory
					"pla":         Range(0.60, 0.90), // sensor sorting (from memory)
					"other_resin": Range(0.40, 0.70), // from memory
					"film":        Range(0.50, 0.80), // from memory
					"paper":       Range(0.20, 0.50), // from memory
					"liquid":      Range(0.30, 0.60), // drains from opened bottles (from memory)
					"fines":       Range(0.30, 0.60), // trommel before the sort (from memory)
				},
				PETLoss: Range(0.01, 0.03), // PET thrown out with the rejects (from memory)
			},
			{
				Kind: StageGrind, Name: "wet granulator",
				PETLoss:  Range(0.003, 0.010), // fines caught by the granulator's exhaust (from memory)
				DustMade: Range(0.005, 0.015), // dust that rides on with the flake (from memory)
			},
			{
				Kind: StageElutriate, Name: "air classifier",
				Removal: map[string]Param{
					"labels": Range(0.85, 0.95), // from memory
					"film":   Range(0.90, 0.98), // from memory
					"paper":  Range(0.30, 0.60), // from memory
					"dust":   Range(0.40, 0.70), // from memory
				},
				PETLoss: Range(0.001, 0.005), // light flakes blown off (from memory)
			},
			{
				Kind: StageSinkFloat, Name: "pre-wash float–sink tank, water",
				BathDensity: 1.00,                // water (common practice)
				Efficiency:  Range(0.97, 0.99),   // from memory
				ProductLoss: Range(0.002, 0.008), // PET flakes carried up by air bubbles (from memory)
			},
			{
				Kind: StageCausticWash, Name: "hot caustic wash, 1–3 % NaOH at 80–90 °C",
				Removal: map[string]Param{
					"glue":   Range(0.93, 0.99),  // hot caustic dissolves label adhesive (common practice)
					"paper":  Range(0.95, 0.995), // pulped and drained (from memory)
					"fines":  Range(0.90, 0.99),  // dirt goes with the wash water (from memory)
					"liquid": Fixed(1),           // free liquid mixes with the wash water (common practice)
					"dust":   Range(0.30, 0.60),  // from memory
					"labels": Range(0.30, 0.60),  // loosened labels drained off (from memory)
				},
				PETLoss: Range(0.005, 0.015), // surface hydrolysis and drag-out (from memory)
			},
			{
				Kind: StageSinkFloat, Name: "rinse float–sink tank, water",
				BathDensity: 1.00,                // water (common practice)
				Efficiency:  Range(0.97, 0.995),  // from memory
				ProductLoss: Range(0.001, 0.005), // from memory
			},
			{
				Kind: StageSinkFloat, Name: "hydrocyclone heavy-particle trap, modelled as a density cut at 2.0 g/cm³",
				Keep: SideFloat, BathDensity: 2.0, // a cut between PET (1.3–1.4) and glass, metal, stones (from memory)
				Efficiency:  Range(0.60, 0.85),   // from memory
				ProductLoss: Range(0.001, 0.003), // from memory
			},
			{
				Kind: StageDry, Name: "mechanical and thermal drying",
				Moisture: Range(0.005, 0.010), // 0.5–1 % left in the flake (from memory)
			},
			{
				Kind: StageElutriate, Name: "zig-zag air classifier after drying",
				Removal: map[string]Param{
					"labels": Range(0.80, 0.95), // dry label remnants (from memory)
					"film":   Range(0.90, 0.98), // from memory
					"paper":  Range(0.50, 0.80), // from memory
					"dust":   Range(0.50, 0.80), // from memory
				},
				PETLoss: Range(0.001, 0.004), // thin flakes blown off (from memory)
			},
			{
				Kind: StageScreen, Name: "fines screen",
				Removal: map[string]Param{
					"dust":  Range(0.80, 0.95), // from memory
					"fines": Range(0.50, 0.80), // from memory
				},
				PETLoss: Range(0.001, 0.003), // small flakes through the screen (from memory)
			},
			{
				Kind: StageSort, Name: "flake sorter (NIR, colour and metal detection)", Stream: "flake_sort_rejects",
				Removal: map[string]Param{
					"pvc":         Range(0.85, 0.97), // NIR flake sorting (from memory)
					"aluminium":   Range(0.90, 0.99), // metal detection (from memory)
					"steel":       Range(0.90, 0.99), // from memory
					"glass":       Range(0.50, 0.80), // from memory
					"ps":          Range(0.50, 0.80), // from memory
					"pla":         Range(0.50, 0.80), // from memory
					"other_resin": Range(0.30, 0.60), // from memory
					"labels":      Range(0.30, 0.60), // from memory
				},
				PETLoss: Range(0.005, 0.02), // good flakes ejected with the rejects (from memory)
			},
		},
	}
}
