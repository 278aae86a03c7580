"""Writes demo-data/climate.csv: an INVENTED 30-year annual climate record for the
demo basin (lognormal rainfall with lag-1 persistence, PET anti-correlated with
rainfall). Deterministic (fixed seed). Demo data only: not a real record."""
import csv, math, random

random.seed(20270101)
catchments = {  # id: (mean rain mm, mean PET mm)
    "skelvane": (1650, 800), "fennigrue": (1100, 860), "tamsquil": (1400, 830),
    "corvisk": (950, 880), "wendlescar": (2100, 760), "quessendale-lower": (900, 900),
}
years = range(1997, 2027)
basin = []
z = 0.0
for _ in years:  # one basin-wide anomaly series, shared by all catchments
    z = 0.3 * z + math.sqrt(1 - 0.09) * random.gauss(0, 1)
    basin.append(z)
with open("demo-data/climate.csv", "w", newline="") as f:
    w = csv.writer(f)
    w.writerow(["catchment", "year", "rain_mm", "pet_mm"])
    for cid, (p, e) in catchments.items():
        for y, zb in zip(years, basin):
            zl = 0.8 * zb + 0.6 * random.gauss(0, 1)
            cv = 0.18
            s = math.sqrt(math.log(1 + cv * cv))
            rain = p * math.exp(s * zl - s * s / 2)
            pet = e * (1 - 0.04 * zl + 0.02 * random.gauss(0, 1))
            w.writerow([cid, y, f"{rain:.0f}", f"{pet:.0f}"])
