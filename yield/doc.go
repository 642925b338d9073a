// Package yield turns an audited PET bottle bale into what it will
// become: clean flake from a wash line, glycolysate (recycled polyol)
// from a glycolysis reactor, and the isocyanate a polyurethane
// formulation with that polyol needs. Every step carries the audit's
// uncertainty through seeded draws from the audit's own estimator.
//
// # Units
//
// Masses in kg (grams inside the chemistry), densities in g/cm³,
// hydroxyl values in mg KOH/g, equivalent weights in g/eq, molar masses
// in g/mol from standard atomic weights, residual contaminants in mg per
// kg of dry flake (ppm), moisture in % of the wet flake.
//
// # Wash line
//
// A Line lists stages in order (sort, grind, elutriate, caustic_wash,
// sink_float, dry, screen). The model tracks every catalogue category of
// package assess plus two components of its own: glue (label adhesive,
// split off the labels' mass at the entry; it stays on the bottle wall
// until a stage removes it) and dust (PET ground to dust). Each stage
// sends a share of each component to a named reject stream; shares are
// single values or ranges the Monte Carlo run draws from. Sink–float
// decides each category's side from its density range against the bath
// (SinkShare) and then applies a separation efficiency, so PVC, PETG,
// PLA and PS stay with PET in water unless a sort takes them out. The
// dryer leaves a stated moisture, drawn from process water, which is
// the balance's only input besides the bale; inputs equal outputs to
// within 1e-9 relative.
//
// # Glycolysis
//
// Transesterification conserves hydroxyl groups, so the hydroxyl value
// follows from moles alone: OHV = 56106·(f·n_glycol + 2·n_chains −
// 2·n_stripped) / m_product. The chain-length distribution is Flory's
// most-probable distribution (Flory, J. Am. Chem. Soc. 64 (1942) 2205),
// n_k = (1 − p)·p^k with p = N_T/N_G. The model assumes
//   - equal reactivity of all hydroxyl and ester groups, whatever the
//     glycol;
//   - equilibrium reached;
//   - no side reactions (no etherification, no cyclic oligomers, no
//     hydrolysis by moisture carried in with the flake);
//   - the original PET's chain ends neglected, unless Recipe.PETMn gives
//     its number-average molar mass (each chain then adds one glycol unit
//     and two OH);
//   - stripping removes only ethylene glycol, at most as much as the PET
//     liberated;
//   - non-PET solids are filtered off unchanged; residual PVC is counted
//     as fully dehydrochlorinated, the worst case, for its acid;
//   - the catalyst stays in the product and counts in its mass (so in
//     the hydroxyl value) but not in Mn.
//
// For glycerol (three OH groups) the hydroxyl arithmetic holds but the
// product is branched and the linear distribution is not given.
//
// For a bale (Plan, Evaluate, Simulate) the glycol ratio applies to the
// dry flake as weighed into the reactor, contaminants included, because
// a plant weighs flake, not PET; the flake's purity therefore moves the
// hydroxyl value from draw to draw.
//
// # Uncertainty
//
// Simulate draws the composition from the audit's estimator
// (assess.Spread: Cochran's ratio estimate, its covariance and the
// finite-population correction) as a multivariate t on n − 1 degrees of
// freedom, so that the P5–P95 of a drawn share is the audit's 90 %
// interval; a draw that leaves the simplex is projected back onto it.
// One pull gives no spread (SpreadNone). It draws every ranged line
// parameter, and the plan's conversion and EG-stripping ranges,
// uniformly, and reports P5, P10, P50, P90, P95 and the mean (Hyndman &
// Fan definition 7). SimulateLoad does the same for a load's two-stage
// estimate; Sensitivity ranks the inputs by the spread each causes
// alone. A seeded math/rand/v2 PCG source makes runs reproducible; the
// inner loop allocates nothing.
//
// # Blends
//
// MixBlend gives the hydroxyl value of a polyol blend, the isocyanate
// for a stated index and NCO content, with water counted at two
// equivalents per mole, and the recycled-PET share of the blend and of
// the whole formulation.
//
// # Safety
//
// Outputs that concern hot glycols, isocyanates or the caustic wash
// carry CautionHotGlycolFor (the glycol charged), CautionIsocyanateFor
// (TDI's or MDI's figures) and CautionCaustic. They defer to local codes
// and licensed practice.
package yield
