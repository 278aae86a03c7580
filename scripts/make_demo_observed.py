#!/usr/bin/env python3
"""Writes demo-data/observed_flows.csv: INVENTED observed annual flows for two
gauged catchments of the invented demo basin (skelvane and wendlescar), 1997-2026,
for trying `yieldshift fit`. Deterministic (fixed seed). Demo data only: no real
gauge, no real record.

How the flows are made (so the fit has something known to find):
* The year's yield comes from the Zhang, Dawes & Walker (2001) curve, eq. 8,
  ET/P = (1 + w E0/P) / (1 + w E0/P + P/E0), capped at min(P, E0), mixed over
  the catchment's cover: ET = f ET_forest + (1 - f) ET_grass, with the demo
  scenario's w_forest = 2.0, forest PET = PET (forest_pet_factor 1.0) and the
  default canopy interception of a closed canopy (src/model/interception.rs:
  I = 0.25 P, ET_forest = I + f(P - I, E0 - 0.6 I)), and the starting canopy fraction f that yieldshift computes for the demo's
  current cover (fit.csv column canopy_fraction): skelvane 0.081787, wendlescar
  0.335639.
* The chosen ("true") grass w differs from the scenario's 0.5: skelvane 0.75,
  wendlescar 0.30.
* Invented storage carry-over: a quarter of each year's yield leaves in the next
  year (flow_t = 0.75 Q_t + 0.25 Q_t-1), then gauging noise: lognormal with a
  coefficient of variation of 6 %.
* Gaps: skelvane has no flow in 2003 and 2014 (gauge out of service; empty cells);
  wendlescar's gauge opened in 2001 and its 2019 flow is missing. Wendlescar's
  flows are given as volumes (flow_m3, over its 1800 ha) to show the conversion.
"""
import csv
import math
import random

random.seed(20261202)
CATCHMENTS = {  # id: (true w_grass, canopy fraction, area ha)
    "skelvane": (0.75, 0.081787, 2400.0),
    "wendlescar": (0.30, 0.335639, 1800.0),
}
W_FOREST = 2.0
FOREST_PET_FACTOR = 1.0
INTERCEPTION = 0.25
DEMAND_SHARE = 0.6
GAPS = {"skelvane": {2003, 2014}, "wendlescar": {2019}}
FIRST_YEAR = {"skelvane": 1997, "wendlescar": 2001}


def zhang_et(p, e0, w):
    """Zhang et al. (2001) eq. 8, ET capped at min(P, E0)."""
    phi = e0 / p
    ratio = (1 + w * phi) / (1 + w * phi + 1 / phi)
    return min(p * ratio, p, e0)


climate = {}
with open("demo-data/climate.csv") as f:
    for row in csv.DictReader(f):
        climate.setdefault(row["catchment"], []).append((int(row["year"]), float(row["rain_mm"]), float(row["pet_mm"])))

cv = 0.06
s = math.sqrt(math.log(1 + cv * cv))
with open("demo-data/observed_flows.csv", "w", newline="") as f:
    out = csv.writer(f, lineterminator="\n")
    out.writerow(["catchment", "year", "flow_mm", "flow_m3", "notes"])
    for cid, (w, frac, area) in CATCHMENTS.items():
        previous = None
        for year, rain, pet in climate[cid]:
            i = INTERCEPTION * rain
            et_forest = i + zhang_et(rain - i, max(FOREST_PET_FACTOR * pet - DEMAND_SHARE * i, 0.0), W_FOREST)
            et = frac * et_forest + (1 - frac) * zhang_et(rain, pet, w)
            q = rain - et
            carried = q if previous is None else 0.75 * q + 0.25 * previous
            previous = q
            flow = carried * math.exp(s * random.gauss(0, 1) - s * s / 2)
            if year < FIRST_YEAR[cid]:
                continue
            if year in GAPS[cid]:
                out.writerow([cid, year, "", "", "invented gap: gauge out of service"])
            elif cid == "wendlescar":
                out.writerow([cid, year, "", f"{flow * 10 * area:.0f}", ""])
            else:
                out.writerow([cid, year, f"{flow:.1f}", "", ""])
