"""The results table: one row per specimen and test method.

:func:`series_results` reduces every test of a series with the settings given and
returns a frame in SI units; :func:`results_table` renames and scales it into the
exported table, whose headers carry their units (``dry_density [Mg/m3]``,
``k20 [m/s]``…).
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np
import pandas as pd

from .constant_head import collection_table, reduce_constant_head
from .falling_head import reduce_falling_head
from .series import Series
from .specimen import specimen_state
from .water import VISCOSITY_METHODS

__all__ = ["Settings", "series_results", "results_table", "reference_label"]


@dataclass(frozen=True)
class Settings:
    """Choices that change the results; every report records them.

    Parameters
    ----------
    reference_temperature : float
        Temperature the conductivity is corrected to (20 °C in ASTM D5084). [degC]
    viscosity : str
        Water viscosity method: ``"kestin"`` (Kestin et al. 1978, default), ``"iapws"``
        (IAPWS 2008) or ``"d5084"`` (the ASTM D5084 equation for R_T).
    """

    reference_temperature: float = 20.0
    viscosity: str = "kestin"

    def __post_init__(self):
        if self.viscosity not in VISCOSITY_METHODS:
            names = ", ".join(VISCOSITY_METHODS)
            raise ValueError(f"unknown viscosity method {self.viscosity!r}; choose {names}")
        if not 0.0 < self.reference_temperature < 100.0:
            raise ValueError(
                f"reference temperature {self.reference_temperature:g} degC is outside "
                "liquid water (0 to 100 degC)"
            )

    def with_changes(self, **changes) -> Settings:
        return replace(self, **changes)


def reference_label(settings: Settings) -> str:
    """Name of the corrected-k column, after the reference temperature (``k20``)."""
    return f"k{settings.reference_temperature:g}".replace(".", "_")


STATE_COLUMNS = [
    "specimen",
    "effort",
    "water_content",
    "diameter",
    "height",
    "dry_mass",
    "specific_gravity",
    "d10",
    "dry_density",
    "void_ratio",
    "porosity",
    "saturation",
]


def _state_checks(row: pd.Series) -> list[str]:
    checks = []
    saturation = row["saturation"]
    if np.isnan(saturation):
        checks.append("molding water content not given: saturation not computed")
    elif saturation > 1.0:
        checks.append(
            f"saturation {saturation:.0%} is above 100 %: check Gs, height, diameter or dry mass"
        )
    return checks


def _row(state_row, method, result, checks, gradient, n) -> dict:
    row = {column: state_row[column] for column in STATE_COLUMNS}
    row.update(
        method=method,
        n_readings=n,
        gradient=gradient,
        temperature=result.temperature,
        k=result.k,
        k_reference=result.k_reference,
        k_reference_low=result.k_reference_low,
        k_reference_high=result.k_reference_high,
        checks=checks,
        valid=not checks,
    )
    return row


def series_results(
    series: Series, settings: Settings | None = None, windows: dict | None = None
) -> pd.DataFrame:
    """Reduce every test in a series.

    Parameters
    ----------
    series : Series
        A loaded series (:func:`kitchen.series.load_series`).
    settings : Settings, optional
        Reference temperature and viscosity method.
    windows : dict, optional
        Falling-head reading windows, ``{specimen: (start, stop)}``.

    Returns
    -------
    pandas.DataFrame
        One row per specimen and method (``constant_head``, ``falling_head``), in SI, with
        the specimen state, ``gradient`` (largest used), ``temperature`` [degC], ``k`` and
        ``k_reference`` [m/s] with ``k_reference_low``/``k_reference_high`` (95 %),
        ``valid`` and ``checks`` (a list of sentences, empty when every check passes).
    """
    settings = settings or Settings()
    windows = windows or {}
    state = specimen_state(series.specimens)
    rows = []
    by_id = state.set_index("specimen", drop=False)
    if not series.constant_head.empty:
        collections = collection_table(
            series.constant_head, state, settings.reference_temperature, settings.viscosity
        )
        for specimen in pd.unique(collections["specimen"]):
            result = reduce_constant_head(collections, specimen)
            checks = _state_checks(by_id.loc[specimen]) + list(result.notes)
            rows.append(
                _row(by_id.loc[specimen], "constant_head", result, checks,
                     result.gradient_max, result.n)
            )
    if not series.falling_head.empty:
        for specimen, readings in series.falling_head.groupby("specimen", sort=False):
            result = reduce_falling_head(
                readings,
                by_id.loc[specimen],
                settings.reference_temperature,
                settings.viscosity,
                windows.get(specimen),
            )
            checks = _state_checks(by_id.loc[specimen]) + list(result.notes)
            rows.append(
                _row(by_id.loc[specimen], "falling_head", result, checks,
                     result.gradient_start, result.n)
            )
    frame = pd.DataFrame(rows)
    order = {specimen: index for index, specimen in enumerate(state["specimen"])}
    frame = frame.sort_values(
        ["specimen", "method"], key=lambda c: c.map(order) if c.name == "specimen" else c
    )
    return frame.reset_index(drop=True)


def results_table(results: pd.DataFrame, settings: Settings | None = None) -> pd.DataFrame:
    """The exported results table: headers carry units, checks joined into words.

    Parameters
    ----------
    results : pandas.DataFrame
        From :func:`series_results`.
    settings : Settings, optional
        For the name of the corrected column (``k20`` at 20 °C).

    Returns
    -------
    pandas.DataFrame
        ``specimen``, ``method``, ``effort``, ``water_content [%]``,
        ``dry_density [Mg/m3]``, ``void_ratio``, ``porosity``, ``saturation [%]``,
        ``gradient``, ``temperature [degC]``, ``k [m/s]``, ``k20 [m/s]``,
        ``k20_low [m/s]``, ``k20_high [m/s]``, ``n_readings``, ``valid``, ``checks``.
    """
    settings = settings or Settings()
    ref = reference_label(settings)
    table = pd.DataFrame(
        {
            "specimen": results["specimen"],
            "method": results["method"],
            "effort": results["effort"],
            "water_content [%]": results["water_content"] * 100.0,
            "dry_density [Mg/m3]": results["dry_density"] / 1000.0,
            "void_ratio": results["void_ratio"],
            "porosity": results["porosity"],
            "saturation [%]": results["saturation"] * 100.0,
            "gradient": results["gradient"],
            "temperature [degC]": results["temperature"],
            "k [m/s]": results["k"],
            f"{ref} [m/s]": results["k_reference"],
            f"{ref}_low [m/s]": results["k_reference_low"],
            f"{ref}_high [m/s]": results["k_reference_high"],
            "n_readings": results["n_readings"],
            "valid": results["valid"],
            "checks": results["checks"].map(lambda c: "; ".join(c) if c else "all checks passed"),
        }
    )
    return table
