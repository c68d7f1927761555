"""The tables of the memo pack: specimens with their verdicts, the fits, the checks, and
what the engineer changed or kept on record.

Each function returns a new frame whose headers carry their units (``k20 [m/s]``,
``dry_density [Mg/m3]``, ``water_content [%]``); these are the ``specimens``, ``fits``,
``checks``, ``revisions`` and ``kept tests`` sheets of ``results.xlsx`` and the tables of
the report. The ``tests`` sheet is :func:`kitchen.reduction.results.results_table`.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from kitchen import display_units
from kitchen.analysis import SeriesAnalysis
from kitchen.revisions import history_table
from kitchen.settings import reference_label

__all__ = [
    "specimens_table",
    "fits_table",
    "checks_table",
    "revisions_table",
    "kept_tests_table",
    "FIT_COLUMNS",
    "REVISION_COLUMNS",
    "KEPT_TEST_COLUMNS",
]

FIT_COLUMNS = ["fit", "subject", "quantity", "value", "low", "high", "unit", "n", "note"]
"""Columns of :func:`fits_table`; ``low`` and ``high`` bound the interval where there is one."""


def specimens_table(
    analysis: SeriesAnalysis, k_unit: str = "m/s", density_unit: str = "Mg/m3"
) -> pd.DataFrame:
    """One row per specimen: state, the k kept, its interval, verdict and predictions.

    Parameters
    ----------
    analysis : SeriesAnalysis
    k_unit : {"m/s", "cm/s"}, default "m/s"
        Unit of every conductivity column (the report's unit).
    density_unit : {"Mg/m3", "kN/m3", "lb/ft3"}, default "Mg/m3"
        Unit of the dry density; kN/m3 gives the dry unit weight γd = ρd·g_n
        (``dry_unit_weight [kN/m3]``).

    Returns
    -------
    pandas.DataFrame
        ``specimen``, ``effort``, ``method``, ``water_content [%]``,
        ``dry_density [Mg/m3]``, ``void_ratio``, ``saturation [%]``, ``specific_gravity``,
        ``d10 [mm]``, ``k20 [m/s]``, ``k20_low [m/s]``, ``k20_high [m/s]`` (k and the
        density in the units chosen), ``valid``,
        ``kept_on_record`` (the engineer's keep of a test not valid, in words; "" for
        none), ``verdict`` (not judged where the test is not valid and not kept),
        ``in_acceptable_zone`` (empty where no zone is drawn, or the specimen has no water
        content: there is no zone for it to lie in), ``water_content_from_optimum [%]``,
        and where a d10 is
        given ``hazen_prediction [m/s]``, ``chapuis_prediction [m/s]`` and
        ``grading_note`` (predictions, not measurements).
    """
    rows = analysis.specimens
    label = reference_label(analysis.reference_temperature)
    ku, du = display_units.k_unit(k_unit), display_units.density_unit(density_unit)
    k_text = ku.unit
    density_name = "dry_unit_weight" if du.symbol == "γd" else "dry_density"
    density_text = f"{density_name} [{du.unit.replace('³', '3')}]"
    table = pd.DataFrame(
        {
            "specimen": rows["specimen"].astype(str),
            "effort": rows["effort"],
            "method": rows["method"],
            "water_content [%]": rows["water_content"] * 100.0,
            density_text: rows["dry_density"] * du.factor,
            "void_ratio": rows["void_ratio"],
            "saturation [%]": pd.to_numeric(rows["saturation"], errors="coerce") * 100.0,
            "specific_gravity": rows["specific_gravity"],
            "d10 [mm]": rows["d10"] * 1000.0,
            f"{label} [{k_text}]": rows["k"] * ku.factor,
            f"{label}_low [{k_text}]": rows["k_low"] * ku.factor,
            f"{label}_high [{k_text}]": rows["k_high"] * ku.factor,
            "valid": rows["valid"].astype(bool),
            "kept_on_record": rows["kept_on_record"],
            "verdict": rows["verdict"],
            "in_acceptable_zone": analysis.zone_membership(),
            "water_content_from_optimum [%]": rows["water_content_from_optimum"] * 100.0,
        }
    )
    if analysis.grading is not None:
        grading = analysis.grading.set_index("specimen")
        for method in ("hazen", "chapuis"):
            predicted = table["specimen"].map(grading[f"{method}_k"]) * ku.factor
            table[f"{method}_prediction [{k_text}]"] = predicted
        table["grading_note"] = table["specimen"].map(grading["note"])
    return table.reset_index(drop=True)


def _row(fit, subject, quantity, value, unit, low=np.nan, high=np.nan, n=np.nan, note=""):
    return dict(
        fit=fit,
        subject=subject,
        quantity=quantity,
        value=value,
        low=low,
        high=high,
        unit=unit,
        n=n,
        note=note,
    )


def _trend_rows(name, subject, trend, per: str, scale: float) -> list[dict]:
    """Rows of a log10-k trend: slope (per unit of x shown), intercept, r²."""
    fit = trend.fit
    level = f"{100 * trend.confidence:g} % interval"
    return [
        _row(
            name,
            subject,
            "slope of log10 k",
            fit.slope / scale,
            f"decades per {per}",
            fit.slope_low / scale,
            fit.slope_high / scale,
            trend.n,
            level,
        ),
        _row(
            name,
            subject,
            "intercept of log10 k [m/s]",
            fit.intercept,
            "log10(m/s)",
            fit.intercept_low,
            fit.intercept_high,
            trend.n,
            f"at x = 0; {level}",
        ),
        _row(name, subject, "r²", fit.r_squared, "–", n=trend.n),
        _row(
            name,
            subject,
            "residual standard deviation",
            fit.residual_standard_deviation,
            "decades",
            n=trend.n,
        ),
    ]


def fits_table(analysis: SeriesAnalysis) -> pd.DataFrame:
    """Every fit of the analysis, one quantity a row, with its interval where it has one.

    Parameters
    ----------
    analysis : SeriesAnalysis

    Returns
    -------
    pandas.DataFrame
        Columns :data:`FIT_COLUMNS`: compaction curves (optimum water content [%] and
        maximum dry density [Mg/m3] per effort), the line of optimums, the acceptable zone,
        the trends of log10 k against e (with Ck), ρd and w − w_opt, and the geometric
        mean [m/s].
    """
    rows = []
    for effort, curve in analysis.compaction_curves.items():
        name = f"compaction curve ({curve.method})"
        if curve.peak_found:
            rows.append(
                _row(
                    name,
                    effort,
                    "optimum water content",
                    100 * curve.optimum_water_content,
                    "%",
                    n=curve.n,
                    note=curve.message,
                )
            )
            rows.append(
                _row(
                    name,
                    effort,
                    "maximum dry density",
                    curve.maximum_dry_density / 1000.0,
                    "Mg/m3",
                    n=curve.n,
                    note=curve.message,
                )
            )
        else:
            rows.append(
                _row(
                    name,
                    effort,
                    "optimum water content",
                    np.nan,
                    "%",
                    n=curve.n,
                    note=curve.message,
                )
            )
        if curve.residual_standard_deviation is not None:
            rows.append(
                _row(
                    name,
                    effort,
                    "residual standard deviation",
                    curve.residual_standard_deviation / 1000.0,
                    "Mg/m3",
                    n=curve.n,
                )
            )
    line = analysis.line_of_optimums
    if line is not None and line.slope is not None:
        low = high = np.nan
        if line.fit is not None:
            low, high = line.fit.slope_low / 1e5, line.fit.slope_high / 1e5
        efforts = ", ".join(map(str, line.efforts))
        rows.append(
            _row(
                "line of optimums",
                efforts,
                "slope",
                line.slope / 1e5,
                "Mg/m3 per %",
                low,
                high,
                len(line.efforts),
            )
        )
        rows.append(
            _row(
                "line of optimums",
                efforts,
                "dry density at w = 0",
                line.intercept / 1000.0,
                "Mg/m3",
                n=len(line.efforts),
            )
        )
    zone = analysis.acceptable_zone
    if zone is not None:
        corners = "; ".join(
            f"({100 * w:.2f} %, {rho / 1000:.4f} Mg/m3)" for w, rho in zone.vertices
        )
        rows.append(
            _row(
                "acceptable zone",
                zone.kind,
                "specimens that meet",
                zone.n_meeting,
                "specimens",
                n=zone.n_meeting + zone.n_not_meeting,
                note=f"{zone.method}; corners (w, ρd): {corners or 'none'}"
                + (f"; {zone.message}" if zone.message else ""),
            )
        )
    trend = analysis.void_ratio_trend
    if trend is not None:
        rows += _trend_rows(
            "log k against void ratio (Tavenas)", "specimens judged", trend, "unit e", 1.0
        )
        rows.append(
            _row(
                "log k against void ratio (Tavenas)",
                "specimens judged",
                "change index Ck",
                trend.change_index,
                "–",
                trend.change_index_low,
                trend.change_index_high,
                trend.n,
                trend.message or f"rule of thumb 0.5·e0 = {trend.change_index_rule:.3g}",
            )
        )
    if analysis.dry_density_trend is not None:
        rows += _trend_rows(
            "log k against dry density",
            "specimens judged",
            analysis.dry_density_trend,
            "Mg/m3",
            1e-3,
        )
    if analysis.water_content_trend is not None:
        rows += _trend_rows(
            "log k against w − w_opt",
            "specimens judged, of efforts with an optimum",
            analysis.water_content_trend,
            "% of water content",
            100.0,
        )
    mean = analysis.geometric_mean
    if mean is not None:
        rows.append(
            _row(
                "geometric mean",
                "specimens judged",
                f"geometric mean of {reference_label(analysis.reference_temperature)}",
                mean.geometric_mean,
                "m/s",
                mean.low,
                mean.high,
                mean.n,
                f"{100 * mean.confidence:g} % interval",
            )
        )
        rows.append(
            _row(
                "geometric mean",
                "specimens judged",
                "standard deviation of log10 k",
                mean.log10_standard_deviation,
                "decades",
                n=mean.n,
            )
        )
    return pd.DataFrame(rows, columns=FIT_COLUMNS)


def checks_table(results: pd.DataFrame, analysis: SeriesAnalysis, skipped=()) -> pd.DataFrame:
    """Every check that did not pass, one a row, then the series' notes.

    Parameters
    ----------
    results : pandas.DataFrame
        :func:`kitchen.reduction.series_results` (``specimen``, ``method``, ``checks``: a list
        of sentences, or text).
    analysis : SeriesAnalysis
        Its ``notes`` become rows for the series.
    skipped : iterable of str
        Charts not drawn, and why.

    Returns
    -------
    pandas.DataFrame
        ``specimen``, ``method``, ``check``; a test whose checks all passed gets one row
        saying so.
    """
    rows = []
    for _, result in results.iterrows():
        checks = result.get("checks", [])
        if isinstance(checks, str):
            checks = [c for c in checks.split("; ") if c and c != "all checks passed"]
        elif not isinstance(checks, list | tuple):
            checks = []
        for check in checks or ["all checks passed"]:
            rows.append((str(result["specimen"]), result["method"], str(check)))
    for note in list(analysis.notes) + list(skipped):
        rows.append(("(series)", "analysis", str(note)))
    return pd.DataFrame(rows, columns=["specimen", "method", "check"])


REVISION_COLUMNS = [
    "id",
    "status",
    "when",
    "who",
    "table",
    "specimen",
    "reading_row",
    "value",
    "old → new",
    "as typed",
    "reason",
]
"""Columns of :func:`revisions_table`."""


def revisions_table(revisions) -> pd.DataFrame:
    """Every row of a series' revision log: what changed, who, when and why.

    Parameters
    ----------
    revisions : sequence of kitchen.revisions.Revision
        The log's rows, in order (:attr:`kitchen.workspace.Workspace.revisions`).

    Returns
    -------
    pandas.DataFrame
        Columns :data:`REVISION_COLUMNS`, one row per row of the log: ``status`` (in
        force, withdrawn by…, withdraws…), ``table``, ``specimen``, ``reading_row`` (the
        reading's row in its file, for a reading), ``value`` (the column revised),
        ``old → new`` with the units of the file (for a withdrawal: the value withdrawn →
        the value restored), ``as typed`` (the new value as typed, where its unit differs
        from the file's) and ``reason``.
    """
    rows = []
    for revision, status in zip(revisions, history_table(revisions)["status"], strict=True):
        withdrawal = revision.action == "withdraw"
        new = revision.new_value if withdrawal else revision.applied_value
        typed = ""
        if not withdrawal and revision.new_value != revision.applied_value:
            typed = revision.new_value
        rows.append(
            (
                revision.id,
                status,
                revision.when,
                revision.who,
                revision.table,
                revision.specimen,
                "" if revision.reading_row is None else str(revision.reading_row),
                revision.field,
                f"{revision.old_value or '(empty)'} → {new or '(empty)'}",
                typed,
                revision.reason,
            )
        )
    return pd.DataFrame(rows, columns=REVISION_COLUMNS)


KEPT_TEST_COLUMNS = ["id", "status", "when", "who", "specimen", "test", "reason"]
"""Columns of :func:`kept_tests_table`."""


def kept_tests_table(rows) -> pd.DataFrame:
    """Every row of a series' kept-tests log: the tests kept on record despite a failed
    check, and the keeps withdrawn.

    Parameters
    ----------
    rows : sequence of kitchen.revisions.KeptTest
        The log's rows, in order (:attr:`kitchen.workspace.Workspace.kept_tests`).

    Returns
    -------
    pandas.DataFrame
        Columns :data:`KEPT_TEST_COLUMNS`; ``status`` is ``in force``, ``withdrawn by …``
        or ``withdraws …``.
    """
    withdrawn_by = {row.withdraws: row.id for row in rows if row.withdrawal}
    out = []
    for row in rows:
        if row.withdrawal:
            status = f"withdraws {row.withdraws}"
        elif row.id in withdrawn_by:
            status = f"withdrawn by {withdrawn_by[row.id]}"
        else:
            status = "in force"
        test = row.method.replace("_", " ")
        out.append((row.id, status, row.when, row.who, row.specimen, test, row.reason))
    return pd.DataFrame(out, columns=KEPT_TEST_COLUMNS)
