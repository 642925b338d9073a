// Package assess turns the pulls sorted from one bale into an estimate of
// what the bale contains, with confidence intervals, a sample-size advice
// and a verdict against a buyer's spec.
//
// Units: masses in kilograms, shares as mass fractions in [0, 1],
// densities in g/cm³. Categories carry their resin identification code
// (ASTM D7611, codes 1–7) where they have one.
//
// Methods:
//   - Cochran's ratio estimator with its variance and finite-population
//     correction (Cochran, Sampling Techniques, 3rd ed., Wiley 1977, ch. 6);
//   - the mean of per-pull fractions and the iterated sample-count formula
//     of ASTM D5231;
//   - Student t intervals on n − 1 degrees of freedom, quantiles from
//     gonum's stat/distuv;
//   - Wilson score and Clopper–Pearson intervals for piece counts
//     (Newcombe, Stat. Med. 17 (1998) 857).
//
// Deviations: the sampling fraction is taken by mass; piece counts are
// treated as independent although they are clustered in pulls; the
// sample-size advice leaves out the finite-population correction.
//
// The package never imports gioui.org: screens render its Report.
package assess
