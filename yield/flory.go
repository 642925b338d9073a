package yield

import "math"

// DistMaxK is the largest chain length listed one by one; longer chains
// are pooled in the last element of the fraction arrays.
const DistMaxK = 10

// LongOligomerUnits is the chain length, in terephthalate units, from
// which oligomers are counted as a crystallisation risk: trimers and
// longer crystallise out of a cooling glycolysate while monomer and dimer
// stay dissolved in the excess glycol (common practice).
const LongOligomerUnits = 3

// LongOligomerCaution is the weight share of long oligomers above which
// Glycolyse warns of crystallisation. It is an illustrative threshold
// chosen here, not a published figure.
const LongOligomerCaution = 0.10

// Distribution is Flory's most-probable chain-length distribution of a
// glycolysate: molecules HO–G–(T–G)k–OH with k terephthalate units T.
type Distribution struct {
	// P is N_T / N_G, the terephthalate units per glycol unit.
	P float64
	// Number and Weight fractions for k = 0 … DistMaxK; element
	// DistMaxK+1 pools k > DistMaxK. Both sum to 1.
	Number, Weight []float64
	// FreeGlycolWt is the weight share of free glycol (k = 0), MonomerWt
	// of k = 1, LongOligomerWt of k ≥ LongOligomerUnits.
	FreeGlycolWt, MonomerWt, LongOligomerWt float64
	// MonomerYield is the share of all terephthalate units that sit in
	// monomers (k = 1), comparable with an isolated BHET yield.
	MonomerYield float64
}

// flory returns the most-probable distribution for p = N_T/N_G, a
// terephthalate residue mass a and a mean glycol unit mass b (g/mol).
//
//	n_k = (1 − p)·p^k                     number fraction
//	M_k = k·a + (k + 1)·b                 molar mass
//	w_k = n_k·M_k / Mn,  Mn = Σ n_k·M_k = (a·p + b) / (1 − p)
//	share of T units in k-mers = k·(1 − p)²·p^(k−1)
//
// Flory, J. Am. Chem. Soc. 64 (1942) 2205 (random reorganisation in
// linear condensation polymers); applied to glycolysis by Kirshanov et
// al., Polymers 15 (2023) 3146. Assumes equal reactivity of all ester
// and hydroxyl groups, equilibrium, no rings and no side reactions. The
// pooled tail uses the closed forms Σ_{k≥K} p^k = p^K/(1 − p) and
// Σ_{k≥K} k·p^k = p^K·(K(1 − p) + p)/(1 − p)².
func flory(p, a, b float64) Distribution {
	d := Distribution{P: p, Number: make([]float64, DistMaxK+2), Weight: make([]float64, DistMaxK+2)}
	mn := (a*p + b) / (1 - p)
	pk := 1.0
	for k := 0; k <= DistMaxK; k++ {
		n := (1 - p) * pk
		d.Number[k] = n
		d.Weight[k] = n * (float64(k)*a + float64(k+1)*b) / mn
		pk *= p
	}
	K := float64(DistMaxK + 1)
	// pk is now p^K.
	d.Number[DistMaxK+1] = pk
	sumK := pk * (K*(1-p) + p) / ((1 - p) * (1 - p)) // Σ_{k≥K} k p^k
	sum0 := pk / (1 - p)                             // Σ_{k≥K} p^k
	d.Weight[DistMaxK+1] = (1 - p) * ((a+b)*sumK + b*sum0) / mn
	d.FreeGlycolWt = d.Weight[0]
	d.MonomerWt = d.Weight[1]
	for k := LongOligomerUnits; k < len(d.Weight); k++ {
		d.LongOligomerWt += d.Weight[k]
	}
	d.MonomerYield = (1 - p) * (1 - p)
	return d
}

// TerephthalateShare returns the share of terephthalate units that sit
// in molecules with exactly k units, k·(1 − p)²·p^(k−1), for k ≥ 1.
func (d Distribution) TerephthalateShare(k int) float64 {
	if k < 1 {
		return 0
	}
	return float64(k) * (1 - d.P) * (1 - d.P) * math.Pow(d.P, float64(k-1))
}
