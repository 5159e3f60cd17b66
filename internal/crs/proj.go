//go:build cgo

package crs

/*
#cgo LDFLAGS: -lproj
#include <math.h>
#include <stdlib.h>
#include <proj.h>

// dg_trans runs one point through P in direction dir (PJ_FWD or PJ_INV)
// and returns PROJ's error number (0 on success).
static int dg_trans(PJ *P, int dir, double x, double y, double *ox, double *oy) {
	PJ_COORD c = proj_coord(x, y, 0, HUGE_VAL);
	proj_errno_reset(P);
	PJ_COORD r = proj_trans(P, (PJ_DIRECTION)dir, c);
	*ox = r.xy.x;
	*oy = r.xy.y;
	return proj_errno(P);
}

// dg_geod returns the geodesic distance (metres) and the forward
// azimuths (degrees) at both ends between two points given in degrees, on
// the ellipsoid of P (GeographicLib's algorithm inside PROJ).
static int dg_geod(PJ *P, double lon1, double lat1, double lon2, double lat2, double out[3]) {
	PJ_COORD a = proj_coord(proj_torad(lon1), proj_torad(lat1), 0, 0);
	PJ_COORD b = proj_coord(proj_torad(lon2), proj_torad(lat2), 0, 0);
	proj_errno_reset(P);
	PJ_COORD r = proj_geod(P, a, b);
	out[0] = r.geod.s;
	out[1] = r.geod.a1;
	out[2] = r.geod.a2;
	return proj_errno(P);
}

static const char *dg_info_description(PJ *P) {
	return proj_pj_info(P).description;
}
*/
import "C"

import (
	"fmt"
	"math"
	"runtime"
	"strconv"
	"unsafe"
)

// handles are one worker's PROJ objects. A PJ and its context may be used
// by one thread at a time, so each worker owns its own context and
// objects; the engine keeps a pool of them.
type handles struct {
	ctx *C.PJ_CONTEXT
	// toWGS84: site (easting, northing) -> WGS 84 (lon, lat), normalised.
	toWGS84 *C.PJ
	// toGeodetic: site (easting, northing) -> base geodetic (lon, lat).
	toGeodetic *C.PJ
	// ellipsoid: longitude/latitude on the base geodetic CRS's ellipsoid,
	// for geodesics.
	ellipsoid *C.PJ
}

type worker struct{ h handles }

func (h handles) destroy() {
	for _, p := range []*C.PJ{h.ellipsoid, h.toGeodetic, h.toWGS84} {
		if p != nil {
			C.proj_destroy(p)
		}
	}
	if h.ctx != nil {
		C.proj_context_destroy(h.ctx)
	}
}

// projEngine converts through a pool of workers for one CRS.
type projEngine struct {
	code     string
	create   func(*C.PJ_CONTEXT) *C.PJ
	toMetres float64
	pool     chan *worker
}

// newContext returns a PROJ context that logs nothing (errors are
// reported through the error numbers) and never reaches the network, so
// results depend only on the grids installed locally, as cs2cs's do.
func newContext() *C.PJ_CONTEXT {
	ctx := C.proj_context_create()
	if ctx == nil {
		return nil
	}
	C.proj_log_level(ctx, C.PJ_LOG_NONE)
	C.proj_context_set_enable_network(ctx, 0)
	return ctx
}

// lookupCRS returns the CRS EPSG:number from the context's database, or
// nil.
func lookupCRS(ctx *C.PJ_CONTEXT, number int) *C.PJ {
	auth := C.CString("EPSG")
	defer C.free(unsafe.Pointer(auth))
	code := C.CString(strconv.Itoa(number))
	defer C.free(unsafe.Pointer(code))
	return C.proj_create_from_database(ctx, auth, code, C.PJ_CATEGORY_CRS, 0, nil)
}

// unavailable is the error of a PROJ installation that fails on a CRS it
// has validated (a missing proj.db, memory): not the input's fault.
func unavailable(code, why string) *Error {
	return newError(ErrUnavailable, code, code+": "+why)
}

// buildWorker makes the operations of a worker in ctx, which the worker
// then owns; it frees crs. On error it frees ctx too.
func buildWorker(ctx *C.PJ_CONTEXT, crs *C.PJ) (*worker, error) {
	h, err := buildHandles(ctx, crs)
	C.proj_destroy(crs)
	if err != nil {
		h.destroy()
		return nil, err
	}
	w := &worker{h: h}
	runtime.AddCleanup(w, handles.destroy, h)
	return w, nil
}

// buildHandles makes, in ctx, the operations from crs to WGS 84 and to its
// base geodetic CRS and the ellipsoid for geodesics; on error the handles
// made so far are returned with it.
func buildHandles(ctx *C.PJ_CONTEXT, crs *C.PJ) (handles, error) {
	h := handles{ctx: ctx}
	fail := func(what string) (handles, error) {
		msg := C.GoString(C.proj_context_errno_string(ctx, C.proj_context_errno(ctx)))
		return h, fmt.Errorf("PROJ cannot build the %s: %s", what, msg)
	}
	wgs84 := lookupCRS(ctx, 4326)
	if wgs84 == nil {
		return fail("WGS 84 definition (is proj.db installed?)")
	}
	h.toWGS84 = normalised(ctx, C.proj_create_crs_to_crs_from_pj(ctx, crs, wgs84, nil, nil))
	C.proj_destroy(wgs84)
	if h.toWGS84 == nil {
		return fail("transformation to WGS 84")
	}
	geod := C.proj_crs_get_geodetic_crs(ctx, crs)
	if geod == nil {
		return fail("base geodetic CRS")
	}
	h.toGeodetic = normalised(ctx, C.proj_create_crs_to_crs_from_pj(ctx, crs, geod, nil, nil))
	h.ellipsoid = ellipsoidOf(ctx, geod)
	C.proj_destroy(geod)
	if h.toGeodetic == nil {
		return fail("inverse projection")
	}
	if h.ellipsoid == nil {
		return fail("ellipsoid")
	}
	return h, nil
}

// ellipsoidOf returns a longitude/latitude PJ on the ellipsoid of the
// geodetic CRS geod, for proj_geod.
func ellipsoidOf(ctx *C.PJ_CONTEXT, geod *C.PJ) *C.PJ {
	e := C.proj_get_ellipsoid(ctx, geod)
	if e == nil {
		return nil
	}
	defer C.proj_destroy(e)
	var a, b, invFlat C.double
	var computed C.int
	if C.proj_ellipsoid_get_parameters(ctx, e, &a, &b, &computed, &invFlat) == 0 {
		return nil
	}
	def := C.CString(fmt.Sprintf("+proj=longlat +a=%.17g +b=%.17g", float64(a), float64(b)))
	defer C.free(unsafe.Pointer(def))
	return C.proj_create(ctx, def)
}

// normalised returns op with its input and output axes in GIS order
// (easting, northing; longitude, latitude) and frees op.
func normalised(ctx *C.PJ_CONTEXT, op *C.PJ) *C.PJ {
	if op == nil {
		return nil
	}
	n := C.proj_normalize_for_visualization(ctx, op)
	C.proj_destroy(op)
	return n
}

// get takes a worker from the pool or builds one.
func (e *projEngine) get() (*worker, error) {
	select {
	case w := <-e.pool:
		return w, nil
	default:
	}
	ctx := newContext()
	if ctx == nil {
		return nil, unavailable(e.code, "PROJ cannot create a context")
	}
	crs := e.create(ctx)
	if crs == nil {
		C.proj_context_destroy(ctx)
		return nil, unavailable(e.code, "PROJ can no longer read the CRS")
	}
	w, err := buildWorker(ctx, crs)
	if err != nil {
		return nil, unavailable(e.code, err.Error())
	}
	return w, nil
}

// put returns a worker to the pool; a worker the full pool cannot take is
// freed by its cleanup once unreachable.
func (e *projEngine) put(w *worker) {
	select {
	case e.pool <- w:
	default:
	}
}

func trans(p *C.PJ, dir C.int, a, b float64) (float64, float64, bool) {
	var oa, ob C.double
	if C.dg_trans(p, dir, C.double(a), C.double(b), &oa, &ob) != 0 {
		return math.NaN(), math.NaN(), false
	}
	return float64(oa), float64(ob), true
}

// projects checks that the site point (x, y) survives the projection's
// round trip to within roundTripTolerance.
func (e *projEngine) projects(w *worker, x, y float64) bool {
	lon, lat, ok := trans(w.h.toGeodetic, C.PJ_FWD, x, y)
	if !ok {
		return false
	}
	bx, by, ok := trans(w.h.toGeodetic, C.PJ_INV, lon, lat)
	return ok && math.Hypot(bx-x, by-y)*e.toMetres <= roundTripTolerance
}

func (e *projEngine) outside(x, y float64) *Error {
	return newError(ErrOutsideProjection, e.code, fmt.Sprintf(
		"site point (%g, %g) cannot be converted in %s to within 1 mm: it lies far outside the projection's domain", x, y, e.code))
}

func (e *projEngine) outsideLonLat(lon, lat float64) *Error {
	return newError(ErrOutsideProjection, e.code, fmt.Sprintf(
		"longitude/latitude (%g, %g) cannot be converted to %s to within 1 mm: it lies far outside the projection's domain", lon, lat, e.code))
}

// convert runs (a, b) through op of a pooled worker in direction dir,
// then checks the site point of the pair by the projection's round trip.
func (e *projEngine) convert(op func(*worker) *C.PJ, dir C.int, a, b float64) (float64, float64, error) {
	w, err := e.get()
	if err != nil {
		return 0, 0, err
	}
	defer e.put(w)
	oa, ob, ok := trans(op(w), dir, a, b)
	if dir == C.PJ_FWD {
		if !ok || !e.projects(w, a, b) {
			return 0, 0, e.outside(a, b)
		}
	} else if !ok || !e.projects(w, oa, ob) {
		return 0, 0, e.outsideLonLat(a, b)
	}
	return oa, ob, nil
}

func wgs84Op(w *worker) *C.PJ    { return w.h.toWGS84 }
func geodeticOp(w *worker) *C.PJ { return w.h.toGeodetic }

func (e *projEngine) toLonLat(x, y float64) (float64, float64, error) {
	return e.convert(wgs84Op, C.PJ_FWD, x, y)
}

func (e *projEngine) fromLonLat(lon, lat float64) (float64, float64, error) {
	return e.convert(wgs84Op, C.PJ_INV, lon, lat)
}

func (e *projEngine) toGeodetic(x, y float64) (float64, float64, error) {
	return e.convert(geodeticOp, C.PJ_FWD, x, y)
}

func (e *projEngine) fromGeodetic(lon, lat float64) (float64, float64, error) {
	return e.convert(geodeticOp, C.PJ_INV, lon, lat)
}

// geodesic returns the distance in metres and the forward azimuths in
// degrees at both ends of the geodesic between two points of the base
// geodetic CRS (degrees), on its ellipsoid.
func (e *projEngine) geodesic(lon1, lat1, lon2, lat2 float64) (s, az1, az2 float64, err error) {
	w, err := e.get()
	if err != nil {
		return 0, 0, 0, err
	}
	defer e.put(w)
	var out [3]C.double
	if C.dg_geod(w.h.ellipsoid, C.double(lon1), C.double(lat1), C.double(lon2), C.double(lat2), &out[0]) != 0 {
		return 0, 0, 0, newError(ErrOutsideProjection, e.code, fmt.Sprintf(
			"PROJ cannot measure the geodesic from (%g, %g) to (%g, %g)", lon1, lat1, lon2, lat2))
	}
	return float64(out[0]), float64(out[1]), float64(out[2]), nil
}

// operation reports the operation PROJ last used for (x, y) to WGS 84.
func (e *projEngine) operation(x, y float64) (Operation, error) {
	w, err := e.get()
	if err != nil {
		return Operation{}, err
	}
	defer e.put(w)
	if _, _, ok := trans(w.h.toWGS84, C.PJ_FWD, x, y); !ok {
		return Operation{}, e.outside(x, y)
	}
	op := C.proj_trans_get_last_used_operation(w.h.toWGS84)
	if op == nil {
		return Operation{}, e.outside(x, y)
	}
	defer C.proj_destroy(op)
	return Operation{
		Name:     C.GoString(C.dg_info_description(op)),
		Accuracy: float64(C.proj_coordoperation_get_accuracy(w.h.ctx, op)),
		Ballpark: C.proj_coordoperation_has_ballpark_transformation(w.h.ctx, op) != 0,
	}, nil
}

// ProjVersion is the version of the PROJ library linked, "9.1.1".
func ProjVersion() string {
	return fmt.Sprintf("%d.%d.%d", C.PROJ_VERSION_MAJOR, C.PROJ_VERSION_MINOR, C.PROJ_VERSION_PATCH)
}
