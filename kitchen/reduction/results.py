"""The results table: one row per specimen and test method.

:func:`series_results` reduces every test of a series with the settings given and
returns a frame in SI units; :func:`results_table` renames and scales it into the
exported table, whose headers carry their units (``dry_density [Mg/m3]``,
``k20 [m/s]``…).
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from kitchen.io import Series
from kitchen.settings import Settings, reference_label
from kitchen.specimen import final_state, specimen_state
from kitchen.water import viscosity_range_caution

from .constant_head import constant_head_analysis
from .constant_head_collections import collection_table
from .falling_head import falling_head_analysis
from .flexible_wall import condition_result, permeation_state

__all__ = ["series_results", "results_table", "result_row"]

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


def result_row(state_row, method, analysis, gradient, settings: Settings | None = None) -> dict:
    """One row of the results table, from a specimen's state and one test's analysis.

    `settings` are those the analysis was made with: where its viscosity formula is used
    outside the temperatures it holds at (:func:`kitchen.water.viscosity_range_caution`,
    on the test's mean temperature), the caution joins the row's ``checks``.
    """
    settings = settings or Settings()
    caution = viscosity_range_caution(
        analysis.temperature, settings.reference_temperature, settings.viscosity
    )
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
        checks=list(analysis.checks) + _state_checks(state_row) + ([caution] if caution else []),
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
    stress_limits: tuple = (None, None),
) -> pd.DataFrame:
    """Reduce every test in a series.

    Parameters
    ----------
    series : Series
        A loaded series (:func:`kitchen.io.load_series`).
    settings : Settings, optional
        Reference temperature, viscosity, criteria, resolutions, uncertainty method,
        falling-head fit and capillary-rise option.
    windows : dict, optional
        Falling-head reading windows, ``{specimen: (start, stop)}``; a specimen without
        one gets the window the tool proposes.
    capillary_rises : dict, optional
        Measured capillary rises in the standpipe, ``{specimen: rise}``. [m]
    stress_limits : tuple of (float or None, float or None), optional
        The effective stress of a flexible-wall test the specification asks for, lowest and
        highest. [Pa]

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
        failed or not applicable, as :class:`kitchen.validity.criteria.Verdict`).

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
    permeation = permeation_state(state, series.flexible_wall)
    rows = []
    by_id = state.set_index("specimen", drop=False)
    permeated = permeation.set_index("specimen", drop=False)
    changes = final_state(series.specimens).set_index("specimen")["change"]

    def conditions(row: dict) -> dict:
        specimen = row["specimen"]
        return condition_result(
            row,
            permeated.loc[specimen],
            series.flexible_wall,
            series.b_value_checks,
            by_id.loc[specimen].get("flow_direction"),
            stress_limits,
            settings.criteria.minimum_b_value,
            changes.get(specimen),
        )

    if not series.constant_head.empty:
        collections = collection_table(
            series.constant_head, permeation, settings.reference_temperature, settings.viscosity
        )
        for specimen in pd.unique(collections["specimen"]):
            analysis = constant_head_analysis(collections, permeated.loc[specimen], settings)
            rows.append(
                conditions(
                    result_row(
                        by_id.loc[specimen],
                        "constant_head",
                        analysis,
                        analysis.gradient_max,
                        settings,
                    )
                )
            )
    if not series.falling_head.empty:
        for specimen, readings in series.falling_head.groupby("specimen", sort=False):
            try:
                analysis = falling_head_analysis(
                    readings,
                    permeated.loc[specimen],
                    settings,
                    window=windows.get(specimen),
                    capillary_rise=capillary_rises.get(specimen),
                )
            except ValueError as error:
                raise ValueError(f"{series.name}, falling-head readings: {error}") from error
            rows.append(
                conditions(
                    result_row(
                        by_id.loc[specimen],
                        "falling_head",
                        analysis,
                        analysis.gradient_start,
                        settings,
                    )
                )
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
        ``valid``, ``checks`` (starting "every criterion met" when valid) and ``notes``;
        where the series has flexible-wall tests, after ``gradient``: ``cell`` and the
        effective stress across the specimen at the largest head, ``effective_stress [kPa]``
        (mean), ``effective_stress_inflow [kPa]`` and ``effective_stress_outflow [kPa]``.
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
    if "effective_stress" in results.columns:  # the series has flexible-wall tests
        at = table.columns.get_loc("gradient") + 1
        for offset, (name, values) in enumerate(
            (
                ("cell", results["cell"]),
                ("effective_stress [kPa]", results["effective_stress"] / 1e3),
                ("effective_stress_inflow [kPa]", results["effective_stress_inflow"] / 1e3),
                ("effective_stress_outflow [kPa]", results["effective_stress_outflow"] / 1e3),
            )
        ):
            table.insert(at + offset, name, values.to_numpy())
    return table
