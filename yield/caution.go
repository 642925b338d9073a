package yield

// Cautions the commands print beside any output that concerns hot
// glycols, isocyanates or the caustic wash. The facts are those of
// shared/REFERENCE.md 'Cautions to show'; the README's Safety section
// quotes these constants. They defer to local codes and licensed
// practice and are no substitute for a safety data sheet.
const (
	// CautionHotGlycol goes with every glycolysis output.
	CautionHotGlycol = "Caution: glycolysis runs at 190–250 °C, above the flash points of the glycols (EG about 111 °C, DEG about 124–154 °C) and near DEG's auto-ignition (about 224–229 °C): " +
		"run under an inert blanket with a closed condenser. Mixtures of DEG and sodium hydroxide can decompose exothermically above about 230 °C: " +
		"caustic-wet flake must never go into a glycol reactor. Follow local codes and licensed practice."

	// CautionIsocyanate goes with every blend or isocyanate output.
	CautionIsocyanate = "Caution: isocyanates are respiratory sensitisers and cause asthma. 2,4-TDI: OSHA ceiling 0.02 ppm, ACGIH TLV 0.001 ppm TWA and 0.005 ppm STEL, " +
		"NIOSH potential occupational carcinogen, IDLH 2.5 ppm. Handle with local exhaust ventilation and respiratory protection. Follow local codes and licensed practice."

	// CautionCaustic goes with every wash-line output.
	CautionCaustic = "Caution: the hot caustic wash (typically 1–3 % NaOH at 80–90 °C) burns skin and eyes, and aluminium in the feed releases hydrogen in it. " +
		"Follow local codes and licensed practice."

	// CautionPVC goes with any output where PVC reaches a glycol reactor.
	CautionPVC = "Caution: PVC degrades at glycolysis temperatures and releases hydrogen chloride (up to 0.583 g per g of PVC), which corrodes the reactor and breaks PET chains; remove PVC before grinding."
)
