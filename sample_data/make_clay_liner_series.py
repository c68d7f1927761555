"""Generate the invented ``clay_liner`` sample series (falling-head tests on compacted clay).

The data are invented. "Quillbrook Flats" is a fictional borrow area for the clay liner of a
fictional landfill cell; no specimen was ever compacted or permeated. Every number below comes
from the model in this script, seeded, so that running it twice writes byte-identical files.

Scenario
--------
Fourteen specimens of one lean clay were compacted in a 4 in (101.6 mm) compaction-mold
permeameter at three compactive efforts (``reduced``, ``standard``, ``modified``) and at molding
water contents from dry to wet of each effort's optimum, then permeated by falling head with a
constant tailwater (one specimen with two burettes, rising tailwater).

Model
-----
* Compaction curve per effort: dry density peaks at the optimum water content, falling as a
  parabola on each side (steeper wet of optimum); every specimen is checked to lie below the
  zero-air-voids line, rho_d = Gs*rho_w / (1 + w*Gs), with a saturation between 70 % and 100 %.
* Hydraulic conductivity at 20 degC: log10 k20 falls along a logistic step from a dry-of-optimum
  plateau to a wet-of-optimum plateau centred on the optimum, lower for higher effort, with a
  seeded log-normal scatter.
* Falling head, constant tailwater: dh/dt = -k_T * A * h / (a * L); rising tailwater with two
  burettes: dh/dt = -k_T * A * h * (1/a_in + 1/a_out) / L. k_T = k20 * mu_20 / mu_T, with the
  temperature drifting smoothly through the record; the head is integrated numerically between
  readings, then read to the nearest millimetre after a small seeded reading error.

The script writes ``clay_liner/specimens.csv``, ``clay_liner/falling_head.csv``,
``clay_liner/project.csv`` (the series' project table: the liner criterion, a largest k20 of
1e-9 m/s, as US 40 CFR 258.40 and EU Directive 1999/31/EC Annex I set for a compacted clay
liner or geological barrier) and ``clay_liner/truth.json`` (the true k20 per specimen and the
model parameters). It uses numpy and pandas only and does not import the package whose
reductions these data are meant to check.

Usage: ``python sample_data/make_clay_liner_series.py [--output DIR]``.
"""

from __future__ import annotations

import argparse
import json
import math
from pathlib import Path

import numpy as np
import pandas as pd

SEED = 51084
SERIES = "clay_liner"
SITE = "Quillbrook Flats borrow area (fictional)"
SPECIFIC_GRAVITY = 2.71
WATER_DENSITY_PHASE = 1000.0  # kg/m3, the convention in phase relations
REFERENCE_TEMPERATURE = 20.0  # degC
CRITERION = 1.0e-9  # m/s, the liner criterion of the scenario (40 CFR 258.40; 1999/31/EC Annex I)
PROJECT_CRITERION = "1e-9 m/s"  # the same, as the project table writes it: a largest k allowed
MOLD_DIAMETER = 101.6  # mm (4 in mold)
MOLD_HEIGHT = 116.4  # mm
MOLD_TARES = [4186.0, 4211.5, 4173.2]  # g, the molds for the specimens weighed in them

# Compaction curve per effort: optimum water content [-], maximum dry density [kg/m3],
# curvature dry and wet of optimum [kg/m3 per (unit water content)^2].
COMPACTION = {
    "reduced": {"optimum": 0.205, "max_dry_density": 1655.0, "dry_side": 2.5e4, "wet_side": 6.0e4},
    "standard": {"optimum": 0.185, "max_dry_density": 1725.0, "dry_side": 2.5e4, "wet_side": 6.0e4},
    "modified": {"optimum": 0.160, "max_dry_density": 1805.0, "dry_side": 2.5e4, "wet_side": 6.5e4},
}
# log10 k20 [m/s] plateaus dry and wet of optimum, and the width of the step [-].
CONDUCTIVITY = {
    "reduced": {"log10_dry": -7.45, "log10_wet": -9.55},
    "standard": {"log10_dry": -7.85, "log10_wet": -9.85},
    "modified": {"log10_dry": -8.15, "log10_wet": -10.0},
}
STEP_WIDTH = 0.006
LOG10_SCATTER = 0.08

# Planned specimens: id, effort, offset of molding water content from the effort's optimum [-],
# weighed in the mold (True) or dry mass given directly (False), special behaviour.
PLAN = [
    ("QF-01", "standard", -0.022, False, None),
    ("QF-02", "standard", -0.012, False, "early_transient"),
    ("QF-03", "standard", 0.000, False, None),
    ("QF-04", "standard", 0.013, False, "drift"),
    ("QF-05", "standard", 0.027, False, None),
    ("QF-06", "modified", -0.019, False, None),
    ("QF-07", "modified", -0.010, False, "early_transient"),
    ("QF-08", "modified", 0.002, False, None),
    ("QF-09", "modified", 0.015, False, "rising_tailwater"),
    ("QF-10", "modified", 0.028, False, None),
    ("QF-11", "reduced", -0.018, True, None),
    ("QF-12", "reduced", -0.005, True, "missing_temperature"),
    ("QF-13", "reduced", 0.010, True, None),
    ("QF-14", "reduced", 0.025, False, None),
]

# Standpipe (burette) bores on the panel [mm]; the smallest ones are fine-bore capillaries.
STANDPIPE_BORES = [1.0, 1.2, 1.5, 2.0, 2.5, 3.0, 4.0, 5.0, 6.0, 8.0, 10.0, 12.0]
TRANSIENT_EXCESS = 1.5  # k multiplier 1 + 1.5*exp(-t/tau) at the start of the record
TRANSIENT_TIME = 20.0  # tau [min]
DRIFT_RATIO = 0.55  # k20 at the end of the record / k20 at the start
HEAD_READING_ERROR = 0.3  # mm, standard deviation before reading to the nearest mm


def viscosity_ratio(temperature):
    """Water viscosity relative to 20 degC, mu_T / mu_20.

    Kestin, Sokolov & Wakeham (1978), J. Phys. Chem. Ref. Data 7(3):941, the closed form
    log10(mu_T/mu_20) = (20 - T)/(T + 96) * [1.2364 - 1.37e-3 (20 - T) + 5.7e-6 (20 - T)^2],
    T in degC (coefficients from memory, as reproduced in the CRC Handbook of Chemistry and
    Physics; agree with IAPWS 2008 within 0.02 % over 17-24 degC).
    """
    d = 20.0 - np.asarray(temperature, dtype=float)
    return 10.0 ** (d / (np.asarray(temperature) + 96.0) * (1.2364 - 1.37e-3 * d + 5.7e-6 * d * d))


def dry_density_model(effort, water_content):
    """Dry density on the effort's compaction curve. [kg/m3]"""
    p = COMPACTION[effort]
    dw = water_content - p["optimum"]
    curvature = p["dry_side"] if dw < 0 else p["wet_side"]
    return p["max_dry_density"] - curvature * dw * dw


def log10_k20_model(effort, water_content):
    """log10 of k20 [m/s] on the logistic step across the effort's optimum."""
    p = CONDUCTIVITY[effort]
    x = (water_content - COMPACTION[effort]["optimum"]) / STEP_WIDTH
    return p["log10_wet"] + (p["log10_dry"] - p["log10_wet"]) / (1.0 + math.exp(x))


def phase_state(diameter_mm, height_mm, dry_mass_g, specific_gravity, water_content):
    """Dry density [kg/m3], void ratio, saturation [-] from the written specimen values."""
    volume = math.pi / 4.0 * (diameter_mm / 1000.0) ** 2 * (height_mm / 1000.0)
    dry_density = dry_mass_g / 1000.0 / volume
    void_ratio = specific_gravity * WATER_DENSITY_PHASE / dry_density - 1.0
    saturation = water_content * specific_gravity / void_ratio
    return dry_density, void_ratio, saturation


def significant(x, digits=3):
    """Round to a number of significant digits (the value is then used as the truth)."""
    return float(f"{x:.{digits - 1}e}")


def temperature_path(rng, record_minutes):
    """A smooth room-temperature drift T(t) [degC], t in minutes, within 17-24 degC."""
    amplitude = rng.uniform(0.8, 2.0)
    period = rng.uniform(480.0, 960.0)  # min, the cycle of the room's heating or cooling
    phase = rng.uniform(0.0, 2.0 * math.pi)
    slope = rng.uniform(-0.25, 0.25)  # degC per hour
    rise = slope * record_minutes / 60.0
    middle = rng.uniform(17.2 + amplitude + max(0.0, -rise), 23.8 - amplitude - max(0.0, rise))

    def path(t_min):
        t = np.asarray(t_min, dtype=float)
        return middle + amplitude * np.sin(2.0 * np.pi * t / period + phase) + slope * t / 60.0

    return path


def simulate_heads(times_min, h0_cm, rate_per_min_at_20, multiplier, temperature):
    """Integrate ln h between readings: d ln h/dt = -rate20 * m(t) * mu_20/mu_T(t)."""
    heads = [h0_cm]
    log_h = math.log(h0_cm)
    for t_start, t_stop in zip(times_min[:-1], times_min[1:], strict=True):
        steps = max(int(math.ceil((t_stop - t_start) / 0.25)), 4)
        t = np.linspace(t_start, t_stop, steps + 1)
        rate = rate_per_min_at_20 * multiplier(t) / viscosity_ratio(temperature(t))
        log_h -= float(np.sum(0.5 * (rate[1:] + rate[:-1]) * np.diff(t)))
        heads.append(math.exp(log_h))
    return np.array(heads)


def build(rng):
    """Return the specimens table, the falling-head table and the truth record."""
    specimen_rows, reading_rows, truth = [], [], {}
    mold_tares = iter(MOLD_TARES)
    for specimen, effort, offset, in_mold, behaviour in PLAN:
        mold_tare = next(mold_tares) if in_mold else math.nan
        water_content = COMPACTION[effort]["optimum"] + offset + rng.normal(0.0, 0.002)
        water_content_pct = round(100.0 * water_content, 1)
        water_content = water_content_pct / 100.0
        dry_density = dry_density_model(effort, water_content) + rng.normal(0.0, 6.0)
        diameter = round(MOLD_DIAMETER + rng.normal(0.0, 0.05), 2)
        height = round(MOLD_HEIGHT + rng.normal(0.0, 0.25), 2)
        area = math.pi / 4.0 * (diameter / 1000.0) ** 2  # m2
        length = height / 1000.0  # m
        dry_mass = round(dry_density * area * length * 1000.0, 1)  # g
        rho_d, void_ratio, saturation = phase_state(
            diameter, height, dry_mass, SPECIFIC_GRAVITY, water_content
        )
        zero_air_voids = (
            SPECIFIC_GRAVITY * WATER_DENSITY_PHASE / (1.0 + water_content * SPECIFIC_GRAVITY)
        )
        if not (rho_d < zero_air_voids and 0.70 <= saturation < 1.0):
            raise RuntimeError(f"{specimen}: state off the model, S = {saturation:.3f}")

        k20 = significant(
            10.0 ** (log10_k20_model(effort, water_content) + rng.normal(0.0, LOG10_SCATTER))
        )

        # Record plan: reading interval by conductivity, a target head fall of 30-50 %, the
        # burette that brings that fall closest to a 6 h record, the record kept within 4-12 h.
        interval = 5.0 if k20 > 5e-9 else (10.0 if k20 > 8e-10 else 15.0)
        gradient_limit = 10.0 if k20 > 1e-8 else (20.0 if k20 > 1e-9 else 30.0)
        h0 = round(rng.uniform(0.7, 0.85) * gradient_limit * height / 10.0, 1)  # cm
        fall = rng.uniform(0.30, 0.50)
        best = None
        for bore in STANDPIPE_BORES:
            a_in = math.pi / 4.0 * (bore / 1000.0) ** 2
            bores = [bore]
            a_eff = a_in
            if behaviour == "rising_tailwater":
                tail_bore = STANDPIPE_BORES[min(STANDPIPE_BORES.index(bore) + 1, 11)]
                bores.append(tail_bore)
                a_out = math.pi / 4.0 * (tail_bore / 1000.0) ** 2
                a_eff = a_in * a_out / (a_in + a_out)
            needed_min = -math.log(1.0 - fall) * a_eff * length / (k20 * area) / 60.0
            score = abs(math.log(needed_min / 360.0))
            if best is None or score < best[0]:
                best = (score, bores, a_eff, min(max(needed_min, 240.0), 720.0))
        _, bores, a_eff, needed_min = best
        rate20 = k20 * area / (a_eff * length) * 60.0  # per minute at 20 degC

        while needed_min / interval < 24 and interval > 5.0:
            interval -= 5.0  # at least about two dozen readings per record
        count = int(round(needed_min / interval))
        jitter = np.round(rng.uniform(-0.6, 0.6, count), 1)
        times = np.concatenate([[0.0], np.round(np.arange(1, count + 1) * interval + jitter, 1)])
        t_end = float(times[-1])

        if behaviour == "early_transient":

            def multiplier(t):
                return 1.0 + TRANSIENT_EXCESS * np.exp(-np.asarray(t) / TRANSIENT_TIME)

        elif behaviour == "drift":

            def multiplier(t, t_end=t_end):
                return DRIFT_RATIO ** (np.asarray(t) / t_end - 0.5)

        else:

            def multiplier(t):
                return np.ones_like(np.asarray(t, dtype=float))

        temperature = temperature_path(rng, t_end)
        heads_true = simulate_heads(times, h0, rate20, multiplier, temperature)
        reading_error = rng.normal(0.0, HEAD_READING_ERROR / 10.0, heads_true.size)
        heads = np.round(heads_true + reading_error, 1)  # cm, read to the nearest mm
        temperatures = np.round(temperature(times), 1)
        if temperatures.min() < 17.0 or temperatures.max() > 24.0:
            raise RuntimeError(f"{specimen}: temperature outside 17-24 degC")
        if behaviour == "missing_temperature":
            temperatures[9:16] = np.nan  # thermometer probe disconnected for seven readings
        if np.any(np.diff(heads) >= 0) or np.any(np.diff(times) <= 0) or heads[-1] <= 0:
            raise RuntimeError(f"{specimen}: heads must fall and times must rise")
        head_fall = 1.0 - heads[-1] / heads[0]
        if not 0.20 <= head_fall <= 0.60:
            raise RuntimeError(f"{specimen}: head fell {head_fall:.0%}")

        specimen_rows.append(
            {
                "specimen": specimen,
                "effort": effort,
                "water_content [%]": water_content_pct,
                "diameter [mm]": diameter,
                "height [mm]": height,
                "dry_mass [g]": np.nan if in_mold else dry_mass,
                "mold_mass [g]": mold_tare,
                "mold_and_soil_mass [g]": round(mold_tare + dry_mass, 1) if in_mold else np.nan,
                "specific_gravity": SPECIFIC_GRAVITY,
                "standpipe_diameter [mm]": bores[0],
                "tailwater_standpipe_diameter [mm]": bores[1] if len(bores) > 1 else np.nan,
            }
        )
        for t, h, temp in zip(times, heads, temperatures, strict=True):
            reading_rows.append(
                {"specimen": specimen, "time [min]": t, "head [cm]": h, "temperature [degC]": temp}
            )

        record = {
            "k20_m_per_s": k20,
            "effort": effort,
            "water_content": round(water_content, 4),
            "water_content_offset_from_optimum": round(
                water_content - COMPACTION[effort]["optimum"], 4
            ),
            "dry_density_kg_per_m3": round(rho_d, 2),
            "void_ratio": round(void_ratio, 4),
            "saturation": round(saturation, 4),
            "zero_air_voids_dry_density_kg_per_m3": round(zero_air_voids, 2),
            "meets_criterion": k20 <= CRITERION,
            "tailwater": "rising, two burettes" if len(bores) > 1 else "constant",
            "initial_gradient": round(h0 / (height / 10.0), 2),
            "head_fall_fraction": round(float(head_fall), 4),
            "record_minutes": t_end,
            "readings": int(times.size),
            "behaviour": behaviour or "steady",
        }
        if behaviour == "early_transient":
            settled = TRANSIENT_TIME * math.log(TRANSIENT_EXCESS / 0.01)
            record["note"] = (
                f"k multiplied by 1 + {TRANSIENT_EXCESS}*exp(-t/{TRANSIENT_TIME:g} min): the first "
                "readings fall faster; k20 is the steady value (excess below 1 % after "
                f"{settled:.0f} min)."
            )
            record["transient_settled_min"] = round(settled, 1)
        elif behaviour == "drift":
            record["note"] = (
                f"k20 falls log-linearly with time by a factor {DRIFT_RATIO} over the record; "
                "k20 is the value at mid-record. A trend check on k against time should fail."
            )
            record["k20_start_m_per_s"] = significant(k20 / math.sqrt(DRIFT_RATIO), 4)
            record["k20_end_m_per_s"] = significant(k20 * math.sqrt(DRIFT_RATIO), 4)
        elif behaviour == "rising_tailwater":
            record["note"] = (
                "Two burettes, rising tailwater: the head column is the head difference across the "
                "specimen, and it decays at k*A*(1/a_in + 1/a_out)/L."
            )
        elif behaviour == "missing_temperature":
            record["note"] = (
                "Temperature cells empty for readings 10-16 (1-based within the specimen); the "
                "heads there still follow the true, smoothly drifting temperature."
            )
        truth[specimen] = record
    return pd.DataFrame(specimen_rows), pd.DataFrame(reading_rows), truth


# Decimals written per column (empty cell where a value is missing).
DECIMALS = {
    "water_content [%]": 1,
    "diameter [mm]": 2,
    "height [mm]": 2,
    "dry_mass [g]": 1,
    "mold_mass [g]": 1,
    "mold_and_soil_mass [g]": 1,
    "specific_gravity": 2,
    "standpipe_diameter [mm]": 1,
    "tailwater_standpipe_diameter [mm]": 1,
    "time [min]": 1,
    "head [cm]": 1,
    "temperature [degC]": 1,
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


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument(
        "--output",
        type=Path,
        default=Path(__file__).resolve().parent,
        help="folder that receives the clay_liner/ series (default: beside this script)",
    )
    args = parser.parse_args(argv)
    rng = np.random.default_rng(SEED)
    specimens, readings, truth = build(rng)
    folder = args.output / SERIES
    folder.mkdir(parents=True, exist_ok=True)
    write_csv(specimens, folder / "specimens.csv")
    write_csv(readings, folder / "falling_head.csv")
    assert float(PROJECT_CRITERION.split()[0]) == CRITERION
    (folder / "project.csv").write_text(
        f"setting,value\ncriterion,{PROJECT_CRITERION}\n", encoding="utf-8", newline="\n"
    )
    document = {
        "series": SERIES,
        "invented": True,
        "description": (
            f"Invented falling-head series on compacted clay from {SITE}; generated by "
            "make_clay_liner_series.py, not measured."
        ),
        "generator": "make_clay_liner_series.py",
        "seed": SEED,
        "reference_temperature_degC": REFERENCE_TEMPERATURE,
        "viscosity_model": "Kestin, Sokolov & Wakeham (1978) ratio form",
        "phase_water_density_kg_per_m3": WATER_DENSITY_PHASE,
        "specific_gravity": SPECIFIC_GRAVITY,
        "criterion_m_per_s": CRITERION,
        "model": {
            "compaction_curve": (
                "rho_d = max_dry_density - c*(w - optimum)^2, c = dry_side below optimum, "
                "wet_side above; plus normal scatter sd 6 kg/m3"
            ),
            "compaction": COMPACTION,
            "conductivity_curve": (
                "log10 k20 = log10_wet + (log10_dry - log10_wet)"
                "/(1 + exp((w - optimum)/step_width)), plus normal scatter in log10"
            ),
            "conductivity": CONDUCTIVITY,
            "step_width": STEP_WIDTH,
            "log10_scatter": LOG10_SCATTER,
            "head_reading": "true head + normal error sd 0.3 mm, read to the nearest 1 mm",
            "temperature": "smooth drift within 17-24 degC, written to 0.1 degC",
            "transient_excess": TRANSIENT_EXCESS,
            "transient_time_min": TRANSIENT_TIME,
            "drift_ratio": DRIFT_RATIO,
        },
        "specimens": truth,
    }
    (folder / "truth.json").write_text(
        json.dumps(document, indent=2, ensure_ascii=False) + "\n", encoding="utf-8"
    )


if __name__ == "__main__":
    main()
