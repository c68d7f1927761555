"""Generate the invented flexible-wall sample series (compacted clay in a flexible-wall cell).

The data are invented. "Quillbrook Flats" is a fictional borrow area for the clay liner of a
fictional landfill cell; no specimen was ever compacted, saturated or permeated. Every number
below comes from the model in this script, seeded, so that running it twice writes
byte-identical files.

Scenario
--------
``flexible_wall_clay/``: three specimens of the lean clay, compacted at standard effort a little
wet of optimum, trimmed to 100 mm diameter, set in a flexible-wall cell, saturated by back
pressure (B-value checks at each increment of back pressure), consolidated to an effective
stress of 35 kPa, then permeated upward by falling head with rising tailwater: two burettes of
8 mm bore, their levels read by hand and written with the date and time of day (Central
European Time, stated in the header). One specimen (FW-02) is a stiffer, drier clay whose
B-value stops at 0.93 and stays there as the back pressure rises; one (FW-03) swelled a little
during the test. The project table carries the liner criterion and the effective stress the
(fictional) specification asks for.

``transducer_log/``: one more specimen (FW-04) in the same cell, its head across the specimen
read by a differential pressure transducer every minute for a day and logged with the date and
time of day in UTC and the water temperature.

Model
-----
* Consolidation: the specimen shortens by dL and expels dV; during permeation its height is
  L0 - dL and its area (V0 - dV)/(L0 - dL) (the volume over the height).
* Falling head, rising tailwater, equal burettes of area a: dh/dt = -k_T * A * h * (2/a) / L,
  k_T = k20 * mu_20/mu_T (Kestin, Sokolov & Wakeham 1978 for the ratio); integrated between
  readings with the temperature drifting smoothly. The headwater burette falls and the tailwater
  burette rises by the same volume, with a seeded reading error; the outflow is slightly less
  than the inflow (a seeded ratio r near 0.98), so the head falls as
  dh/dt = -k_T * A * h * (1 + r)/(a * L); the levels are read to 0.1 mm.
* Transducer: the head is turned into a pressure with the water density at the reading's
  temperature, p = rho_w(T) * g * h (Tanaka et al. 2001, Metrologia 38:301, for rho_w;
  g = 9.80665 m/s^2), and read with a seeded noise of 0.015 kPa.
* B-value checks: each increment of cell pressure of 50 kPa, drainage closed, raises the pore
  pressure by B * 50 kPa (Skempton 1954, Geotechnique 4(4):143).

Each series gets ``truth.json`` with the true k20 and the consolidated dimensions. The script
uses numpy only (and the standard library) and does not import the package whose reductions
these data are meant to check.

Usage: ``python sample_data/make_flexible_wall_series.py [--output DIR]``.
"""

from __future__ import annotations

import argparse
import datetime as dt
import json
import math
from pathlib import Path

import numpy as np

SEED = 17892
GRAVITY = 9.80665  # m/s2, standard gravity
SPECIFIC_GRAVITY = 2.71
WATER_DENSITY_PHASE = 1000.0  # kg/m3
BURETTE_BORE = 8.0  # mm, both burettes
CELL_PRESSURE = 550.0  # kPa during permeation
BACK_PRESSURE = 515.0  # kPa at the outflow end during permeation
CET = dt.timezone(dt.timedelta(hours=1))

# specimen: k20 [m/s], diameter and height as trimmed [mm], dry density [kg/m3], molding
# water content [-], shortening and volume expelled in consolidation [mm, cm3],
# B-values at back pressures 200..500 kPa, final volume change [-], start of permeation
SPECIMENS = {
    "FW-01": dict(
        k20=5.2e-10,
        diameter=100.2,
        height=115.8,
        dry_density=1712.0,
        water=0.187,
        shortening=1.1,
        expelled=18.5,
        b_values=(0.71, 0.88, 0.94, 0.97),
        final_change=-0.004,
        start=dt.datetime(2026, 3, 2, 9, 0, tzinfo=CET),
        deviations="",
    ),
    "FW-02": dict(
        k20=3.4e-10,
        diameter=100.1,
        height=116.0,
        dry_density=1768.0,
        water=0.162,
        shortening=0.6,
        expelled=9.2,
        b_values=(0.64, 0.85, 0.93, 0.93),
        final_change=-0.006,
        start=dt.datetime(2026, 3, 2, 9, 30, tzinfo=CET),
        deviations="B-value 0.93 at 400 and 500 kPa back pressure: held as for a stiff soil",
    ),
    "FW-03": dict(
        k20=7.5e-10,
        diameter=100.3,
        height=115.6,
        dry_density=1684.0,
        water=0.201,
        shortening=1.5,
        expelled=24.1,
        b_values=(0.78, 0.91, 0.96, 0.98),
        final_change=0.021,
        start=dt.datetime(2026, 3, 3, 10, 0, tzinfo=CET),
        deviations="cell pressure fell 8 kPa overnight on the second day; restored at 08:10",
    ),
}
TRANSDUCER = dict(
    specimen="FW-04",
    k20=3.1e-10,
    diameter=100.0,
    height=116.1,
    dry_density=1735.0,
    water=0.178,
    shortening=0.9,
    expelled=15.0,
    b_values=(0.74, 0.90, 0.96, 0.98),
    final_change=-0.003,
    start=dt.datetime(2026, 3, 9, 7, 45, tzinfo=dt.UTC),
    deviations="",
)
BACK_PRESSURES = (200.0, 300.0, 400.0, 500.0)  # kPa at each B-value check


def viscosity_ratio(temperature):
    """mu_T / mu_20 of water: Kestin, Sokolov & Wakeham (1978), J. Phys. Chem. Ref. Data
    7(3):941, log10(mu_T/mu_20) = (20 - T)/(T + 96)*[1.2364 - 1.37e-3 (20 - T) + 5.7e-6
    (20 - T)^2], T in degC (coefficients from memory)."""
    d = 20.0 - np.asarray(temperature, dtype=float)
    return 10.0 ** (d / (np.asarray(temperature) + 96.0) * (1.2364 - 1.37e-3 * d + 5.7e-6 * d * d))


def water_density(temperature):
    """rho_w(T) [kg/m3]: Tanaka et al. (2001), Metrologia 38:301, eq. (1) with its
    coefficients for air-free water (from memory)."""
    t = np.asarray(temperature, dtype=float)
    a1, a2, a3, a4, a5 = -3.983035, 301.797, 522528.9, 69.34881, 999.974950
    return a5 * (1.0 - (t + a1) ** 2 * (t + a2) / (a3 * (t + a4)))


def consolidated(p):
    """Height [m] and area [m2] after consolidation: L0 - dL, (V0 - dV)/(L0 - dL)."""
    height0, diameter0 = p["height"] / 1e3, p["diameter"] / 1e3
    volume0 = math.pi * diameter0**2 / 4 * height0
    height = height0 - p["shortening"] / 1e3
    area = (volume0 - p["expelled"] * 1e-6) / height
    return height, area


def heads(p, times, temperature, head0, ratio=1.0):
    """Head across the specimen at each time [s], rising tailwater with equal burettes of
    area a; the tailwater burette takes `ratio` times the inflow, so the head falls at
    dh/dt = -k_T * A * h * (1 + ratio) / (a * L)."""
    height, area = consolidated(p)
    burette = math.pi * (BURETTE_BORE / 1e3) ** 2 / 4
    k_t = p["k20"] / viscosity_ratio(temperature)
    rate = k_t * area * ((1.0 + ratio) / burette) / height
    mid_rate = (rate[1:] + rate[:-1]) / 2
    exponent = np.r_[0.0, np.cumsum(mid_rate * np.diff(times))]
    return head0 * np.exp(-exponent)


def specimen_row(name, p, rng):
    height0, diameter0 = p["height"], p["diameter"]
    volume0 = math.pi * (diameter0 / 1e3) ** 2 / 4 * (height0 / 1e3)
    dry_mass = p["dry_density"] * volume0 * 1e3  # g
    change = p["final_change"]
    final_height = height0 * (1 + change) ** (1 / 3)
    final_diameter = diameter0 * (1 + change) ** (1 / 3)
    final_volume = volume0 * (1 + change)
    voids = final_volume - dry_mass / 1e3 / (SPECIFIC_GRAVITY * WATER_DENSITY_PHASE)
    final_water = 0.995 * voids * WATER_DENSITY_PHASE / (dry_mass / 1e3)  # nearly saturated
    final_mass = dry_mass * (1 + final_water)
    saturation = (
        p["water"]
        * SPECIFIC_GRAVITY
        / (SPECIFIC_GRAVITY * WATER_DENSITY_PHASE / p["dry_density"] - 1)
    )
    if not 0.7 <= saturation <= 1.0:
        raise SystemExit(f"{name}: molding saturation {saturation:.2f} leaves the scenario")
    return [
        name,
        "standard",
        f"{p['water'] * 100:.1f}",
        f"{diameter0:.1f}",
        f"{height0:.1f}",
        f"{dry_mass:.1f}",
        f"{SPECIFIC_GRAVITY:.2f}",
        f"{BURETTE_BORE:.1f}",
        f"{BURETTE_BORE:.1f}",
        f"{final_height:.1f}",
        f"{final_diameter:.1f}",
        f"{final_mass:.1f}",
        f"{final_water * 100 + rng.normal(0, 0.1):.1f}",
        "TP-3",
        "bulk B2",
        "1.5",
        "lean clay (CL), grey-brown, trace fine sand",
        "compacted in 3 lifts, standard effort, 2 % wet of optimum; trimmed to size",
        "de-aired tap water",
        "upward",
        p["deviations"],
    ]


SPECIMEN_HEADER = [
    "specimen",
    "effort",
    "water_content [%]",
    "diameter [mm]",
    "height [mm]",
    "dry_mass [g]",
    "specific_gravity",
    "standpipe_diameter [mm]",
    "tailwater_standpipe_diameter [mm]",
    "final_height [mm]",
    "final_diameter [mm]",
    "final_mass [g]",
    "final_water_content [%]",
    "boring",
    "sample",
    "depth [m]",
    "description",
    "preparation",
    "permeant",
    "flow_direction",
    "deviations",
]


def csv_line(cells):
    out = []
    for cell in cells:
        text = str(cell)
        out.append(f'"{text}"' if ("," in text or '"' in text) else text)
    return ",".join(out)


def write(path: Path, header, rows):
    path.parent.mkdir(parents=True, exist_ok=True)
    lines = [csv_line(header)] + [csv_line(row) for row in rows]
    path.write_text("\n".join(lines) + "\n", encoding="utf-8", newline="\n")


def conditions(name, p):
    flexible = [
        name,
        f"{CELL_PRESSURE:.0f}",
        f"{BACK_PRESSURE:.0f}",
        f"{p['b_values'][-1]:.2f}",
        f"{p['shortening']:.2f}",
        f"{p['expelled']:.1f}",
    ]
    checks = [
        [name, f"{back:.0f}", "50.0", f"{b * 50:.1f}"]
        for back, b in zip(BACK_PRESSURES, p["b_values"], strict=True)
    ]
    return flexible, checks


FLEXIBLE_HEADER = [
    "specimen",
    "cell_pressure [kPa]",
    "back_pressure [kPa]",
    "b_value",
    "height_change [mm]",
    "volume_change [cm^3]",
]
CHECKS_HEADER = [
    "specimen",
    "back_pressure [kPa]",
    "cell_pressure_increment [kPa]",
    "pore_pressure_increment [kPa]",
]


def burette_readings(name, p, rng):
    """Readings by hand: every 30 min for the first 6 h, then every 2 h, over three days."""
    minutes = np.r_[np.arange(0, 360, 30), np.arange(360, 72 * 60 + 1, 120)].astype(float)
    times = minutes * 60.0
    temperature = 20.6 + 0.5 * np.sin(2 * math.pi * times / 86400.0)
    head0 = 1.65  # m
    ratio = 0.98 + rng.normal(0, 0.005)
    head = heads(p, times, temperature, head0, ratio)
    burette = math.pi * (BURETTE_BORE / 1e3) ** 2 / 4
    flow = (head0 - head) / (1.0 + ratio) * burette  # inflow, m3
    inflow_level = 0.95 - flow / burette
    outflow_level = -0.70 + ratio * flow / burette
    if not 0.2 <= 1 - head[-1] / head0 <= 0.6:
        raise SystemExit(f"{name}: the head falls {1 - head[-1] / head0:.0%}, outside 20-60 %")
    rows = []
    for t, temp, level_in, level_out in zip(
        times, temperature, inflow_level, outflow_level, strict=True
    ):
        stamp = p["start"] + dt.timedelta(seconds=float(t))
        rows.append(
            [
                name,
                stamp.strftime("%Y-%m-%dT%H:%M"),
                f"{(level_in + rng.normal(0, 4e-5)) * 1000:.1f}",
                f"{(level_out + rng.normal(0, 4e-5)) * 1000:.1f}",
                f"{temp + rng.normal(0, 0.05):.1f}",
            ]
        )
    return rows


def transducer_readings(p, rng):
    times = np.arange(0, 24 * 3600 + 1, 60).astype(float)
    temperature = 20.2 + 0.6 * times / times[-1] + 0.2 * np.sin(2 * math.pi * times / 43200.0)
    head = heads(p, times, temperature, 1.80)
    pressure = water_density(temperature) * GRAVITY * head / 1e3  # kPa
    rows = []
    for t, temp, kpa in zip(times, temperature, pressure, strict=True):
        stamp = p["start"] + dt.timedelta(seconds=float(t))
        rows.append(
            [
                p["specimen"],
                stamp.strftime("%Y-%m-%d"),
                stamp.strftime("%H:%M:%S"),
                f"{kpa + rng.normal(0, 0.015):.3f}",
                f"{temp + rng.normal(0, 0.02):.2f}",
            ]
        )
    return rows


def truth(specimens):
    out = {}
    for name, p in specimens.items():
        height, area = consolidated(p)
        out[name] = {
            "k20 [m/s]": p["k20"],
            "consolidated_height [m]": round(height, 7),
            "consolidated_area [m2]": round(area, 9),
            "b_values": list(p["b_values"]),
        }
    return out


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--output", default=str(Path(__file__).parent))
    output = Path(parser.parse_args(argv).output)
    rng = np.random.default_rng(SEED)
    project = [
        ["setting", "value"],
        ["project", "Quillbrook Flats cell 2 liner (fictional)"],
        ["criterion", "1e-9 m/s"],
        ["minimum_effective_stress", "10 kPa"],
        ["maximum_effective_stress", "40 kPa"],
    ]

    folder = output / "flexible_wall_clay"
    specimens, flexible, checks, readings = [], [], [], []
    for name, p in SPECIMENS.items():
        specimens.append(specimen_row(name, p, rng))
        row, rows = conditions(name, p)
        flexible.append(row)
        checks += rows
        readings += burette_readings(name, p, rng)
    write(folder / "specimens.csv", SPECIMEN_HEADER, specimens)
    write(folder / "flexible_wall.csv", FLEXIBLE_HEADER, flexible)
    write(folder / "b_value_checks.csv", CHECKS_HEADER, checks)
    write(
        folder / "falling_head.csv",
        [
            "specimen",
            "date_time [+01:00]",
            "headwater_level [mm]",
            "tailwater_level [mm]",
            "temperature [degC]",
        ],
        readings,
    )
    write(folder / "project.csv", project[0], project[1:])
    (folder / "truth.json").write_text(
        json.dumps({"seed": SEED, "specimens": truth(SPECIMENS)}, indent=2) + "\n",
        encoding="utf-8",
    )

    folder = output / "transducer_log"
    name = TRANSDUCER["specimen"]
    row, rows = conditions(name, TRANSDUCER)
    write(folder / "specimens.csv", SPECIMEN_HEADER, [specimen_row(name, TRANSDUCER, rng)])
    write(folder / "flexible_wall.csv", FLEXIBLE_HEADER, [row])
    write(folder / "b_value_checks.csv", CHECKS_HEADER, rows)
    write(
        folder / "falling_head.csv",
        [
            "specimen",
            "date [UTC]",
            "time_of_day [UTC]",
            "head_pressure [kPa]",
            "temperature [degC]",
        ],
        transducer_readings(TRANSDUCER, rng),
    )
    write(folder / "project.csv", project[0], project[1:])
    (folder / "truth.json").write_text(
        json.dumps({"seed": SEED, "specimens": truth({name: TRANSDUCER})}, indent=2) + "\n",
        encoding="utf-8",
    )


if __name__ == "__main__":
    main()
