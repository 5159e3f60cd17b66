// Package crs validates the coordinate reference system of a site frame and
// converts site coordinates to WGS 84 longitude/latitude and back, through
// PROJ (https://proj.org), the field's reference library, called with cgo
// against the system's libproj (Debian: libproj-dev, which brings the
// proj.db EPSG database with proj-data). No projection formula is written
// here: every conversion, every CRS definition and every scale factor is
// PROJ's.
//
// A site frame must be a projected CRS named by its EPSG code
// ("EPSG:32617", UTM zone 17N; "EPSG:2272", a US State Plane zone in US
// survey feet): a geographic CRS (degrees) is refused, because the site
// frame's coordinate differences are used as distances. Site coordinates
// are always (easting, northing) in the CRS's own linear unit, whatever the
// axis order of the EPSG definition (PROJ's "normalised for visualisation"
// order, the one a GIS shows). Longitude/latitude are WGS 84 (EPSG:4326)
// in degrees in the order (longitude, latitude) of RFC 7946.
//
// Accuracy: each point is checked by a round trip through the projection
// and refused (ErrOutsideProjection) when it does not come back to within
// 1 mm, so every value returned reproduces PROJ to 1 mm. The datum shift to
// WGS 84 is the one PROJ chooses for the point with the grids installed
// locally and the network off (the choice cs2cs makes); its own accuracy
// (Frame.Operation) is that of the published transformation, often metres
// for NAD27 or NAD83 to WGS 84.
//
// Built without cgo, Open returns ErrUnavailable for every code.
package crs
