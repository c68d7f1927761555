"""Generate the invented field tests of the ``clay_liner`` sample (the liner as built).

The data are invented. The fictional landfill cell lined with the clay of the fictional
"Quillbrook Flats" borrow area (see ``make_clay_liner_series.py``) is built in four lifts;
each lift is tested for water content and density at stations along the cell's centre
line and at offsets across it. No test was ever taken: every number comes from the model
below, seeded, so that running the script twice writes byte-identical files.

Scenario
--------
* Four lifts, six tests a lift, on the days each lift was placed (June 2025, invented).
* The contractor aims at a water content about two and a half points wet of the standard effort's
  optimum and a dry density near 1.71 Mg/m3; each test scatters about that target.
* Most tests are by nuclear gauge (wet and dry density and water content read together,
  printed to 0.001 Mg/m3 and 0.1 %); one a lift is by sand cone and one by drive cylinder,
  which give the wet density, the dry density being worked out from the oven water content.
* Three tests are placed away from the target on purpose, as a site has them: a dry patch
  left uncovered over a hot afternoon (lift 2), a loose strip along the edge the roller
  did not reach (lift 3), and a wet spot over a soft area (lift 4). The dry patch is
  retested the next morning, after watering and rerolling, at the same place.

The script writes ``clay_liner/field_tests.csv`` (the table the field check reads) and
``clay_liner/field_tests_truth.json`` (the model's targets and which tests were placed off
target on purpose). It uses numpy and pandas only and does not import the package whose
check these data are meant to exercise.

Usage: ``python sample_data/make_clay_liner_field_tests.py [--output DIR]``.
"""

from __future__ import annotations

import argparse
import json
from pathlib import Path

import numpy as np
import pandas as pd

SEED = 6938
SERIES = "clay_liner"
TARGET_WATER_CONTENT = 0.1965  # [-], about 2.5 points wet of the standard optimum
TARGET_DRY_DENSITY = 1709.0  # [kg/m3]
SCATTER_WATER_CONTENT = 0.0018  # [-]
SCATTER_DRY_DENSITY = 3.0  # [kg/m3]
LIFT_DATES = ("2025-06-02", "2025-06-05", "2025-06-09", "2025-06-12")
STATIONS = (15.0, 40.0, 65.0, 90.0, 115.0, 140.0)  # [m] along the cell's centre line
OFFSETS = (-12.0, 8.0, -4.0, 12.0, -8.0, 4.0)  # [m] across it

# (lift index, test index within the lift, water content, dry density, why)
OFF_TARGET = (
    (1, 2, 0.158, 1712.0, "dry patch left uncovered over a hot afternoon"),
    (2, 5, 0.188, 1655.0, "loose strip along the edge, not reached by the roller"),
    (3, 1, 0.232, 1640.0, "wet spot over a soft area"),
)
RETEST = (1, 2, 0.197, 1710.0, "after watering and rerolling the dry patch")


def _method(test_index: int) -> str:
    return {1: "sand cone", 4: "drive cylinder"}.get(test_index, "nuclear gauge")


def field_tests(rng: np.random.Generator) -> tuple[pd.DataFrame, dict]:
    rows = []
    off = {(lift, i): (w, rho, why) for lift, i, w, rho, why in OFF_TARGET}
    placed = []
    for lift, day in enumerate(LIFT_DATES):
        for i, (station, offset) in enumerate(zip(STATIONS, OFFSETS, strict=True)):
            w = TARGET_WATER_CONTENT + SCATTER_WATER_CONTENT * rng.standard_normal()
            rho = TARGET_DRY_DENSITY + SCATTER_DRY_DENSITY * rng.standard_normal()
            if (lift, i) in off:
                w, rho, why = off[(lift, i)]
                placed.append({"test": f"L{lift + 1}-{i + 1:02d}", "why": why})
            station_here = station + float(rng.uniform(-3.0, 3.0))
            offset_here = offset + float(rng.uniform(-1.0, 1.0))
            time = f"{day} {9 + i:02d}:{int(rng.integers(0, 60)):02d}"
            rows.append(
                (f"L{lift + 1}-{i + 1:02d}", time, lift + 1, station_here, offset_here, w, rho, i)
            )
        if lift == RETEST[0]:
            w, rho = RETEST[2], RETEST[3]
            _, _, _, station_here, offset_here, *_ = rows[-6 + RETEST[1]]
            next_day = pd.Timestamp(day) + pd.Timedelta(days=1)
            rows.append(
                (
                    f"L{lift + 1}-{RETEST[1] + 1:02d}R",
                    f"{next_day:%Y-%m-%d} 08:40",
                    lift + 1,
                    station_here + 0.4,
                    offset_here - 0.3,
                    w,
                    rho,
                    0,
                )
            )
    table = []
    for test, time, lift, station, offset, w, rho, i in rows:
        method = _method(i)
        wet = rho * (1.0 + w)
        table.append(
            {
                "test": test,
                "date": time,
                "lift": lift,
                "station [m]": round(station, 1),
                "offset [m]": round(offset, 1),
                "water_content [%]": round(100 * w, 1),
                "dry_density [Mg/m^3]": round(rho / 1000, 3) if method == "nuclear gauge" else "",
                "wet_density [Mg/m^3]": round(wet / 1000, 3),
                "method": method,
                "notes": "retest after watering and rerolling" if test.endswith("R") else "",
            }
        )
    truth = {
        "series": SERIES,
        "seed": SEED,
        "target_water_content": TARGET_WATER_CONTENT,
        "target_dry_density_kg_m3": TARGET_DRY_DENSITY,
        "placed_off_target": placed,
        "retest": {"test": f"L{RETEST[0] + 1}-{RETEST[1] + 1:02d}R", "why": RETEST[4]},
        "replaces": f"L{RETEST[0] + 1}-{RETEST[1] + 1:02d}",
    }
    return pd.DataFrame(table), truth


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--output", type=Path, default=Path(__file__).resolve().parent)
    folder = parser.parse_args().output / SERIES
    folder.mkdir(parents=True, exist_ok=True)
    table, truth = field_tests(np.random.default_rng(SEED))
    table.to_csv(folder / "field_tests.csv", index=False, lineterminator="\n")
    (folder / "field_tests_truth.json").write_text(json.dumps(truth, indent=2) + "\n")


if __name__ == "__main__":
    main()
