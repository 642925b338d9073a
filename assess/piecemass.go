package assess

// typicalPieceKg is the mass of one typical piece of each category, in
// kg: the unit in which an absence is counted (see noneFoundUpper). A
// heavier piece gives a wider bound, so each figure leans to the heavy
// side of what turns up in bottle bales. All are from memory (bottles:
// 500 mL water bottles 9–14 g, 2 L soft-drink bottles 42–50 g,
// closures 1.2–3 g, labels 0.3–2 g); liquid and fines have no pieces,
// so their unit is a bottle's leftover drink and a clump of dirt, an
// assumption of our own. Replace them with your yard's own weighings.
var typicalPieceKg = map[string]float64{
	"pet_clear":        0.025,
	"pet_tinted":       0.025,
	"pet_green":        0.030,
	"pet_amber":        0.030,
	"pet_colour_other": 0.025,
	"pet_opaque":       0.030,
	"pet_thermoform":   0.015,
	"hdpe":             0.040,
	"pvc":              0.035,
	"ldpe":             0.015,
	"pp":               0.020,
	"ps":               0.010,
	"pla":              0.015,
	"other_resin":      0.030,
	"closures":         0.003,
	"labels":           0.002,
	"film":             0.005,
	"paper":            0.005,
	"aluminium":        0.015,
	"steel":            0.050,
	"glass":            0.250,
	"liquid":           0.050,
	"fines":            0.020,
	"hazard":           0.050,
}

// PieceKg returns the typical piece mass of a category or group key in
// kg; a group takes the heaviest of its members (the wider bound).
func PieceKg(key string) float64 {
	if m, ok := typicalPieceKg[key]; ok {
		return m
	}
	g, ok := LookupGroup(key)
	if !ok {
		return 0
	}
	heaviest := 0.0
	for _, c := range catalogue {
		if c.Group == g {
			heaviest = max(heaviest, typicalPieceKg[c.Key])
		}
	}
	return heaviest
}
