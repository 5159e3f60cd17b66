package plume

// referenceValues are the defaults a reference-table entry supplies, in
// canonical units (L/kg, d, mg/L); nil when the table has no value.
type referenceValues struct {
	Name           string   // the table's name of the compound
	Koc            *float64 // L/kg
	HalfLifeLong   *float64 // long (conservative) end of the typical half-life range, d
	ScreeningLevel *float64 // lowest drinking-water limit of the entry, mg/L
	Solubility     *float64 // mg/L
}

// lookupReference finds name in the contaminant reference table
// (LookupContaminant) and picks the screening defaults: Koc, the long end of
// the half-life range (the conservative choice: slower decay, longer plume;
// used only when the request sets use_table_half_life), the lowest
// drinking-water limit as the screening level, and the aqueous solubility.
// It is a variable so tests can substitute a table.
var lookupReference = func(name string) (referenceValues, bool) {
	if name == "" {
		return referenceValues{}, false
	}
	c, ok := LookupContaminant(name)
	if !ok {
		return referenceValues{}, false
	}
	rv := referenceValues{Name: c.Name}
	if c.Koc.Value > 0 {
		rv.Koc = Ptr(c.Koc.Value)
	}
	if hl := c.ConservativeHalfLife(); hl > 0 {
		rv.HalfLifeLong = Ptr(hl)
	}
	if l, ok := c.ScreeningLevel(); ok && l.Value > 0 {
		rv.ScreeningLevel = Ptr(l.Value)
	}
	if c.Solubility.Value > 0 {
		rv.Solubility = Ptr(c.Solubility.Value)
	}
	return rv, true
}
