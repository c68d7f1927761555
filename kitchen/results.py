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

from .constant_head import collection_table, constant_head_analysis
from .falling_head import FALLING_HEAD_FITS, falling_head_analysis
from .series import Series
from .specimen import specimen_state
from .uncertainty import PROPAGATION_METHODS, Resolutions
from .validity import Criteria
from .water import VISCOSITY_METHODS

CAPILLARY_RISE_OPTIONS = ("off", "jurin")

__all__ = ["Settings", "series_results", "results_table", "reference_label", "result_row"]


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
    criteria : kitchen.validity.Criteria
        Limits of the validity criteria; defaults from ASTM D5084 (4 consecutive values
        within ±25 %, ±50 % below 1e-10 m/s, outflow/inflow 0.75–1.25, the gradient
        table, Reynolds number 1), for example
        ``Settings(criteria=Criteria(steady_tolerance=0.2))``.
    resolutions : kitchen.uncertainty.Resolutions
        Resolutions of caliper, balance, timer, head scale, volume scale and thermometer
        that enter every interval (defaults 0.01 mm, 0.1 g, 1 s, 1 mm, 1 mL, 0.1 °C).
    uncertainty_method : str
        ``"first_order"`` (the GUM's law of propagation, JCGM 100:2008; default) or
        ``"monte_carlo"`` (JCGM 101:2008).
    monte_carlo_trials : int
        Trials of the Monte Carlo method. [-]
    monte_carlo_seed : int
        Seed of the Monte Carlo method, fixed so that a report is reproducible.
    falling_head_fit : str
        ``"log_linear"`` (ln h on time; default) or ``"datum"`` (decay to a fitted
        tailwater datum h∞).
    capillary_rise : str
        ``"off"`` (default: heads as read) or ``"jurin"`` (heads less the capillary rise
        in the standpipe by Jurin's law from its bore; a measured value per specimen is
        passed to :func:`series_results` instead).
    """

    reference_temperature: float = 20.0
    viscosity: str = "kestin"
    criteria: Criteria = Criteria()
    resolutions: Resolutions = Resolutions()
    uncertainty_method: str = "first_order"
    monte_carlo_trials: int = 200_000
    monte_carlo_seed: int = 0
    falling_head_fit: str = "log_linear"
    capillary_rise: str = "off"

    def __post_init__(self):
        if self.viscosity not in VISCOSITY_METHODS:
            names = ", ".join(VISCOSITY_METHODS)
            raise ValueError(f"unknown viscosity method {self.viscosity!r}; choose {names}")
        choices = (
            ("uncertainty_method", PROPAGATION_METHODS),
            ("falling_head_fit", FALLING_HEAD_FITS),
            ("capillary_rise", CAPILLARY_RISE_OPTIONS),
        )
        for name, allowed in choices:
            if getattr(self, name) not in allowed:
                raise ValueError(
                    f"unknown {name.replace('_', ' ')} {getattr(self, name)!r}; choose one of "
                    f"{', '.join(allowed)}"
                )
        if not isinstance(self.criteria, Criteria) or not isinstance(self.resolutions, Resolutions):
            raise ValueError(
                "criteria must be a kitchen.validity.Criteria and resolutions a "
                "kitchen.uncertainty.Resolutions"
            )
        if not isinstance(self.monte_carlo_trials, int) or self.monte_carlo_trials < 1000:
            raise ValueError(
                f"monte_carlo_trials must be a whole number of at least 1000, got "
                f"{self.monte_carlo_trials!r}"
            )
        if not 0.0 < self.reference_temperature < 100.0:
            raise ValueError(
                f"reference temperature {self.reference_temperature:g} degC is outside "
                "liquid water (0 to 100 degC)"
            )

    def with_changes(self, **changes) -> Settings:
        return replace(self, **changes)


def reference_label(reference: Settings | float) -> str:
    """Name of the corrected k, after the reference temperature: ``k20``, ``k10``, ``k27_5``.

    Parameters
    ----------
    reference : Settings or float
        Settings, or the reference temperature itself. [degC]
    """
    temperature = (
        reference.reference_temperature if isinstance(reference, Settings) else float(reference)
    )
    return f"k{temperature:g}".replace(".", "_")


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


def result_row(state_row, method, analysis, gradient) -> dict:
    """One row of the results table, from a specimen's state and one test's analysis."""
    row = {column: state_row[column] for column in STATE_COLUMNS}
    row.update(
        method=method,
        n_readings=analysis.n,
        gradient=gradient,
        temperature=analysis.temperature,
        k=analysis.k,
        k_reference=analysis.k_reference,
        k_reference_low=analysis.k_reference_low,
        k_reference_high=analysis.k_reference_high,
        checks=list(analysis.checks) + _state_checks(state_row),
        notes=list(analysis.method_notes),
        verdicts=analysis.verdicts,
        valid=analysis.valid,
    )
    return row


def series_results(
    series: Series,
    settings: Settings | None = None,
    windows: dict | None = None,
    capillary_rises: dict | None = None,
) -> pd.DataFrame:
    """Reduce every test in a series.

    Parameters
    ----------
    series : Series
        A loaded series (:func:`kitchen.series.load_series`).
    settings : Settings, optional
        Reference temperature, viscosity, criteria, resolutions, uncertainty method,
        falling-head fit and capillary-rise option.
    windows : dict, optional
        Falling-head reading windows, ``{specimen: (start, stop)}``; a specimen without
        one gets the window the tool proposes.
    capillary_rises : dict, optional
        Measured capillary rises in the standpipe, ``{specimen: rise}``. [m]

    Returns
    -------
    pandas.DataFrame
        One row per specimen and method (``constant_head``, ``falling_head``), in SI, with
        the specimen state, ``gradient`` (largest used), ``temperature`` [degC], ``k`` and
        ``k_reference`` [m/s] with ``k_reference_low``/``k_reference_high`` (the 95 %
        interval combining the fit with the measurement resolutions), ``valid`` (True only
        when every applicable criterion passes), ``checks`` (the failed criteria in words
        with their numbers, then notes on the data and the fit), ``notes`` (how k was
        obtained: window, fit, capillary rise) and ``verdicts`` (every criterion, passed,
        failed or not applicable, as :class:`kitchen.validity.Verdict`).

    Raises
    ------
    ValueError
        When a specimen's readings cannot be reduced (the message names the specimen and
        the row).
    """
    settings = settings or Settings()
    windows = windows or {}
    capillary_rises = capillary_rises or {}
    state = specimen_state(series.specimens)
    rows = []
    by_id = state.set_index("specimen", drop=False)
    if not series.constant_head.empty:
        collections = collection_table(
            series.constant_head, state, settings.reference_temperature, settings.viscosity
        )
        for specimen in pd.unique(collections["specimen"]):
            analysis = constant_head_analysis(collections, by_id.loc[specimen], settings)
            rows.append(
                result_row(by_id.loc[specimen], "constant_head", analysis, analysis.gradient_max)
            )
    if not series.falling_head.empty:
        for specimen, readings in series.falling_head.groupby("specimen", sort=False):
            try:
                analysis = falling_head_analysis(
                    readings,
                    by_id.loc[specimen],
                    settings,
                    window=windows.get(specimen),
                    capillary_rise=capillary_rises.get(specimen),
                )
            except ValueError as error:
                raise ValueError(f"{series.name}, falling-head readings: {error}") from error
            rows.append(
                result_row(by_id.loc[specimen], "falling_head", analysis, analysis.gradient_start)
            )
    frame = pd.DataFrame(rows)
    order = {specimen: index for index, specimen in enumerate(state["specimen"])}
    frame = frame.sort_values(
        ["specimen", "method"], key=lambda c: c.map(order) if c.name == "specimen" else c
    )
    return frame.reset_index(drop=True)


def _checks_text(valid: bool, checks: list[str]) -> str:
    if valid:
        return "; ".join(["every criterion met", *checks])
    return "; ".join(checks)


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
        ``k20_low [m/s]``, ``k20_high [m/s]`` (the 95 % interval), ``n_readings``,
        ``valid``, ``checks`` (starting "every criterion met" when valid) and ``notes``.
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
            "checks": [
                _checks_text(v, c) for v, c in zip(results["valid"], results["checks"], strict=True)
            ],
            "notes": results["notes"].map("; ".join),
        }
    )
    return table
