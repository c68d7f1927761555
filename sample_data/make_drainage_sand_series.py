"""Generate the invented ``drainage_sand`` sample series (constant-head tests on compacted sand).

The data are invented. The sand stands for the drainage layer above the clay liner of the same
fictional landfill cell at "Quillbrook Flats"; no specimen was ever compacted or permeated.
Every number comes from the model in this script, seeded, so that running it twice writes
byte-identical files.

Scenario
--------
Four specimens of clean drainage sand, compacted in rigid-wall permeameters of 4 in and 3 in
bore, each tested by constant head at three heads with two or three timed collections per head.
Two specimens have manometer taps inside the specimen (``flow_length`` given); for the other two
the head difference is taken across the whole specimen (``flow_length`` empty). Most outflow was
read in a graduated cylinder (``volume``); the outflow of specimen DL-B, and the last collection at
each head of DL-C, was weighed instead (``outflow_mass``).

Model
-----
* k20 [m/s] = 0.01 * d10^2 * [e^3/(1+e)] / [e_ref^3/(1+e_ref)], d10 in mm and e_ref = 0.70 (a
  Hazen-type size term with a Kozeny-Carman void-ratio term), times a seeded log-normal scatter.
* Darcy flow at the test temperature: Q = k_T * i * A * t, k_T = k20 * mu_20 / mu_T.
* Readings carry seeded errors: head read to 1 mm, stopwatch to 0.1 s (reaction error 0.15 s),
  cylinder read to 1 mL, balance to 0.1 g; a weighed outflow is m = Q * rho_w(T).

The script writes ``drainage_sand/specimens.csv``, ``drainage_sand/constant_head.csv``,
``drainage_sand/truth.json`` and the same two tables as one workbook, ``drainage_sand.xlsx``
(sheets ``specimens`` and ``constant_head``). It uses numpy, pandas and openpyxl only and does
not import the package whose reductions these data are meant to check.

Usage: ``python sample_data/make_drainage_sand_series.py [--output DIR]``.
"""

from __future__ import annotations

import argparse
import io
import json
import math
import re
import zipfile
from datetime import datetime
from pathlib import Path

import numpy as np
import openpyxl
import pandas as pd

SEED = 2434
SERIES = "drainage_sand"
SITE = "Quillbrook Flats landfill cell, drainage layer (fictional)"
REFERENCE_TEMPERATURE = 20.0  # degC
WATER_DENSITY_PHASE = 1000.0  # kg/m3, the convention in phase relations
INCH = 0.0254  # m
HAZEN_TYPE_COEFFICIENT = 0.01  # m/s per mm^2 of d10 at e_ref
REFERENCE_VOID_RATIO = 0.70
LOG10_SCATTER = 0.04
FIXED_TIMESTAMP = (1980, 1, 1, 0, 0, 0)  # zip entries and workbook properties

# id, bore [in], target void ratio, d10 [mm], specific gravity, manometer tap spacing [in] or None,
# how outflow was measured ("volume", "mass", or "mass_last": the last collection at each head).
PLAN = [
    ("DL-A", 4.0, 0.66, 0.17, 2.66, 4.0, "volume"),
    ("DL-B", 4.0, 0.61, 0.22, 2.65, None, "mass"),
    ("DL-C", 3.0, 0.70, 0.27, 2.67, 4.0, "mass_last"),
    ("DL-D", 3.0, 0.64, 0.33, 2.66, None, "volume"),
]
GRADIENTS = [0.35, 0.60, 0.90]  # nominal hydraulic gradients of the three heads [-]


def viscosity_ratio(temperature):
    """Water viscosity relative to 20 degC, mu_T / mu_20.

    Kestin, Sokolov & Wakeham (1978), J. Phys. Chem. Ref. Data 7(3):941, the closed form
    log10(mu_T/mu_20) = (20 - T)/(T + 96) * [1.2364 - 1.37e-3 (20 - T) + 5.7e-6 (20 - T)^2],
    T in degC (coefficients from memory, as reproduced in the CRC Handbook of Chemistry and
    Physics; agree with IAPWS 2008 within 0.02 % over 17-24 degC).
    """
    t = np.asarray(temperature, dtype=float)
    d = 20.0 - t
    return 10.0 ** (d / (t + 96.0) * (1.2364 - 1.37e-3 * d + 5.7e-6 * d * d))


def water_density(temperature):
    """Density of air-free water at 101.325 kPa. [kg/m3]

    Tanaka, Girard, Davis, Peuto & Bignell (2001), Metrologia 38(4):301, Eq. 1:
    rho = a5 * [1 - (t + a1)^2 (t + a2) / (a3 (t + a4))], t in degC, with a1 = -3.983035 degC,
    a2 = 301.797 degC, a3 = 522528.9 degC^2, a4 = 69.34881 degC, a5 = 999.974950 kg/m3
    (coefficients from memory; 998.207 kg/m3 at 20 degC, as IAPWS-95 gives).
    """
    t = np.asarray(temperature, dtype=float)
    a1, a2, a3, a4, a5 = -3.983035, 301.797, 522528.9, 69.34881, 999.974950
    return a5 * (1.0 - (t + a1) ** 2 * (t + a2) / (a3 * (t + a4)))


def k20_model(d10_mm, void_ratio):
    """Model k20 [m/s] from d10 [mm] and void ratio, before scatter."""
    shape = void_ratio**3 / (1.0 + void_ratio)
    reference = REFERENCE_VOID_RATIO**3 / (1.0 + REFERENCE_VOID_RATIO)
    return HAZEN_TYPE_COEFFICIENT * d10_mm**2 * shape / reference


def significant(x, digits=3):
    """Round to a number of significant digits (the value is then used as the truth)."""
    return float(f"{x:.{digits - 1}e}")


def build(rng):
    """Return the specimens table, the constant-head table and the truth record."""
    specimen_rows, collection_rows, truth = [], [], {}
    for specimen, bore, void_target, d10, gs, taps, weighing in PLAN:
        diameter_in = round(bore + rng.normal(0.0, 0.003), 3)
        height_in = round(rng.uniform(5.8, 6.3), 3)
        area = math.pi / 4.0 * (diameter_in * INCH) ** 2  # m2
        length = height_in * INCH  # m
        void_ratio_planned = void_target + rng.normal(0.0, 0.01)
        dry_mass_g = round(
            gs * WATER_DENSITY_PHASE / (1.0 + void_ratio_planned) * area * length * 1e3, 1
        )
        dry_density = dry_mass_g / 1000.0 / (area * length)
        void_ratio = gs * WATER_DENSITY_PHASE / dry_density - 1.0
        k20 = significant(k20_model(d10, void_ratio) * 10.0 ** rng.normal(0.0, LOG10_SCATTER))
        if not 1e-4 <= k20 <= 1e-3:
            raise RuntimeError(f"{specimen}: k20 = {k20:.2e} m/s, off the scenario")
        flow_length = length if taps is None else taps * INCH

        temperature_start = rng.uniform(19.2, 22.0)
        temperature_slope = rng.choice([-1.0, 1.0]) * rng.uniform(0.5, 1.2)  # degC per hour
        clock = 0.0  # s since the first collection began
        max_reynolds = 0.0
        for gradient_nominal in GRADIENTS:
            gradient = gradient_nominal * (1.0 + rng.normal(0.0, 0.03))
            head_true = gradient * flow_length  # m
            head_written = round((head_true + rng.normal(0.0, 0.0005)) * 100.0, 1)  # cm
            collections = 3 if specimen == "DL-A" else int(rng.integers(2, 4))
            clock += 300.0  # the flow is left to steady after each change of head
            for n in range(collections):
                temperature = temperature_start + temperature_slope * clock / 3600.0
                temperature_written = round(float(temperature), 1)
                k_test = k20 / float(viscosity_ratio(temperature))
                flow = k_test * gradient * area  # m3/s
                target = rng.uniform(250e-6, 700e-6)  # m3 collected
                duration_written = float(max(30.0, 5.0 * round(target / flow / 5.0)))
                duration_true = duration_written + rng.normal(0.0, 0.15)
                volume_true = flow * duration_true  # m3
                weighed = weighing == "mass" or (weighing == "mass_last" and n == collections - 1)
                if weighed:
                    mass_g = volume_true * float(water_density(temperature)) * 1000.0
                    volume_ml, mass_g = math.nan, round(mass_g + rng.normal(0.0, 0.1), 1)
                else:
                    volume_ml, mass_g = round(volume_true * 1e6 + rng.normal(0.0, 1.0)), math.nan
                velocity = k_test * gradient
                reynolds = (
                    float(water_density(temperature))
                    * velocity
                    * d10
                    / 1000.0
                    / (1.0016e-3 * float(viscosity_ratio(temperature)))
                )
                max_reynolds = max(max_reynolds, reynolds)
                collection_rows.append(
                    {
                        "specimen": specimen,
                        "head_difference [cm]": head_written,
                        "duration [s]": duration_written,
                        "volume [mL]": volume_ml,
                        "outflow_mass [g]": mass_g,
                        "temperature [degC]": temperature_written,
                        "flow_length [in]": math.nan if taps is None else taps,
                    }
                )
                clock += duration_written + 60.0
        specimen_rows.append(
            {
                "specimen": specimen,
                "diameter [in]": diameter_in,
                "height [in]": height_in,
                "dry_mass [g]": dry_mass_g,
                "specific_gravity": gs,
                "d10 [mm]": d10,
            }
        )
        truth[specimen] = {
            "k20_m_per_s": k20,
            "d10_mm": d10,
            "dry_density_kg_per_m3": round(dry_density, 2),
            "void_ratio": round(void_ratio, 4),
            "porosity": round(void_ratio / (1.0 + void_ratio), 4),
            "flow_length_m": round(flow_length, 6),
            "manometer_taps": taps is not None,
            "outflow_measured": {
                "volume": "volume in a graduated cylinder",
                "mass": "weighed",
                "mass_last": "volume, except the last collection at each head, weighed",
            }[weighing],
            "nominal_gradients": GRADIENTS,
            "max_reynolds_number_d10": round(max_reynolds, 4),
        }
    return pd.DataFrame(specimen_rows), pd.DataFrame(collection_rows), truth


# Decimals written per column (empty cell where a value is missing).
DECIMALS = {
    "diameter [in]": 3,
    "height [in]": 3,
    "dry_mass [g]": 1,
    "specific_gravity": 2,
    "d10 [mm]": 2,
    "head_difference [cm]": 1,
    "duration [s]": 1,
    "volume [mL]": 0,
    "outflow_mass [g]": 1,
    "temperature [degC]": 1,
    "flow_length [in]": 3,
}


def write_csv(frame, path):
    """Write a table as UTF-8 CSV, fixed decimals per column, empty cells for missing values."""
    text = frame.copy()
    for column, decimals in DECIMALS.items():
        if column in text:
            text[column] = [
                "" if pd.isna(v) else f"{v:.{decimals}f}" for v in frame[column].to_numpy()
            ]
    text.to_csv(path, index=False, lineterminator="\n", encoding="utf-8")


def write_workbook(sheets, path):
    """Write the tables as one workbook, numbers as numbers, empty cells for missing values.

    openpyxl stamps the save time into the document properties and the zip entries; both are
    set to a fixed date so that the file is byte-identical from run to run.
    """
    workbook = openpyxl.Workbook()
    workbook.remove(workbook.active)
    for name, frame in sheets.items():
        sheet = workbook.create_sheet(name)
        sheet.append(list(frame.columns))
        for row in frame.itertuples(index=False):
            cells = []
            for column, value in zip(frame.columns, row, strict=True):
                if isinstance(value, str):
                    cells.append(value)
                elif pd.isna(value):
                    cells.append(None)
                elif DECIMALS.get(column) == 0:
                    cells.append(int(round(value)))
                else:
                    cells.append(round(float(value), DECIMALS.get(column, 6)))
            sheet.append(cells)
    fixed = datetime(*FIXED_TIMESTAMP)
    workbook.properties.creator = "make_drainage_sand_series.py"
    workbook.properties.created = fixed
    buffer = io.BytesIO()
    workbook.save(buffer)
    stamp = fixed.strftime("%Y-%m-%dT%H:%M:%SZ")
    with (
        zipfile.ZipFile(io.BytesIO(buffer.getvalue())) as source,
        zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as target,
    ):
        for info in source.infolist():
            data = source.read(info.filename)
            if info.filename == "docProps/core.xml":
                data = re.sub(
                    rb"(<dcterms:modified[^>]*>)[^<]*(</dcterms:modified>)",
                    rb"\g<1>" + stamp.encode() + rb"\g<2>",
                    data,
                )
            entry = zipfile.ZipInfo(info.filename, date_time=FIXED_TIMESTAMP)
            entry.compress_type = zipfile.ZIP_DEFLATED
            entry.external_attr = 0o600 << 16
            target.writestr(entry, data)


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument(
        "--output",
        type=Path,
        default=Path(__file__).resolve().parent,
        help="folder that receives drainage_sand/ and drainage_sand.xlsx (default: beside this "
        "script)",
    )
    args = parser.parse_args(argv)
    rng = np.random.default_rng(SEED)
    specimens, collections, truth = build(rng)
    folder = args.output / SERIES
    folder.mkdir(parents=True, exist_ok=True)
    write_csv(specimens, folder / "specimens.csv")
    write_csv(collections, folder / "constant_head.csv")
    write_workbook(
        {"specimens": specimens, "constant_head": collections}, args.output / f"{SERIES}.xlsx"
    )
    document = {
        "series": SERIES,
        "invented": True,
        "description": (
            f"Invented constant-head series on compacted sand from the {SITE}; generated by "
            "make_drainage_sand_series.py, not measured."
        ),
        "generator": "make_drainage_sand_series.py",
        "seed": SEED,
        "reference_temperature_degC": REFERENCE_TEMPERATURE,
        "viscosity_model": "Kestin, Sokolov & Wakeham (1978) ratio form",
        "water_density_model": "Tanaka et al. (2001), for weighed outflow",
        "phase_water_density_kg_per_m3": WATER_DENSITY_PHASE,
        "model": {
            "conductivity_curve": (
                "k20 = coefficient * d10_mm^2 * [e^3/(1+e)] / [e_ref^3/(1+e_ref)], "
                "times 10^N(0, log10_scatter)"
            ),
            "coefficient_m_per_s_per_mm2": HAZEN_TYPE_COEFFICIENT,
            "reference_void_ratio": REFERENCE_VOID_RATIO,
            "log10_scatter": LOG10_SCATTER,
            "nominal_gradients": GRADIENTS,
            "readings": (
                "head: true + N(0, 0.5 mm), read to 1 mm; duration: true = written + N(0, 0.15 s);"
                " volume: true + N(0, 1 mL), read to 1 mL; mass: true*rho_w(T) + N(0, 0.1 g)"
            ),
        },
        "specimens": truth,
    }
    (folder / "truth.json").write_text(
        json.dumps(document, indent=2, ensure_ascii=False) + "\n", encoding="utf-8"
    )


if __name__ == "__main__":
    main()
