"""Synthetic logger records for the benchmark: falling-head readings from a known k, seeded noise.

An invented scenario: a transducer on the standpipe of a compacted-clay permeameter logs the
head every second, or every few seconds, for a week or more. The head decays towards a
tailwater datum ``h_inf`` above the reference level,
``h(t) = h_inf + (h0 - h_inf) exp(-t / tau)`` with ``tau = a L / (A k)`` (Darcy's law for a
falling-head test with a constant tailwater), plus Gaussian noise and the logger's 0.01 mm
resolution. The water is held at 20 °C (readings scatter by 0.05 °C), so k at the test
temperature is k20 to within about 0.1 %.

Everything here is numpy and pandas alone: the generator does not import ``kitchen``, so the
known k it writes is independent of the code the benchmark measures.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pandas as pd

DIAMETER = 0.1016
"""Specimen diameter, a 4 in compaction mold. [m]"""
HEIGHT = 0.1164
"""Specimen height, the flow length. [m]"""
SPECIFIC_GRAVITY = 2.70
HEAD_NOISE = 2e-4
"""Standard deviation of the transducer noise. [m]"""
RESOLUTION = 1e-5
"""The logger's resolution, 0.01 mm. [m]"""


@dataclass(frozen=True)
class LoggerRecord:
    """One specimen's readings and the values they were made from."""

    time: np.ndarray  # [s]
    head: np.ndarray  # [m]
    temperature: np.ndarray  # [degC]
    k: float  # conductivity the readings were made from [m/s]
    initial_head: float  # h0 [m]
    datum: float  # h_inf, the tailwater datum above the reference level [m]
    time_constant: float  # tau [s]
    standpipe_diameter: float  # [m]

    @property
    def decay_rate(self) -> float:
        """1 / tau, the slope of -ln(h - h_inf) against time. [1/s]"""
        return 1.0 / self.time_constant


def standpipe_for(k: float, span: float, fall: float = 1.5) -> float:
    """A standpipe bore that lets ln(h - h_inf) fall by `fall` over `span` seconds. [m]

    From tau = a L / (A k) with tau = span / fall; rounded to 0.01 mm as a burette's bore
    would be stated.
    """
    area = math.pi * DIAMETER**2 / 4
    standpipe_area = k * area * span / (HEIGHT * fall)
    return round(math.sqrt(4 * standpipe_area / math.pi), 5)


def logger_record(
    n: int,
    k: float = 5e-10,
    interval: float = 1.0,
    initial_head: float = 1.2,
    datum: float = 0.05,
    seed: int = 20_817,
) -> LoggerRecord:
    """Readings of one falling-head test, logged every `interval` seconds.

    Parameters
    ----------
    n : int
        Number of readings.
    k : float
        Hydraulic conductivity the readings follow. [m/s]
    interval : float
        Logging interval. [s]
    initial_head : float
        Head at the first reading. [m]
    datum : float
        Tailwater datum the head decays to. [m]
    seed : int
        Seed of the noise.

    Returns
    -------
    LoggerRecord
    """
    rng = np.random.default_rng(seed)
    time = np.arange(n, dtype=float) * interval
    span = max(time[-1], interval)
    diameter = standpipe_for(k, span)
    standpipe_area = math.pi * diameter**2 / 4
    tau = standpipe_area * HEIGHT / (math.pi * DIAMETER**2 / 4 * k)
    head = datum + (initial_head - datum) * np.exp(-time / tau)
    head += rng.normal(0.0, HEAD_NOISE, n)
    head = np.round(head / RESOLUTION) * RESOLUTION
    temperature = np.round(20.0 + rng.normal(0.0, 0.05, n), 2)
    return LoggerRecord(time, head, temperature, k, initial_head, datum, tau, diameter)


def _specimen_rows(names, water_contents, dry_densities, records) -> pd.DataFrame:
    volume = math.pi * DIAMETER**2 / 4 * HEIGHT
    return pd.DataFrame(
        {
            "specimen": names,
            "effort": [name.split("-")[0] for name in names],
            "water_content [%]": np.round(np.asarray(water_contents) * 100, 2),
            "diameter [mm]": DIAMETER * 1e3,
            "height [mm]": HEIGHT * 1e3,
            "dry_mass [g]": np.round(np.asarray(dry_densities) * volume * 1e3, 2),
            "specific_gravity": SPECIFIC_GRAVITY,
            "standpipe_diameter [mm]": [round(r.standpipe_diameter * 1e3, 2) for r in records],
        }
    )


def _readings_rows(names, records) -> pd.DataFrame:
    return pd.DataFrame(
        {
            "specimen": np.repeat(names, [r.time.size for r in records]),
            "time [s]": np.concatenate([r.time for r in records]),
            "head [mm]": np.round(np.concatenate([r.head for r in records]) * 1e3, 2),
            "temperature [degC]": np.concatenate([r.temperature for r in records]),
        }
    )


def write_record_series(folder: Path, record: LoggerRecord, name: str = "standard-1") -> Path:
    """A series folder holding one specimen and its logger record."""
    folder.mkdir(parents=True, exist_ok=True)
    dry_density = 1700.0
    _specimen_rows([name], [0.18], [dry_density], [record]).to_csv(
        folder / "specimens.csv", index=False
    )
    _readings_rows([name], [record]).to_csv(folder / "falling_head.csv", index=False)
    return folder


def write_transducer_series(
    folder: Path, record: LoggerRecord, name: str = "standard-1", zone: str = "+01:00"
) -> Path:
    """The same record as a logger writes it: each reading's date and time (ISO 8601, the
    zone in the header) and the head as a transducer's pressure in kPa, turned from head
    with the water density at the reading's temperature, p = ρw(T)·gn·h (Tanaka et al.
    2001, eq. 1, coefficients from memory; gn = 9.80665 m/s²), to 0.0001 kPa."""
    folder.mkdir(parents=True, exist_ok=True)
    _specimen_rows([name], [0.18], [1700.0], [record]).to_csv(folder / "specimens.csv", index=False)
    t = record.temperature
    density = 999.974950 * (1 - (t - 3.983035) ** 2 * (t + 301.797) / (522528.9 * (t + 69.34881)))
    start = np.datetime64("2026-03-02T08:00:00", "s")
    stamps = (start + np.round(record.time).astype("timedelta64[s]")).astype(str)
    pd.DataFrame(
        {
            "specimen": name,
            f"date_time [{zone}]": stamps,
            "head_pressure [kPa]": np.round(density * 9.80665 * record.head / 1e3, 4),
            "temperature [degC]": record.temperature,
        }
    ).to_csv(folder / "falling_head.csv", index=False)
    return folder


EFFORTS = {  # invented compaction curves: optimum water content [-], maximum dry density [kg/m3]
    "reduced": (0.205, 1640.0),
    "standard": (0.185, 1710.0),
    "modified": (0.160, 1800.0),
}


def series_scenario(readings: int, specimens: int = 12, seed: int = 63040):
    """An invented series: specimens at three efforts across the water content range.

    Dry density follows a parabola about each effort's optimum, kept below 92 % saturation;
    log k falls by 1.5 decades per 10 % of water content wetter of optimum and rises drier
    of it; each specimen is logged every 6 s.

    Returns
    -------
    names, water_contents, dry_densities, records
    """
    rng = np.random.default_rng(seed)
    names, water, density, records = [], [], [], []
    efforts = list(EFFORTS)
    for index in range(specimens):
        effort = efforts[index % len(efforts)]
        optimum, peak = EFFORTS[effort]
        w = optimum + (-0.04 + 0.08 * (index // len(efforts)) / max(specimens // 3 - 1, 1))
        w = round(w + rng.normal(0.0, 0.002), 4)
        saturated = SPECIFIC_GRAVITY * 1000.0 / (1.0 + w * SPECIFIC_GRAVITY / 0.92)
        rho = min(peak - 9000.0 * (w - optimum) ** 2, saturated)
        k = 10.0 ** (-9.0 - 15.0 * (w - optimum) + rng.normal(0.0, 0.1))
        names.append(f"{effort}-{index // len(efforts) + 1}")
        water.append(w)
        density.append(rho)
        records.append(logger_record(readings, k=k, interval=6.0, seed=seed + index))
    return names, water, density, records


def write_series(folder: Path, readings: int, specimens: int = 12, seed: int = 63040) -> Path:
    """A series folder of `specimens` falling-head specimens with `readings` readings each."""
    folder.mkdir(parents=True, exist_ok=True)
    names, water, density, records = series_scenario(readings, specimens, seed)
    _specimen_rows(names, water, density, records).to_csv(folder / "specimens.csv", index=False)
    _readings_rows(names, records).to_csv(folder / "falling_head.csv", index=False)
    return folder
