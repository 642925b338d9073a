package report

import (
	"fmt"
	"strings"
)

// method names a footnote: a method and its source.
type method uint8

// The methods a report may cite.
const (
	mRatio method = iota + 1
	mMeanOfFractions
	mInterval
	mVerdict
	mNoneFound
	mSampleSize
	mCodes
	mPieces
	mLine
	mBootstrap
	mSensitivity
	mGlycolysis
	mWelford
	mPerTonne
	mWeeks
	mHaversine
	mProjection
)

// methodText is the footnote of each method: what was done and where it
// comes from (the same sources README's "Where the methods come from"
// lists).
var methodText = map[method]string{
	mRatio: "Composition: Cochran's ratio estimator r = Σc / Σw over the pulls (mass of a category over mass sorted), " +
		"with its variance and the finite-population correction f = sampled kg / bale kg (W. G. Cochran, <i>Sampling Techniques</i>, 3rd ed., Wiley 1977, ch. 6, eq. 6.9).",
	mMeanOfFractions: "Composition: the mean of per-pull fractions, every pull weighted the same (ASTM D5231).",
	mInterval: "Intervals: estimate ± t·SE with Student's t on n − 1 degrees of freedom, clamped to 0–100 %; " +
		"one pull gives no interval. A grab sample is not a random sample of the bale's mass, so read the interval as a floor on the uncertainty.",
	mVerdict: "Verdict: a limit passes when the whole interval lies on its right side, fails when the whole interval lies on the wrong side, and is undecided when it straddles the limit; " +
		"the bale fails if any limit fails, is undecided if any is, and passes otherwise. Hazards are zero-tolerance: any one found fails the bale.",
	mNoneFound:  "A category found in no pull is bounded, not proven absent: the bound counts the sorted mass in typical pieces of that category.",
	mSampleSize: "Pulls needed: n = (t·s / (e·x̄))², iterated because t depends on n (ASTM D5231), without the finite-population correction, so it errs towards more pulls.",
	mCodes:      "Resin identification codes 1–7: ASTM D7611.",
	mPieces:     "Piece-count shares: Wilson score interval (E. B. Wilson, J. Am. Stat. Assoc. 22 (1927) 209) and Clopper–Pearson exact interval (Biometrika 26 (1934) 404).",
	mLine: "Wash line: a mass balance stage by stage (sorting, grinding, air classifying, sink–float by handbook densities, caustic wash, drying, screening) that closes to 1e-9; " +
		"the line's efficiencies are the named profile's, the built-in ones illustrative (from memory or common practice): replace them with your own line's.",
	mBootstrap: "P10–P90 of the draws: the composition drawn from the audit's own estimator (Cochran's ratio estimate with its covariance and the finite-population correction, " +
		"as a multivariate t on n − 1 degrees of freedom, so that the drawn target-PET share's P5–P95 is the audit's 90 % interval), line efficiencies drawn uniformly from their ranges; " +
		"percentiles by definition 7 of R. J. Hyndman and Y. Fan, Am. Stat. 50 (1996) 361.",
	mSensitivity: "What drives the spread: the draws repeated with one input varying at a time; for a model additive in its inputs, each input's share is its first-order variance V[E(Y|X<sub>i</sub>)] " +
		"(A. Saltelli et al., <i>Global Sensitivity Analysis: The Primer</i>, Wiley 2008, ch. 1).",
	mGlycolysis: "Glycolysis: hydroxyl value by conservation of OH groups through transesterification (56 106 mg KOH per equivalent); chain lengths by Flory's most-probable distribution " +
		"(P. J. Flory, J. Am. Chem. Soc. 64 (1942) 2205) as applied to PET glycolysis by Kirshanov et al., Polymers 15 (2023) 3146. Measure the product's hydroxyl and acid values (ASTM D4274, ASTM D4662) before use.",
	mWelford: "Across bales: each bale's shares by Cochran's ratio estimate, then mean and sample standard deviation by Welford's running update (B. P. Welford, Technometrics 4 (1962) 419).",
	mPerTonne: "Per tonne: Σ product / Σ bale gross mass over the audited bales, each bale at its audit's point estimate through the plan named; " +
		"P10–P90 here is the spread from bale to bale (Hyndman and Fan, definition 7), not the uncertainty of the mean.",
	mWeeks:      "Weeks are ISO 8601 weeks, Monday to Sunday, UTC; a span longer than 16 weeks is drawn month by month. An empty week is a gap in the line.",
	mHaversine:  "Distances: haversine great-circle distance (R. W. Sinnott, Sky & Telescope 68 (1984) 159) on a sphere of radius 6371.0088 km (IUGG mean radius).",
	mProjection: "Map: equirectangular projection with its standard parallel through the map's centre (J. P. Snyder, <i>Map Projections—A Working Manual</i>, USGS Professional Paper 1395, 1987, ch. 12); drawn by this program, no map tiles.",
}

// notes numbers footnotes in the order they are first cited.
type notes struct {
	order []method
	at    map[method]int
}

// ref cites a method and returns its superscript link.
func (ns *notes) ref(m method) string {
	if ns.at == nil {
		ns.at = map[method]int{}
	}
	i, ok := ns.at[m]
	if !ok {
		ns.order = append(ns.order, m)
		i = len(ns.order)
		ns.at[m] = i
	}
	return fmt.Sprintf(`<sup><a href="#note-%d">%d</a></sup>`, i, i)
}

// refs cites several methods in one superscript: "1, 2".
func (ns *notes) refs(ms ...method) string {
	var parts []string
	for _, m := range ms {
		parts = append(parts, strings.TrimSuffix(strings.TrimPrefix(ns.ref(m), "<sup>"), "</sup>"))
	}
	return "<sup>" + strings.Join(parts, ", ") + "</sup>"
}

func (ns *notes) html() string {
	if len(ns.order) == 0 {
		return ""
	}
	var b strings.Builder
	b.WriteString(`<section class="notes" id="notes"><h2>Methods and sources</h2><ol>`)
	for i, m := range ns.order {
		fmt.Fprintf(&b, `<li id="note-%d">%s</li>`, i+1, methodText[m])
	}
	b.WriteString("</ol></section>\n")
	return b.String()
}
