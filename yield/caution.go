package yield

import (
	"fmt"
	"strings"
)

// ReactorTempRange is the glycolysis temperature range every caution and
// the README use (common practice: 180–250 °C, reflux near the glycol's
// boiling point).
const ReactorTempRange = "180–250 °C"

// Cautions the commands print beside any output that concerns hot
// glycols, isocyanates or the caustic wash. The TDI figures are from the
// agencies' published limits (OSHA, ACGIH, NIOSH); the MDI figures,
// glycol flash points and auto-ignition temperatures are from memory.
// They defer to local codes and licensed practice and are no substitute
// for a safety data sheet.
const (
	// CautionHotGlycol goes with every glycolysis output whose glycol is
	// not known; CautionHotGlycolFor names the glycol's own figures.
	CautionHotGlycol = "Caution: glycolysis runs at " + ReactorTempRange + ", above the flash points of the glycols (EG about 111 °C, DEG about 124–154 °C) and near DEG's auto-ignition (about 224–229 °C): " +
		"run under an inert blanket with a closed condenser. Mixtures of DEG and sodium hydroxide can decompose exothermically above about 230 °C: " +
		"caustic-wet flake must never go into a glycol reactor. Follow local codes and licensed practice."

	// CautionIsocyanate goes with a blend whose isocyanate is given only
	// by its NCO content; CautionIsocyanateFor names a preset's figures.
	CautionIsocyanate = "Caution: isocyanates are respiratory sensitisers and cause asthma. Take the exposure limits from the isocyanate's safety data sheet; " +
		"handle with local exhaust ventilation and respiratory protection. Follow local codes and licensed practice."

	// CautionTDI goes with every TDI blend.
	CautionTDI = "Caution: isocyanates are respiratory sensitisers and cause asthma. 2,4-TDI: OSHA ceiling 0.02 ppm, ACGIH TLV 0.001 ppm TWA and 0.005 ppm STEL, " +
		"NIOSH potential occupational carcinogen, IDLH 2.5 ppm. Handle with local exhaust ventilation and respiratory protection. Follow local codes and licensed practice."

	// CautionMDI goes with every MDI or polymeric MDI blend.
	CautionMDI = "Caution: isocyanates are respiratory sensitisers and cause asthma. MDI: OSHA ceiling 0.02 ppm, ACGIH TLV 0.005 ppm TWA, NIOSH 0.005 ppm TWA and 0.02 ppm ceiling (10 min). " +
		"MDI's vapour pressure is low, but heated, sprayed or frothed MDI forms vapour and aerosol: handle with local exhaust ventilation and respiratory protection. " +
		"Check the current limits of your jurisdiction; follow local codes and licensed practice."

	// CautionCaustic goes with every wash-line output.
	CautionCaustic = "Caution: the hot caustic wash (typically 1–3 % NaOH at 80–90 °C) burns skin and eyes, and aluminium in the feed releases hydrogen in it. " +
		"Follow local codes and licensed practice."

	// CautionPVC goes with any output where PVC reaches a glycol reactor.
	CautionPVC = "Caution: PVC degrades at glycolysis temperatures and releases hydrogen chloride (up to 0.583 g per g of PVC), which corrodes the reactor and breaks PET chains; remove PVC before grinding."
)

// CautionHotGlycolFor is the hot-glycol caution for the glycol actually
// charged: its own flash point (and boiling point, where the reactor
// runs above it), DEG's auto-ignition and its reaction with caustic only
// for DEG.
func CautionHotGlycolFor(g Glycol) string {
	var b strings.Builder
	fmt.Fprintf(&b, "Caution: glycolysis runs at %s, above the flash point of %s (about %.0f °C)", ReactorTempRange, g.Name, g.FlashC)
	if g.BoilingC < 250 {
		fmt.Fprintf(&b, " and up to or above its boiling point (about %.0f °C)", g.BoilingC)
	}
	if g.Key == "DEG" {
		b.WriteString(", near its auto-ignition (about 224–229 °C)")
	}
	b.WriteString(": run under an inert blanket with a closed condenser. ")
	if g.Key == "DEG" {
		b.WriteString("Mixtures of DEG and sodium hydroxide can decompose exothermically above about 230 °C: ")
	}
	b.WriteString("caustic-wet flake must never go into a glycol reactor. Follow local codes and licensed practice.")
	return b.String()
}

// CautionIsocyanateFor is the isocyanate caution for a preset key (TDI,
// MDI, PMDI), or the general one for anything else.
func CautionIsocyanateFor(key string) string {
	switch strings.ToUpper(strings.TrimSpace(key)) {
	case "TDI":
		return CautionTDI
	case "MDI", "PMDI":
		return CautionMDI
	}
	return CautionIsocyanate
}
