package yield

import "math"

// Standard atomic weights, g/mol, abridged to the figures the IUPAC
// Commission on Isotopic Abundances and Atomic Weights recommends for
// everyday use (conventional values for H, C, N, O, Cl).
const (
	atomH  = 1.008
	atomC  = 12.011
	atomN  = 14.007
	atomO  = 15.999
	atomCl = 35.45
	atomZn = 65.38
)

// Molar masses in g/mol, built from the atomic weights above.
const (
	// MolarMassPETUnit is the PET repeat unit C10H8O4.
	MolarMassPETUnit = 10*atomC + 8*atomH + 4*atomO
	// MolarMassTerephthaloyl is what one terephthalate unit adds to a
	// chain of whole glycol molecules: terephthalic acid less the two
	// waters of its two ester bonds, C8H6O4 − 2 H2O = C8H2O2, which is
	// also the repeat unit less one ethylene glycol (C10H8O4 − C2H6O2).
	// A molecule with k terephthalate units and k+1 glycol units G weighs
	// k·M(C8H2O2) + (k+1)·M(G).
	MolarMassTerephthaloyl = MolarMassPETUnit - MolarMassEG
	// MolarMassEG is ethylene glycol C2H6O2.
	MolarMassEG = 2*atomC + 6*atomH + 2*atomO
	// MolarMassBHET is bis(2-hydroxyethyl) terephthalate C12H14O6.
	MolarMassBHET = 12*atomC + 14*atomH + 6*atomO
	// MolarMassWater is H2O.
	MolarMassWater = 2*atomH + atomO
	// MolarMassPVCUnit is the PVC repeat unit C2H3Cl.
	MolarMassPVCUnit = 2*atomC + 3*atomH + atomCl
	// MolarMassHCl is hydrogen chloride.
	MolarMassHCl = atomH + atomCl
	// MolarMassNCO is the isocyanate group N=C=O.
	MolarMassNCO = atomN + atomC + atomO
	// MolarMassZincAcetate is anhydrous zinc acetate Zn(C2H3O2)2.
	MolarMassZincAcetate = atomZn + 2*(2*atomC+3*atomH+2*atomO)
	// MolarMassZincAcetateDihydrate is Zn(C2H3O2)2·2H2O.
	MolarMassZincAcetateDihydrate = MolarMassZincAcetate + 2*MolarMassWater
)

// KOH is the molar mass of potassium hydroxide in g/mol. A hydroxyl
// value in mg KOH/g is 1000·KOH times the moles of OH per gram.
const KOH = 56.106

// mgKOH is KOH in mg/mol: hydroxyl value = mgKOH × equivalents / grams.
const mgKOH = KOH * 1000

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
