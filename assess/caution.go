package assess

// CautionHazard goes with every audit, pull or load in which a hazard
// was found: batteries and chemical containers turn up in bales (common
// practice; the site's procedure and local codes rule).
const CautionHazard = "Caution: a pull holds a hazard (a battery, an oil or chemical container, sharps or medical waste): keep it apart from the bale and the line, " +
	"never crush, cut or bale a battery (it can ignite), and follow the site's hazardous-waste procedure and local codes."
