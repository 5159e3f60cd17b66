//go:build cgo

package crs

// Opening and validating a CRS through PROJ's C API.

/*
#cgo LDFLAGS: -lproj
#include <stdlib.h>
#include <proj.h>
*/
import "C"

import (
	"fmt"
	"math"
	"runtime"
	"unsafe"
)

func openFrame(code string, number int) (*Frame, error) {
	return openWith(code, func(ctx *C.PJ_CONTEXT) *C.PJ { return lookupCRS(ctx, number) })
}

// openDefinition opens a CRS given as a PROJ string or WKT rather than an
// EPSG code, with the same checks as Open. The tests use it for published
// worked examples whose parameters are not exactly the dataset's; the
// service opens EPSG codes only.
func openDefinition(def string) (*Frame, error) {
	return openWith(def, func(ctx *C.PJ_CONTEXT) *C.PJ {
		cdef := C.CString(def)
		defer C.free(unsafe.Pointer(cdef))
		return C.proj_create(ctx, cdef)
	})
}

// openWith opens the CRS that create makes in a context (nil when there is
// none) and checks it; create is kept to build more workers.
func openWith(code string, create func(*C.PJ_CONTEXT) *C.PJ) (*Frame, error) {
	ctx := newContext()
	if ctx == nil {
		return nil, unavailable(code, "PROJ cannot create a context")
	}
	crs := create(ctx)
	if crs == nil {
		C.proj_context_destroy(ctx)
		return nil, newError(ErrUnknownCode, code, fmt.Sprintf(
			"%s is not a coordinate reference system in the EPSG dataset (PROJ %s)", code, ProjVersion()))
	}
	f, err := describe(ctx, crs, code)
	if err != nil {
		C.proj_destroy(crs)
		C.proj_context_destroy(ctx)
		return nil, err
	}
	w, err := buildWorker(ctx, crs)
	if err != nil {
		return nil, unavailable(code, err.Error())
	}
	eng := &projEngine{code: code, create: create, toMetres: f.unit.ToMetres,
		pool: make(chan *worker, runtime.GOMAXPROCS(0))}
	eng.pool <- w
	f.eng = eng
	return f, nil
}

// describe checks that crs is a projected CRS with an easting and a
// northing in one linear unit and reads its name, unit, area and base
// geodetic CRS.
func describe(ctx *C.PJ_CONTEXT, crs *C.PJ, code string) (*Frame, error) {
	f := &Frame{code: code, name: C.GoString(C.proj_get_name(crs)),
		deprecated: C.proj_is_deprecated(crs) != 0}
	if t := C.proj_get_type(crs); t != C.PJ_TYPE_PROJECTED_CRS {
		return nil, notProjected(ctx, crs, code, f.name, t)
	}
	unit, err := axesUnit(ctx, crs, code, f.name)
	if err != nil {
		return nil, err
	}
	f.unit = unit
	f.area = areaOfUse(ctx, crs)
	if g := C.proj_crs_get_geodetic_crs(ctx, crs); g != nil {
		f.geodetic = C.GoString(C.proj_get_name(g))
		C.proj_destroy(g)
	}
	return f, nil
}

// typeNames names the kinds of CRS that are not projected, for messages.
var typeNames = map[C.PJ_TYPE]string{
	C.PJ_TYPE_GEOGRAPHIC_2D_CRS: "geographic 2D CRS, whose coordinates are degrees of latitude and longitude",
	C.PJ_TYPE_GEOGRAPHIC_3D_CRS: "geographic 3D CRS, whose coordinates are degrees of latitude and longitude and a height",
	C.PJ_TYPE_GEOGRAPHIC_CRS:    "geographic CRS, whose coordinates are degrees",
	C.PJ_TYPE_GEOCENTRIC_CRS:    "geocentric CRS (Earth-centred X, Y, Z)",
	C.PJ_TYPE_VERTICAL_CRS:      "vertical CRS (heights or depths only)",
	C.PJ_TYPE_COMPOUND_CRS:      "compound CRS (a horizontal and a vertical CRS)",
	C.PJ_TYPE_ENGINEERING_CRS:   "engineering CRS (a local frame not tied to the Earth)",
	C.PJ_TYPE_TEMPORAL_CRS:      "temporal CRS",
	C.PJ_TYPE_BOUND_CRS:         "bound CRS",
}

func notProjected(ctx *C.PJ_CONTEXT, crs *C.PJ, code, name string, t C.PJ_TYPE) *Error {
	kind, ok := typeNames[t]
	if !ok {
		kind = "CRS of a kind other than projected"
	}
	msg := fmt.Sprintf("%s (%s) is a %s; the site frame needs a projected CRS whose coordinates are "+
		"metres or feet, such as a UTM zone (EPSG:32617, WGS 84 / UTM zone 17N) or a State Plane zone "+
		"(EPSG:2272, NAD83 / Pennsylvania South (ftUS))", code, name, kind)
	if t == C.PJ_TYPE_COMPOUND_CRS {
		if h := C.proj_crs_get_sub_crs(ctx, crs, 0); h != nil {
			if C.proj_get_type(h) == C.PJ_TYPE_PROJECTED_CRS && C.proj_get_id_code(h, 0) != nil {
				msg += fmt.Sprintf("; its horizontal part is EPSG:%s (%s)",
					C.GoString(C.proj_get_id_code(h, 0)), C.GoString(C.proj_get_name(h)))
			}
			C.proj_destroy(h)
		}
	}
	return newError(ErrNotProjected, code, msg)
}

// axisInfo is one axis of a coordinate system.
type axisInfo struct {
	direction string
	unitName  string
	unitAuth  string
	unitCode  string
	factor    float64
}

func readAxes(ctx *C.PJ_CONTEXT, crs *C.PJ) ([]axisInfo, bool) {
	cs := C.proj_crs_get_coordinate_system(ctx, crs)
	if cs == nil {
		return nil, false
	}
	defer C.proj_destroy(cs)
	cartesian := C.proj_cs_get_type(ctx, cs) == C.PJ_CS_TYPE_CARTESIAN
	n := int(C.proj_cs_get_axis_count(ctx, cs))
	axes := make([]axisInfo, 0, max(n, 0))
	for i := range n {
		var dir, unitName, unitAuth, unitCode *C.char
		var factor C.double
		if C.proj_cs_get_axis_info(ctx, cs, C.int(i), nil, nil, &dir, &factor,
			&unitName, &unitAuth, &unitCode) == 0 {
			return nil, false
		}
		axes = append(axes, axisInfo{direction: C.GoString(dir), unitName: C.GoString(unitName),
			unitAuth: C.GoString(unitAuth), unitCode: C.GoString(unitCode), factor: float64(factor)})
	}
	return axes, cartesian
}

// axesUnit checks the axes: two, Cartesian, one east and one north (in
// either order), in one linear unit; it returns that unit.
func axesUnit(ctx *C.PJ_CONTEXT, crs *C.PJ, code, name string) (Unit, error) {
	axes, cartesian := readAxes(ctx, crs)
	refuse := func(why string) (Unit, error) {
		return Unit{}, newError(ErrUnsupportedAxes, code, fmt.Sprintf(
			"%s (%s) %s; the site frame needs a projected CRS with an easting and a northing in one linear unit",
			code, name, why))
	}
	if !cartesian || len(axes) != 2 {
		return refuse(fmt.Sprintf("has %d axes in a non-planar coordinate system", len(axes)))
	}
	d0, d1 := axes[0].direction, axes[1].direction
	if !(d0 == "east" && d1 == "north") && !(d0 == "north" && d1 == "east") {
		return refuse(fmt.Sprintf("has axes pointing %s and %s", d0, d1))
	}
	if axes[0].unitName != axes[1].unitName || axes[0].factor != axes[1].factor ||
		!(axes[0].factor > 0) || math.IsInf(axes[0].factor, 0) {
		return refuse(fmt.Sprintf("has axes in %s and %s", axes[0].unitName, axes[1].unitName))
	}
	u := Unit{Name: axes[0].unitName, ToMetres: axes[0].factor}
	if axes[0].unitAuth != "" && axes[0].unitCode != "" {
		u.Code = axes[0].unitAuth + ":" + axes[0].unitCode
	}
	return u, nil
}

func areaOfUse(ctx *C.PJ_CONTEXT, crs *C.PJ) Area {
	var w, s, e, n C.double
	var name *C.char
	if C.proj_get_area_of_use(ctx, crs, &w, &s, &e, &n, &name) == 0 {
		return Area{West: -180, South: -90, East: 180, North: 90, Name: "unknown"}
	}
	return Area{West: float64(w), South: float64(s), East: float64(e), North: float64(n), Name: C.GoString(name)}
}
