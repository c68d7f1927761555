"""Seeded populations of falling-head records with a known k20, and one fault each.

Every record follows the falling-head law with a constant tailwater, ASTM D5084 Method B
(from memory for the clause): d(ln h)/dt = −k·A/(a·L), so h(t) = h0·exp(−k·A·t/(a·L)) for a
constant k (Das, *Principles of Geotechnical Engineering*, falling-head test). The readings
are at 20 °C, so k20 = k. The head falls from 1000 mm to about 600 mm over the record, and a
Gaussian reading error of 0.5 to 2 mm is added to every head. The faults:

- ``steady``: none;
- ``datum``: every head read ``datum_offset`` (±20 mm) off, as when the tailwater datum is
  read wrong: the readings are h + δ instead of h;
- ``transient``: k starts higher and settles, k(t) = k∞·(1 + A·exp(−t/t0)) with A from 1 to
  2 and t0 from 1 to 4 % of the record (the excess is below 1 % of k∞ after about 5·t0), the
  shape of the sample series' transients (sample_data/README.md); ln h is then
  −(k∞·A/(a·L))·(t + A·t0·(1 − exp(−t/t0))) from ln h0, in closed form. The truth is k∞.

The code does not use the package, so that a fault in the package cannot hide in the
records it is tested on. Each record is a :class:`PopulationRecord`; :func:`population`
yields a seeded population of one fault. :func:`holds` and :func:`fault_handled` judge an
analysis of a record against its truth, for the tests and the rates benchmark alike.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import pandas as pd

AREA = 0.0081  # specimen cross-section [m2] (about 102 mm diameter)
HEIGHT = 0.116  # specimen height, the flow length [m]
STANDPIPE = 2.0e-6  # standpipe area [m2] (1.6 mm bore)
START_HEAD = 1.0  # [m]
END_HEAD = 0.6  # [m], for the steady law
DATUM_WORDS = "curves as a wrong datum would"
"""What the full record's judgement says of a curvature a wrong datum would give."""


@dataclass(frozen=True)
class PopulationRecord:
    """One simulated record: its readings, its specimen row, and what made it."""

    readings: pd.DataFrame
    specimen: pd.Series
    k20: float
    """The true k20 (the steady value for a transient). [m/s]"""
    fault: str
    readings_count: int
    noise: float
    """Standard deviation of the reading error. [m]"""
    detail: float
    """The datum offset [m] for ``datum``, the transient's time constant over the record's
    length for ``transient``, 0 for ``steady``."""


def _specimen(name: str) -> pd.Series:
    return pd.Series(
        {"specimen": name, "area": AREA, "height": HEIGHT, "standpipe_area": STANDPIPE}
    )


def record(
    readings_count: int,
    noise: float,
    seed: int,
    *,
    fault: str = "steady",
    hours: float = 8.0,
    datum_offset: float = 0.0,
    amplitude: float = 0.0,
    transient_fraction: float = 0.0,
) -> PopulationRecord:
    """One record of `readings_count` readings, equally spaced over `hours`.

    Parameters
    ----------
    readings_count : int
        Readings, first at t = 0 and last at the end of the record. [-]
    noise : float
        Standard deviation of the Gaussian reading error. [m]
    seed : int
        Seed of the reading errors.
    fault : {"steady", "datum", "transient"}
        See the module's description.
    hours : float
        Length of the record. [h]
    datum_offset : float
        ``datum``: added to every head read. [m]
    amplitude, transient_fraction : float
        ``transient``: A, and t0 as a fraction of the record's length. [-]
    """
    span = hours * 3600.0
    rate = math.log(START_HEAD / END_HEAD) / span  # k·A/(a·L) [1/s]
    k20 = rate * STANDPIPE * HEIGHT / AREA
    time = np.linspace(0.0, span, readings_count)
    if fault == "transient":
        t0 = transient_fraction * span
        log_head = -rate * (time + amplitude * t0 * -np.expm1(-time / t0))
        detail = transient_fraction
    else:
        log_head = -rate * time
        detail = datum_offset if fault == "datum" else 0.0
    head = START_HEAD * np.exp(log_head)
    if fault == "datum":
        head = head + datum_offset
    head = head + np.random.default_rng(seed).normal(0.0, noise, readings_count)
    readings = pd.DataFrame({"time": time, "head": head, "temperature": 20.0})
    return PopulationRecord(
        readings, _specimen(f"P{seed}"), k20, fault, readings_count, noise, detail
    )


def population(fault: str, count: int, seed: int, readings=(30, 3000), noise=(0.5e-3, 2e-3)):
    """`count` records of one fault, drawn from a seeded generator.

    Parameters
    ----------
    fault : {"steady", "datum", "transient"}
        See the module's description.
    count : int
        Records. [-]
    seed : int
        Seed of the draws (each record's reading errors have a seed of their own from it).
    readings : (int, int)
        Fewest and most readings, drawn log-uniformly. [-]
    noise : (float, float)
        Smallest and largest reading error, drawn uniformly. [m]

    Yields
    ------
    PopulationRecord
        The record length is drawn from 2 to 24 h; a datum offset is +20 or −20 mm; a
        transient's A from 1 to 2 and t0 from 1 to 4 % of the record.
    """
    draw = np.random.default_rng(seed)
    for _ in range(count):
        n = int(round(math.exp(draw.uniform(math.log(readings[0]), math.log(readings[1])))))
        sigma = float(draw.uniform(*noise))
        hours = float(draw.uniform(2.0, 24.0))
        own_seed = int(draw.integers(2**31))
        yield record(
            n,
            sigma,
            own_seed,
            fault=fault,
            hours=hours,
            datum_offset=float(draw.choice([-0.02, 0.02])),
            amplitude=float(draw.uniform(1.0, 2.0)),
            transient_fraction=float(draw.uniform(0.01, 0.04)),
        )


def holds(item: PopulationRecord, analysis) -> bool:
    """Whether the analysis's 95 % interval of k20 holds the record's true k20."""
    return bool(analysis.k_reference_low <= item.k20 <= analysis.k_reference_high)


def said(analysis, words: str | None = None) -> bool:
    """Whether the analysis is judged not valid with the reason in words: among its checks
    one holding `words`, or (without `words`) any check."""
    if analysis.valid:
        return False
    if words is None:
        return bool(analysis.checks)
    return any(words in check for check in analysis.checks)


def fault_handled(item: PopulationRecord, analysis, words: str | None = None) -> bool:
    """A record with a fault is handled when judged not valid with the reason in words
    (:func:`said`), or reported with an interval that holds its true k20 (:func:`holds`)."""
    return said(analysis, words) or holds(item, analysis)
