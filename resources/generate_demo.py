"""Regenerate the demo day (an invented scenario; every name and place is made up).

Brindlemoor Building Supply, a builders' merchant in the invented county of
Ostrelshire, delivers from its yard at Tilby Cross to sites in nine towns.
Run:  python resources/generate_demo.py   (writes the three CSV files to shipgui/resources/demo)
"""

from __future__ import annotations

import csv
import math
import random
from pathlib import Path

HERE = Path(__file__).resolve().parents[1] / "shipgui" / "resources" / "demo"
TOWNS = {  # invented towns with planar coordinates in km
    "Tilby Cross": (0, 0), "Ostrel": (14, 6), "Wenhaven": (-11, 9), "Carrow Fen": (6, -15),
    "Merrowdale": (-18, -8), "Hobb's Ridge": (22, -10), "Ashcombe Lea": (-4, 21),
    "Quillham": (27, 14), "Sallowby": (-25, 16),
}
STREETS = ["Mill Lane", "Chapel Row", "Kiln Street", "Orchard Way", "Ferry Road",
           "Tanner's Walk", "Beacon Hill", "Weir Close", "Hayward Street", "Lark Rise"]
SITE_KINDS = ["new-build plot", "school extension", "retail unit", "barn conversion",
              "housing phase", "health centre", "depot refit", "bridge repair"]
CUSTOMERS = ["Pellow & Strand Builders", "Ostrel Homes Co-op", "Greywater Civils",
             "Marram Joinery", "Fenlight Renovations", "Quillham Parish Council",
             "Hartsell Groundworks", "Wenhaven Housing Trust", "Copperbeck Roofing",
             "Sallowby Farm Estates", "Tilby Self-Build Club", "Ridgeway Masonry"]
GOODS = ["pallets of block", "bagged cement", "timber lengths", "roof tiles", "drainage pipe",
         "plasterboard", "ready-mix skip", "sand and ballast", "steel mesh", "insulation rolls"]


def sites(rng: random.Random) -> list[dict]:
    rows = [{"site": "YARD", "name": "Brindlemoor yard", "address": "1 Wharf Road, Tilby Cross",
             "x_km": "0.0", "y_km": "0.0"}]
    for k in range(1, 30):
        town = list(TOWNS)[k % len(TOWNS)]
        tx, ty = TOWNS[town]
        rows.append({"site": f"S{k:02d}",
                     "name": f"{town} {rng.choice(SITE_KINDS)}",
                     "address": f"{rng.randint(2, 140)} {rng.choice(STREETS)}, {town}",
                     "x_km": f"{tx + rng.uniform(-3, 3):.1f}",
                     "y_km": f"{ty + rng.uniform(-3, 3):.1f}"})
    return rows


def minutes(a: dict, b: dict) -> int:
    km = math.dist((float(a["x_km"]), float(a["y_km"])), (float(b["x_km"]), float(b["y_km"])))
    return math.ceil(km * 1.2 / 50 * 60)  # same defaults as the app: circuity 1.2, 50 km/h


def clock(m: int) -> str:
    return f"{m // 60:02d}:{m % 60:02d}"


def jobs(rng: random.Random, site_rows: list[dict]) -> list[dict]:
    rows = []
    by_id = {s["site"]: s for s in site_rows}
    yard = by_id["YARD"]
    for k in range(1, 151):
        kind = rng.random()
        if kind < 0.55:  # load at the yard, deliver to a site
            origin, dest = "YARD", rng.choice(site_rows[1:])["site"]
        elif kind < 0.85:  # cross-town transfer between two sites
            origin, dest = (s["site"] for s in rng.sample(site_rows[1:], 2))
        else:  # collection back to the yard
            origin, dest = rng.choice(site_rows[1:])["site"], "YARD"
        drive = minutes(by_id[origin], by_id[dest])
        earliest = 6 * 60 + minutes(yard, by_id[origin])
        start = rng.randrange(earliest, 19 * 60, 15) if k > 6 else rng.randrange(21 * 60, 23 * 60, 15)
        length = drive + rng.choice([20, 30, 45, 60, 90])
        end = start + length
        if end + minutes(by_id[dest], yard) > 26 * 60:
            end = start + drive + 20
        rows.append({"job": f"J{k:03d}", "origin": origin, "destination": dest,
                     "start": clock(start), "end": clock(end),
                     "customer": rng.choice(CUSTOMERS),
                     "reference": f"BB-{rng.randint(10000, 99999)}",
                     "notes": f"{rng.randint(2, 24)} {rng.choice(GOODS)}"})
    rows.sort(key=lambda r: (r["start"].zfill(5), r["job"]))
    return rows


def write(name: str, rows: list[dict]) -> None:
    with open(HERE / name, "w", newline="", encoding="utf-8") as f:
        w = csv.DictWriter(f, fieldnames=list(rows[0]))
        w.writeheader()
        w.writerows(rows)


def main() -> None:
    rng = random.Random(20261202)
    site_rows = sites(rng)
    write("sites.csv", site_rows)
    write("jobs.csv", jobs(rng, site_rows))
    # A few measured drive times that override the estimates (e.g. the ring road).
    by_id = {s["site"]: s for s in site_rows}
    pairs = [("YARD", "S05"), ("S05", "YARD"), ("S10", "S19"), ("S19", "S10"), ("YARD", "S13")]
    write("travel.csv", [{"from": a, "to": b, "minutes": str(max(1, minutes(by_id[a], by_id[b]) - 4))}
                         for a, b in pairs])


if __name__ == "__main__":
    main()
