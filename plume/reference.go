package plume

// referenceValues are the defaults a reference-table entry supplies, in
// canonical units (L/kg, d, mg/L); nil when the table has no value.
type referenceValues struct {
	Name           string   // the table's name of the compound
	Koc            *float64 // L/kg
	HalfLifeLong   *float64 // long (conservative) end of the typical half-life range, d
	ScreeningLevel *float64 // mg/L
	Solubility     *float64 // mg/L
}

// lookupReference finds name in the contaminant reference table.
// It is a variable so tests can substitute a table.
var lookupReference = func(name string) (referenceValues, bool) {
	return referenceValues{}, false
}
