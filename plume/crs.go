package plume

import (
	"errors"
	"fmt"

	"downgradient/internal/crs"
)

// CaveatCRSScale notes a projection whose scale distorts distances.
const CaveatCRSScale = "crs_scale_distortion"

// siteCRS opens the scenario's coordinate reference system; nil without one.
// The error is the CRS package's, which says what is wrong with the code.
func siteCRS(sc Scenario) (*crs.Frame, error) {
	if sc.CRS == "" {
		return nil, nil
	}
	return crs.Open(sc.CRS)
}

// validateCRS checks the crs field (a projected CRS whose linear unit
// matches units.length) and, with receptors, the receptors given by lon/lat
// (see validateLonLat).
func validateCRS(fe *FieldErrors, sc Scenario, receptors bool) {
	fr, err := siteCRS(sc)
	switch {
	case err != nil:
		var ce *crs.Error
		msg := err.Error()
		if errors.As(err, &ce) && errors.Is(err, crs.ErrUnavailable) {
			msg = "coordinate reference systems are not available in this build (it was built without cgo and PROJ)"
		}
		fe.Add("crs", msg)
	case fr != nil:
		want := LengthMetre
		if fr.Unit().ToMetres != 1 {
			want = LengthFoot
		}
		if got := sc.Units.withDefaults().Length; got != want {
			fe.Add("units.length", fmt.Sprintf("must be %q to match the linear unit of %s (%s): site coordinates are in the CRS's own unit, got %q", want, fr.Code(), fr.Unit().Name, got))
		}
	}
	if !receptors {
		return
	}
	for i, r := range sc.Receptors {
		validateLonLat(fe, i, r, sc.CRS, fr)
	}
}

// validateLonLat checks receptors[i] given by lon/lat: both, in range,
// with a crs (code, opened as fr: nil when it did not open), inside its
// projection, and not together with x and y.
func validateLonLat(fe *FieldErrors, i int, r Receptor, code string, fr *crs.Frame) {
	if r.Lon == nil && r.Lat == nil {
		return
	}
	at := func(f string) string { return fmt.Sprintf("receptors[%d].%s", i, f) }
	switch {
	case code == "":
		fe.Add(at("lon"), "lon and lat need the scenario's crs (the site frame they are projected into)")
	case r.Lon == nil || r.Lat == nil:
		fe.Add(at("lat"), "give both lon and lat, or neither")
	case r.X != nil || r.Y != nil:
		fe.Add(at("x"), "give x and y, or lon and lat, not both")
	case !(*r.Lon >= -180 && *r.Lon <= 180):
		fe.Add(at("lon"), fmt.Sprintf("must be a longitude in [-180, 180] degrees, got %g", *r.Lon))
	case !(*r.Lat >= -90 && *r.Lat <= 90):
		fe.Add(at("lat"), fmt.Sprintf("must be a latitude in [-90, 90] degrees, got %g", *r.Lat))
	case fr != nil:
		if _, _, err := fr.FromLonLat(*r.Lon, *r.Lat); err != nil {
			fe.Add(at("lon"), err.Error())
		}
	}
}

// hasLonLat reports whether a receptor is given by longitude and latitude.
func (r Receptor) hasLonLat() bool { return r.Lon != nil && r.Lat != nil }

// resolveLonLat returns sc with every receptor given by lon/lat placed in
// the site frame (x, y in the CRS's unit); sc must be valid.
func resolveLonLat(sc Scenario) Scenario {
	fr, err := siteCRS(sc)
	if err != nil || fr == nil {
		return sc
	}
	out := sc
	out.Receptors = append([]Receptor(nil), sc.Receptors...)
	for i, r := range out.Receptors {
		if !r.hasLonLat() {
			continue
		}
		x, y, err := fr.FromLonLat(*r.Lon, *r.Lat)
		if err != nil {
			continue // validateCRS refused it
		}
		out.Receptors[i].X, out.Receptors[i].Y = Ptr(x), Ptr(y)
	}
	return out
}

// crsCaveat notes a projection whose point scale at the source differs
// from 1 by more than crs.DistortionCaveat (0.1 %): site distances are then
// grid distances, not true ones.
func crsCaveat(res *Result, sc Scenario) {
	fr, err := siteCRS(sc)
	if err != nil || fr == nil {
		return
	}
	src := sc.PrimarySource()
	x, y := derefOr(src.X, 0), derefOr(src.Y, 0)
	s, err := fr.ScaleAt(x, y)
	if err != nil {
		return
	}
	if d := s.Distortion(); d > crs.DistortionCaveat {
		res.caveat(CaveatCRSScale, SeverityCaution, "",
			"The projection of %s (%s) scales distances by %.5f to %.5f at the source (%.2f %% off true distance): the site frame's distances, and so travel distances and dispersion, are grid distances; consider a CRS with less distortion here.",
			fr.Code(), fr.Name(), s.Min, s.Max, 100*d)
	}
}

// SiteCoordinates returns each receptor's site coordinates in the request's
// length unit: as given, or projected from lon and lat through the
// scenario's crs; a receptor that has neither gets (0, 0). sc need not have
// been validated.
func SiteCoordinates(sc Scenario) [][2]float64 {
	rs := resolveLonLat(sc).Receptors
	out := make([][2]float64, len(rs))
	for i, r := range rs {
		out[i] = [2]float64{derefOr(r.X, 0), derefOr(r.Y, 0)}
	}
	return out
}
