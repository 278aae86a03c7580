#!/usr/bin/env python3
"""Regenerate demo-data/catchments.geojson: INVENTED boundaries of the six demo
catchments of the invented Quessendale basin (ids and areas in demo-data/catchments.csv).

Nothing here is a real boundary. The basin is drawn in a local kilometre grid
(x east, y north) from a handful of hand-placed junction points; every edge is
roughened by deterministic midpoint displacement so it looks like a ridge line.
An edge shared by two catchments is generated once, so neighbours meet exactly
(no gaps, no overlaps). The grid is then placed over open ocean, around
44.3 degrees S 100.0 degrees E in the southern Indian Ocean, where there is no
land: a mid-latitude southern site (the demo's climate comes from its own
invented table, not from the place), chosen so that no coordinate of the demo
falls in any real, named region. Checked with the GLOBE 1-km land mask (the
`global-land-mask` Python package, not needed to run this script): the nearest
land is about 1,700 km away (the south-west corner of Australia, near 34.4 S
115.1 E), and no island lies closer.

Features:
* fennigrue has a hole: an invented tarn excluded from the catchment area;
* wendlescar is a MultiPolygon: a main block and a detached headwater block.

Plain Python 3, no packages. Deterministic: the same file on every run.
Checks each catchment's ellipsoidal area against the table's area_ha and fails
(exit 1) when any differs by more than 2% (the scenario's tolerance is 5%;
tests/gis.rs checks again with the geo crate's geodesic area).

Area here: the WGS84 ellipsoid mapped by the Lambert cylindrical equal-area
projection, y = a q(phi) / 2 with q the authalic function of Snyder (1987, Map
Projections - A Working Manual, USGS Professional Paper 1395; formula from
memory, checked by the tests), then the planar shoelace formula. Edges are
straight in that projection rather than geodesics; at edge lengths of a few
hundred metres the difference is far below 0.01%. tests/gis.rs confirms every
area with the geo crate's geodesic area (agreement here: better than 0.01%).

    python3 scripts/make_demo_boundaries.py
"""

import csv
import json
import math
import os
import random
import sys

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.normpath(os.path.join(HERE, ".."))
TABLE = os.path.join(ROOT, "demo-data", "catchments.csv")
OUT = os.path.join(ROOT, "demo-data", "catchments.geojson")

# WGS84 (NIMA TR8350.2): semi-major axis and flattening.
A_M = 6378137.0
F = 1 / 298.257223563
E2 = F * (2 - F)
E = math.sqrt(E2)

# Where the invented grid is placed (its origin), degrees.
LON0 = 99.93
LAT0 = -44.36

# Junction points of the invented basin, km from the origin (hand-placed, then
# nudged, by at most 0.12 km, so that each catchment's area matches the demo
# table with the edge roughening of the "demo-edge-" seeds).
NODES = {
    "A": (0.11, 1.59), "B": (5.49, 0.57), "C": (12.16, 1.06), "D": (12.58, 2.86),
    "E": (7.84, 2.43), "F": (3.32, 3.05), "G": (-0.18, 3.50), "H": (-0.52, 6.91),
    "I": (0.57, 10.14), "J": (3.20, 10.19), "K": (7.18, 9.77), "L": (12.04, 9.41),
    "M": (13.22, 6.18), "N": (8.19, 12.95), "O": (5.49, 13.61), "P": (2.82, 12.80),
    "Q": (6.93, 6.22), "R": (3.33, 6.61),
    # wendlescar: main block west of skelvane, and a detached block to its north
    "S": (-4.18, 3.27), "T": (-2.21, 7.31), "U": (-3.75, 7.13),
    "V": (-5.49, 9.38), "W": (-2.62, 9.57), "X": (-3.04, 11.54), "Y": (-5.04, 11.44),
}

# Exterior rings, counter-clockwise (RFC 7946 right-hand rule), as node lists.
CATCHMENTS = [
    ("skelvane", [["G", "F", "R", "J", "I", "H"]]),
    ("fennigrue", [["E", "D", "M", "L", "K", "Q"]]),
    ("tamsquil", [["J", "K", "N", "O", "P"]]),
    ("corvisk", [["F", "E", "Q", "K", "J", "R"]]),
    ("wendlescar", [["S", "G", "H", "T", "U"], ["V", "W", "X", "Y"]]),
    ("quessendale-lower", [["A", "B", "C", "D", "E", "F", "G"]]),
]

# The invented tarn cut out of fennigrue: centre, semi-axes (km), rotation.
TARN = ((10.4, 6.0), 0.95, 0.55, 0.5)


def rough_edge(a, b, levels=4, amplitude=0.10):
    """Points strictly between nodes a and b: recursive midpoint displacement
    perpendicular to each piece, seeded by the (unordered) node pair so the
    edge is the same, reversed, for both neighbours."""
    key = "-".join(sorted((a, b)))
    rng = random.Random("demo-edge-" + key)
    p, q = (NODES[a], NODES[b]) if a < b else (NODES[b], NODES[a])
    pts = [p, q]
    amp = amplitude
    for _ in range(levels):
        nxt = [pts[0]]
        for u, v in zip(pts, pts[1:]):
            dx, dy = v[0] - u[0], v[1] - u[1]
            d = rng.uniform(-amp, amp)
            mid = ((u[0] + v[0]) / 2 - dy * d, (u[1] + v[1]) / 2 + dx * d)
            nxt += [mid, v]
        pts = nxt
        amp *= 0.55
    inner = pts[1:-1]
    return inner if a < b else inner[::-1]


def ring_km(names):
    pts = []
    for a, b in zip(names, names[1:] + names[:1]):
        pts.append(NODES[a])
        pts.extend(rough_edge(a, b))
    return pts


def tarn_km():
    (cx, cy), ax, ay, rot = TARN
    rng = random.Random("demo-tarn")
    pts = []
    n = 28
    for k in range(n):
        t = -2 * math.pi * k / n  # clockwise: holes wind clockwise
        r = 1 + rng.uniform(-0.06, 0.06)
        x, y = ax * r * math.cos(t), ay * r * math.sin(t)
        pts.append((cx + x * math.cos(rot) - y * math.sin(rot), cy + x * math.sin(rot) + y * math.cos(rot)))
    return pts


def to_lonlat(x_km, y_km):
    """Local km grid to longitude/latitude with the ellipsoid's radii of
    curvature at the origin (meridian M, prime vertical N)."""
    phi = math.radians(LAT0)
    w = 1 - E2 * math.sin(phi) ** 2
    m = A_M * (1 - E2) / w ** 1.5
    n = A_M / math.sqrt(w)
    lat = LAT0 + math.degrees(y_km * 1000 / m)
    lon = LON0 + math.degrees(x_km * 1000 / (n * math.cos(phi)))
    return (round(lon, 6), round(lat, 6))


def authalic_q(phi):
    s = math.sin(phi)
    return (1 - E2) * (s / (1 - E2 * s * s) - (1 / (2 * E)) * math.log((1 - E * s) / (1 + E * s)))


def ring_area_m2(ring):
    """Unsigned area of a closed lon/lat ring on the WGS84 ellipsoid."""
    xy = [(A_M * math.radians(lon), A_M * authalic_q(math.radians(lat)) / 2) for lon, lat in ring]
    s = 0.0
    for (x1, y1), (x2, y2) in zip(xy, xy[1:]):
        s += x1 * y2 - x2 * y1
    return abs(s) / 2


def closed(ring):
    return ring + [ring[0]]


def main():
    with open(TABLE, newline="") as f:
        table = {r["id"]: r for r in csv.DictReader(f)}
    features = []
    worst = 0.0
    for cid, parts in CATCHMENTS:
        polygons = []
        for p, names in enumerate(parts):
            rings = [closed([to_lonlat(x, y) for x, y in ring_km(names)])]
            if cid == "fennigrue" and p == 0:
                rings.append(closed([to_lonlat(x, y) for x, y in tarn_km()]))
            polygons.append(rings)
        area_ha = sum(ring_area_m2(r[0]) - sum(ring_area_m2(h) for h in r[1:]) for r in polygons) / 1e4
        want = float(table[cid]["area_ha"])
        diff = area_ha / want - 1
        worst = max(worst, abs(diff))
        print(f"{cid:18s} {area_ha:8.1f} ha  table {want:7.1f} ha  {100 * diff:+5.2f}%", file=sys.stderr)
        if len(polygons) == 1:
            geometry = {"type": "Polygon", "coordinates": polygons[0]}
        else:
            geometry = {"type": "MultiPolygon", "coordinates": polygons}
        features.append({
            "type": "Feature",
            "properties": {"id": cid, "name": table[cid]["name"]},
            "geometry": geometry,
        })
    fc = {
        "type": "FeatureCollection",
        "description": "INVENTED boundaries of the invented Quessendale demo basin "
        "(scripts/make_demo_boundaries.py); not a real place.",
        "features": features,
    }
    with open(OUT, "w") as f:
        # One feature per line: readable diffs, small file.
        f.write('{"type": "FeatureCollection",\n"description": ' + json.dumps(fc["description"]) + ',\n"features": [\n')
        f.write(",\n".join(json.dumps(ft, separators=(",", ":")) for ft in features))
        f.write("\n]}\n")
    print(f"wrote {os.path.relpath(OUT, ROOT)}; largest area difference {100 * worst:.2f}%", file=sys.stderr)
    if worst > 0.02:
        sys.exit("an area differs from the table by more than 2%: adjust NODES")


if __name__ == "__main__":
    main()
