#!/usr/bin/env python3
"""Checks that the invented demo basin (demo-data/catchments.geojson) lies in no
real place: every vertex is over the ocean, and the nearest land is hundreds of
kilometres away.

Land and ocean come from the GLOBE 1-km land mask shipped in the
`global-land-mask` package (PyPI; it needs numpy). Not needed to build, test or
run yieldshift; run it after moving the demo:

    python3 -m venv /tmp/land-venv
    /tmp/land-venv/bin/pip install global-land-mask numpy
    /tmp/land-venv/bin/python scripts/check_demo_location.py

Exits 1 when a vertex is on land or land is closer than MIN_KM. Distances are
great-circle distances on a sphere of radius 6371 km (ample for a
hundreds-of-kilometres margin) to the nearest land cell of the mask, searched on
every second cell (about 2 km) within +-30 degrees of latitude and +-45 degrees
of longitude of the basin's centre. Last result (2026-12-03): every vertex over
the ocean; nearest land about 1,700 km away, near 34.4 S 115.1 E (the south-west
corner of Australia).
"""

import json
import math
import os
import sys

import numpy as np
from global_land_mask import globe

HERE = os.path.dirname(os.path.abspath(__file__))
GEOJSON = os.path.join(HERE, "..", "demo-data", "catchments.geojson")
MIN_KM = 500.0


def vertices(geometry):
    polys = [geometry["coordinates"]] if geometry["type"] == "Polygon" else geometry["coordinates"]
    for poly in polys:
        for ring in poly:
            yield from ring


def main():
    with open(GEOJSON) as f:
        fc = json.load(f)
    pts = [p for ft in fc["features"] for p in vertices(ft["geometry"])]
    lons = np.array([p[0] for p in pts])
    lats = np.array([p[1] for p in pts])
    on_land = globe.is_land(lats, lons)
    lat0, lon0 = float(lats.mean()), float(lons.mean())
    # The mask: _mask is True over the ocean; _lat and _lon its cell centres.
    la, lo, ocean = globe._lat, globe._lon, globe._mask
    ilat = np.where((la > lat0 - 30) & (la < lat0 + 30))[0]
    ilon = np.where((lo > lon0 - 45) & (lo < lon0 + 45))[0]
    sub = ocean[ilat[0] : ilat[-1] + 1 : 2, ilon[0] : ilon[-1] + 1 : 2]
    sla, slo = la[ilat[0] : ilat[-1] + 1 : 2], lo[ilon[0] : ilon[-1] + 1 : 2]
    r, c = np.nonzero(~sub)
    p1, l1 = math.radians(lat0), math.radians(lon0)
    p2, l2 = np.radians(sla[r]), np.radians(slo[c])
    d = 2 * 6371.0 * np.arcsin(np.sqrt(np.sin((p2 - p1) / 2) ** 2 + math.cos(p1) * np.cos(p2) * np.sin((l2 - l1) / 2) ** 2))
    k = int(np.argmin(d)) if len(d) else None
    print(f"{len(pts)} vertices around {lat0:.2f}, {lon0:.2f}; on land: {int(on_land.sum())}")
    if k is None:
        print("no land within the search window")
    else:
        print(f"nearest land {d[k]:.0f} km away, at {sla[r[k]]:.2f}, {slo[c[k]]:.2f}")
    if on_land.any() or (k is not None and d[k] < MIN_KM):
        sys.exit(f"the demo touches land or lies within {MIN_KM:.0f} km of it")


if __name__ == "__main__":
    main()
