"""The memo's charts: the series charts the data allow and one chart per specimen and method.

:func:`memo_charts` builds them with the same reading windows and capillary rises as the
results table, so each specimen chart shows the k of its row, and says in a sentence why
any chart was not drawn. Each specimen chart is given a file name of its own.
"""

from __future__ import annotations

import re

import pandas as pd

from kitchen.analysis import SeriesAnalysis
from kitchen.io import Series
from kitchen.reduction import collection_table, constant_head_analysis, falling_head_analysis
from kitchen.settings import Settings
from kitchen.specimen import specimen_state

__all__ = ["memo_charts"]


def _safe_name(text: str, taken: set) -> str:
    name = re.sub(r"[^A-Za-z0-9._-]+", "_", str(text)).strip("._") or "specimen"
    candidate, number = name, 2
    while candidate.lower() in taken:
        candidate, number = f"{name}_{number}", number + 1
    taken.add(candidate.lower())
    return candidate


def memo_charts(
    series: Series,
    analysis: SeriesAnalysis,
    settings: Settings,
    k_unit_name: str = "m/s",
    density_unit_name: str = "Mg/m³",
    windows: dict | None = None,
    capillary_rises: dict | None = None,
) -> tuple[list[tuple[str, str, object]], list[str]]:
    """Every chart of the memo, and why any chart was not drawn.

    The specimen charts are reduced with the same `windows` and `capillary_rises` as
    :func:`kitchen.reduction.results.series_results`, so each shows the k of the results table.

    Returns
    -------
    charts : list of (file name, title, plotly Figure)
        The series charts the data allow, then one chart per specimen and method.
    skipped : list of str
        A sentence for each chart left out.
    """
    from kitchen import charts

    built, skipped = [], []
    series_charts = (
        (
            "compaction_conductivity",
            "Compaction and hydraulic conductivity",
            lambda: charts.compaction_conductivity_figure(analysis, k_unit_name, density_unit_name),
        ),
        (
            "conductivity_void_ratio",
            "Hydraulic conductivity against void ratio",
            lambda: charts.conductivity_trend_figure(
                analysis, "void_ratio", k_unit_name, density_unit_name
            ),
        ),
        (
            "conductivity_dry_density",
            "Hydraulic conductivity against dry density",
            lambda: charts.conductivity_trend_figure(
                analysis, "dry_density", k_unit_name, density_unit_name
            ),
        ),
        (
            "conductivity_water_content",
            "Hydraulic conductivity against water content relative to optimum",
            lambda: charts.conductivity_trend_figure(
                analysis, "water_content_from_optimum", k_unit_name, density_unit_name
            ),
        ),
    )
    for name, title, build in series_charts:
        try:
            built.append((name, title, build()))
        except ValueError as error:
            skipped.append(f"{title}: not drawn ({error})")
    windows, rises = windows or {}, capillary_rises or {}
    reference = settings.reference_temperature
    state = specimen_state(series.specimens).set_index("specimen", drop=False)
    taken: set = set()
    for specimen, readings in series.falling_head.groupby("specimen", sort=False):
        name = "specimen_" + _safe_name(f"{specimen}_falling_head", taken)
        try:
            record = falling_head_analysis(
                readings,
                state.loc[specimen],
                settings,
                windows.get(specimen),
                capillary_rise=rises.get(specimen),
            )
            figure = charts.falling_head_figure(readings, record, k_unit_name, reference)
        except (ValueError, KeyError) as error:
            skipped.append(f"specimen {specimen}, falling head: not drawn ({error})")
            continue
        built.append((name, f"Specimen {specimen}: falling head", figure))
    if not series.constant_head.empty:
        collections = collection_table(
            series.constant_head, state.reset_index(drop=True), reference, settings.viscosity
        )
        for specimen in pd.unique(collections["specimen"]):
            name = "specimen_" + _safe_name(f"{specimen}_constant_head", taken)
            try:
                record = constant_head_analysis(collections, state.loc[specimen], settings)
                figure = charts.constant_head_figure(record, k_unit_name, reference)
            except (ValueError, KeyError) as error:
                skipped.append(f"specimen {specimen}, constant head: not drawn ({error})")
                continue
            built.append((name, f"Specimen {specimen}: constant head", figure))
    return built, skipped
