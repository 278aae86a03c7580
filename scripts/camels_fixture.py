#!/usr/bin/env python3
"""Copies the CAMELS-US attributes the mean-annual fit is tested on into
tests/data/camels-us/ (run from the repository root; needs only Python 3).

Source: the CAMELS attributes v2.0 (Addor et al. 2017; Newman et al. 2015),
read from ../shared/data/camels-us/ (camels_clim.txt, camels_hydro.txt,
camels_vege.txt, camels_name.txt; ';'-separated, keyed by gauge_id).

Writes two files, one row per catchment, in the order of camels_clim.txt:
* camels_attributes.csv -- the CAMELS values as published, cell text copied
  unchanged (mm/day for p_mean, pet_mean, q_mean; 'NA' kept): gauge_id (text,
  leading zeros kept), p_mean, pet_mean, q_mean, frac_forest, frac_snow, aridity.
* camels_mean_annual.csv -- the same catchments as a `yieldshift fit
  --mean-annual` table: rain_mm, pet_mm, flow_mm = the mm/day values x 365.25
  (mm/yr, written with Python's shortest round-trip float repr, so a reader gets
  exactly the float64 product), forest_fraction = frac_forest, snow_fraction =
  frac_snow, name = gauge_name. A CAMELS 'NA' becomes an empty cell (the fit
  then leaves the catchment out as missing_value).
"""
import csv
import os

SRC = os.path.join("..", "shared", "data", "camels-us")
DST = os.path.join("tests", "data", "camels-us")
DAYS_PER_YEAR = 365.25


def table(name):
    with open(os.path.join(SRC, name), newline="", encoding="utf-8") as f:
        rows = list(csv.DictReader(f, delimiter=";"))
    return [r["gauge_id"] for r in rows], {r["gauge_id"]: r for r in rows}


order, clim = table("camels_clim.txt")
_, hydro = table("camels_hydro.txt")
_, vege = table("camels_vege.txt")
_, names = table("camels_name.txt")

os.makedirs(DST, exist_ok=True)
with open(os.path.join(DST, "camels_attributes.csv"), "w", newline="", encoding="utf-8") as f:
    w = csv.writer(f, delimiter=";", lineterminator="\n")
    w.writerow(["gauge_id", "p_mean", "pet_mean", "q_mean", "frac_forest", "frac_snow", "aridity"])
    for g in order:
        c, h, v = clim[g], hydro[g], vege[g]
        w.writerow([g, c["p_mean"], c["pet_mean"], h["q_mean"], v["frac_forest"], c["frac_snow"], c["aridity"]])


def per_year(cell):
    return "" if cell.strip() == "NA" else repr(float(cell) * DAYS_PER_YEAR)


def plain(cell):
    return "" if cell.strip() == "NA" else repr(float(cell))


with open(os.path.join(DST, "camels_mean_annual.csv"), "w", newline="", encoding="utf-8") as f:
    w = csv.writer(f, lineterminator="\n")
    w.writerow(["catchment", "name", "rain_mm", "pet_mm", "flow_mm", "forest_fraction", "snow_fraction"])
    for g in order:
        c, h, v = clim[g], hydro[g], vege[g]
        w.writerow([g, names[g]["gauge_name"].strip(), per_year(c["p_mean"]), per_year(c["pet_mean"]),
                    per_year(h["q_mean"]), plain(v["frac_forest"]), plain(c["frac_snow"])])
print("wrote", DST)
