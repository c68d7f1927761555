"""The memo's charts: the series charts the data allow and one chart per specimen and method.

:func:`memo_charts` draws them from the workspace's own reductions, the ones its results
table holds, so each specimen chart shows the k of its row, and says in a sentence why
any chart was not drawn. Each specimen chart is given a file name of its own. The series
charts carry each specimen's id beside its marker where it has room
(:func:`kitchen.charts.label_specimens`), as a printed chart has no hover.
"""

from __future__ import annotations

import re

from kitchen.analysis import SeriesAnalysis
from kitchen.workspace import Workspace

__all__ = ["memo_charts"]


def _safe_name(text: str, taken: set) -> str:
    name = re.sub(r"[^A-Za-z0-9._-]+", "_", str(text)).strip("._") or "specimen"
    candidate, number = name, 2
    while candidate.lower() in taken:
        candidate, number = f"{name}_{number}", number + 1
    taken.add(candidate.lower())
    return candidate


def memo_charts(
    workspace: Workspace,
    analysis: SeriesAnalysis,
    k_unit_name: str = "m/s",
    density_unit_name: str = "Mg/m³",
    on_chart=None,
) -> tuple[list[tuple[str, str, object]], list[str]]:
    """Every chart of the memo, and why any chart was not drawn.

    The specimen charts draw the workspace's own reductions (the reading windows on
    record, the capillary rises set), the ones its results table holds: each chart
    shows the k of its row, and no specimen is reduced a second time.

    Parameters
    ----------
    workspace : Workspace
        The series as opened (:class:`kitchen.workspace.Workspace`).
    analysis : SeriesAnalysis
        The series analysis of the workspace's results.
    k_unit_name, density_unit_name : str
        Display units of the charts.
    on_chart : callable, optional
        Called as ``on_chart(name, figure)`` as soon as each chart is drawn, before the
        next is begun (the memo pack asks for its images there): the specimen charts
        first, then the series charts.

    Returns
    -------
    charts : list of (file name, title, plotly Figure)
        The series charts the data allow, then one chart per specimen and method.
    skipped : list of str
        A sentence for each chart left out.
    """
    from kitchen import charts

    # the specimen charts are drawn first: they need no more than the reductions, so a
    # caller asking for images in `on_chart` has them drawn while the series charts are
    # built; the series charts are listed first all the same
    series_built, specimen_built, series_skipped, specimen_skipped = [], [], [], []

    def add(built: list, name: str, title: str, figure) -> None:
        built.append((name, title, figure))
        if on_chart is not None:
            on_chart(name, figure)

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
    reference = workspace.settings.reference_temperature
    taken: set = set()
    for table, method, figure_of in (
        (
            "falling_head",
            "falling head",
            lambda specimen: charts.falling_head_figure(
                workspace.readings(specimen, "falling_head"),
                workspace.falling_head(specimen),
                k_unit_name,
                reference,
            ),
        ),
        (
            "constant_head",
            "constant head",
            lambda specimen: charts.constant_head_figure(
                workspace.constant_head(specimen), k_unit_name, reference
            ),
        ),
    ):
        for specimen in workspace.specimen_ids():
            if not workspace.has_readings(specimen, table):
                continue
            name = "specimen_" + _safe_name(f"{specimen}_{table}", taken)
            try:
                figure = figure_of(specimen)
            except (ValueError, KeyError) as error:
                specimen_skipped.append(f"specimen {specimen}, {method}: not drawn ({error})")
                continue
            add(specimen_built, name, f"Specimen {specimen}: {method}", figure)
    for name, title, build in series_charts:
        try:
            figure = charts.label_specimens(build())
        except ValueError as error:
            series_skipped.append(f"{title}: not drawn ({error})")
        else:
            add(series_built, name, title, figure)
    return series_built + specimen_built, series_skipped + specimen_skipped
