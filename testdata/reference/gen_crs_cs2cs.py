#!/usr/bin/python3
"""Reference coordinates for internal/crs/reference_test.go, from PROJ's
command-line programs (Debian proj-bin): cs2cs for conversions between a
projected CRS, WGS 84 (EPSG:4326) and the CRS's own geodetic CRS, and
proj -V for the scale factors and meridian convergence.

Run with the Debian python3 after `apt-get install -y proj-bin proj-data`:

    /usr/bin/python3 testdata/reference/gen_crs_cs2cs.py

It writes testdata/reference/crs_cs2cs.json. CI reads the committed file and
never runs this script. PROJ_NETWORK is forced off, so the datum shifts are
those of the grids installed with Debian's proj-data (the same choice the
library makes through the C API with the network off).

The site points are chosen across each CRS's area of use (invented
positions, no real sites). cs2cs takes and gives coordinates in each CRS's
authority axis order (EPSG:4326 is latitude, longitude; EPSG:2193 is
northing, easting), read here from `projinfo -o PROJJSON`; the JSON holds
them as (x = easting, y = northing) and (lon, lat).
"""
import json
import os
import re
import subprocess
import sys

HERE = os.path.dirname(os.path.abspath(__file__))
ENV = dict(os.environ, PROJ_NETWORK="OFF")

# (code, site points (easting, northing in the CRS unit), WGS 84 (lon, lat))
SETS = [
    # WGS 84 / UTM zone 17N: across the 6-degree zone, equator to 84 N.
    ("EPSG:32617",
     [(500000, 4181000), (512000, 4181000), (166021.44, 100000), (250000, 2000000),
      (400000, 5000000), (620000, 3000000), (700000, 4000000), (750000, 6000000),
      (300000, 8500000), (833978.56, 9329005.18)],
     [(-81, 0.5), (-83.9, 12.25), (-78.1, 25.75), (-80.2, 37.8), (-81.7, 45.0),
      (-79.3, 60.1), (-82.5, 83.5)]),
    # NAD83 / Pennsylvania South (ftUS): Lambert Conic Conformal (2SP), US survey feet.
    ("EPSG:2272",
     [(1150000, 150000), (1400000, 400000), (1968500, 137000), (2000000, 300000),
      (2500000, 250000), (2700000, 450000), (2200000, 650000), (1600000, 600000)],
     [(-80.4, 39.8), (-77.75, 40.0), (-76.1, 40.5), (-75.0, 39.9), (-78.9, 41.1)]),
    # NAD83 / Arizona East (ft): Transverse Mercator, international feet.
    ("EPSG:2222",
     [(700000, 1000000), (650000, 500000), (900000, 1500000), (500000, 200000)],
     [(-110.2, 33.4), (-109.1, 31.5), (-111.2, 36.2)]),
    # OSGB36 / British National Grid: the national grid of the EPSG 7-2
    # Transverse Mercator example; its datum shift to WGS 84 without the
    # OSTN15 grid is PROJ's ballpark (no shift).
    ("EPSG:27700",
     [(577274.99, 69740.50), (400000, 300000), (300000, 900000), (200000, 100000),
      (600000, 1200000)],
     [(0.5, 50.5), (-3.2, 55.95), (-1.5, 53.4)]),
    # NZGD2000 / New Zealand Transverse Mercator 2000: northing-first axes
    # in the EPSG dataset, so it checks the easting/northing normalisation.
    ("EPSG:2193",
     [(1750000, 5900000), (1570000, 5180000), (1400000, 4900000), (2000000, 5700000)],
     [(174.7, -37.0), (172.6, -43.5), (168.3, -46.4)]),
]


def run(args, text):
    out = subprocess.run(args, input=text, capture_output=True, text=True, env=ENV, check=True)
    return out.stdout


def proj_json(code):
    return json.loads(run(["projinfo", "-o", "PROJJSON", "-q", code], ""))


def northing_first(crs_json):
    axes = crs_json["coordinate_system"]["axis"]
    return axes[0]["direction"] == "north"


def cs2cs(src, dst, pairs):
    """Runs cs2cs on pairs given in src's authority order; returns dst's."""
    text = "".join("%.10f %.10f\n" % p for p in pairs)
    lines = run(["cs2cs", "-f", "%.12f", src, dst], text).splitlines()
    result = []
    for line in lines:
        fields = line.split()
        result.append((float(fields[0]), float(fields[1])))
    if len(result) != len(pairs) or any(f != f or abs(f) == float("inf") for p in result for f in p):
        sys.exit("cs2cs %s -> %s failed: %r" % (src, dst, lines))
    return result


def to_auth(point, swap):
    return (point[1], point[0]) if swap else point


def proj_string_metres(code):
    """The CRS's PROJ string with its unit dropped, so that proj -V measures
    the projection in metres (x_0, y_0 of a PROJ string are metres)."""
    s = run(["projinfo", "-o", "PROJ", "-q", code], "").strip().splitlines()[-1]
    s = re.sub(r"\+(units|to_meter|towgs84|type)=\S+", "", s)
    return s.split() + ["+units=m"]


def proj_verbose(definition, lon, lat):
    out = run(["proj", "-V"] + definition, "%.12f %.12f\n" % (lon, lat))
    h = float(re.search(r"Meridian scale \(h\) : ([0-9.]+)", out).group(1))
    k = float(re.search(r"Parallel scale \(k\) : ([0-9.]+)", out).group(1))
    conv = float(re.search(r"Convergence : .*\[ *(-?[0-9.]+) *\]", out).group(1))
    return h, k, conv


def one_set(code, site, lonlat):
    crs = proj_json(code)
    swap = northing_first(crs)
    base = crs["base_crs"]["id"]
    base_code = "%s:%d" % (base["authority"], base["code"])
    # The geodetic CRSs here (EPSG:4326, 4269, 4277, 4167) are latitude
    # first, as cs2cs reads and writes them.
    auth_site = [to_auth(p, swap) for p in site]
    wgs = cs2cs(code, "EPSG:4326", auth_site)
    geo = cs2cs(code, base_code, auth_site)
    back = cs2cs("EPSG:4326", code, [(lat, lon) for lon, lat in lonlat])
    definition = proj_string_metres(code)
    entry = {"crs": code, "geodetic_crs": base_code, "to_wgs84": [], "to_geodetic": [],
             "from_wgs84": [], "scale": []}
    for (x, y), (lat, lon), (glat, glon) in zip(site, wgs, geo):
        entry["to_wgs84"].append({"x": x, "y": y, "lon": lon, "lat": lat})
        entry["to_geodetic"].append({"x": x, "y": y, "lon": glon, "lat": glat})
        h, k, conv = proj_verbose(definition, glon, glat)
        entry["scale"].append({"x": x, "y": y, "h": h, "k": k, "convergence_deg": conv})
    for (lon, lat), p in zip(lonlat, back):
        x, y = to_auth(p, swap)
        entry["from_wgs84"].append({"lon": lon, "lat": lat, "x": x, "y": y})
    return entry


def main():
    banner = subprocess.run(["cs2cs"], capture_output=True, text=True, env=ENV).stderr.splitlines()[0]
    doc = {"source": "PROJ cs2cs and proj -V (Debian proj-bin), " + banner.strip() +
           ", PROJ_NETWORK=OFF; generated by testdata/reference/gen_crs_cs2cs.py",
           "sets": [one_set(*s) for s in SETS]}
    path = os.path.join(HERE, "crs_cs2cs.json")
    with open(path, "w") as f:
        json.dump(doc, f, indent=1)
        f.write("\n")
    print("wrote", path)


if __name__ == "__main__":
    main()
