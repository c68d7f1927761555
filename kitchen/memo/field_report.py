"""The field-check report: field tests judged against a series' zone, written as a pack.

:func:`export_field_check` writes into one folder, as the memo pack does and with the same
provenance, manifest and cautions:

- ``field_check.csv`` (one row per test, in date order, with its verdict, distances,
  position against the line of optimums and saturation, predicted k20 and retest links)
  and ``field_check.xlsx`` (sheets ``tests``, ``lifts`` and ``cautions``);
- ``charts/field_tests_plane`` and ``charts/field_tests_by_date`` as HTML (loading
  ``charts/plotly.min.js``), PNG and SVG;
- ``field_check.html``: summary, counts per lift, the tests outside, every test, the
  charts, notes, methods with their sources, cautions and provenance;
- ``field_check.docx``: the same as a document a word processor opens;
- ``manifest.csv``, last.

The field tests are read, never written; the series is opened through the workspace, so
its zone is the memo's.
"""

from __future__ import annotations

import time
from collections.abc import Callable
from dataclasses import dataclass
from datetime import UTC, datetime
from pathlib import Path

import numpy as np
import pandas as pd

from kitchen import display_units
from kitchen.analysis import ANALYSIS_METHODS
from kitchen.cautions import CAUTIONS, FIELD_CAUTIONS
from kitchen.field import SAME_LOCATION, FieldCheck, check_field_tests, read_field_tests
from kitchen.io import spreadsheet_safe

from ._export import PackWriter, PlainFigures, write_chart_files
from .documents import (
    Bullets,
    Heading,
    Image,
    Paragraph,
    document_bytes,
    frame_table,
    methods_blocks,
    provenance_blocks,
)
from .images import start_image_export
from .manifest import StagedPack
from .markup import ChartScript, cautions_markup, escape, page_markup, table_markup
from .pages import provenance_markup
from .provenance import Provenance, memo_provenance
from .workbook import notes_sheet, workbook_bytes

__all__ = ["FieldReport", "export_field_check", "field_tests_table", "lifts_table"]

ALL_CAUTIONS = CAUTIONS + FIELD_CAUTIONS


@dataclass(frozen=True)
class FieldReport:
    """What :func:`export_field_check` wrote.

    Attributes
    ----------
    folder : pathlib.Path
    files : tuple of pathlib.Path
        Every file written, in order, the manifest last.
    check : FieldCheck
    provenance : Provenance
    seconds : float
    """

    folder: Path
    files: tuple[Path, ...]
    check: FieldCheck
    provenance: Provenance
    seconds: float


def field_tests_table(check: FieldCheck, density_unit: str = "Mg/m³", k_unit: str = "m/s"):
    """The judged field tests as the report shows and exports them: units in the headers,
    water contents and saturation in percent."""
    du, ku = display_units.density_unit(density_unit), display_units.k_unit(k_unit)
    t = check.tests
    a, b = check.field_tests.location
    d = du.unit.replace("³", "3")
    k = ku.unit
    return pd.DataFrame(
        {
            "test": t["test"],
            "date": t["date"].dt.strftime("%Y-%m-%d %H:%M"),
            "lift": t["lift"],
            f"{a} [m]": t[a],
            f"{b} [m]": t[b],
            "method": t["method"],
            "water_content [%]": 100 * t["water_content"],
            f"dry_density [{d}]": t["dry_density"] * du.factor,
            "dry_density_from": t["dry_density_from"],
            "verdict": t["verdict"],
            "on_edge": t["on_edge"],
            "water_content_distance [%]": 100 * t["water_content_distance"],
            f"dry_density_distance [{d}]": t["dry_density_distance"] * du.factor,
            "side": t["side"],
            "from_line_of_optimums [%]": 100 * t["from_optimum_line"],
            "saturation [%]": 100 * t["saturation"],
            "saturation_band": t["saturation_band"],
            f"k20_predicted [{k}]": t["k_predicted"] * ku.factor,
            f"k20_predicted_low [{k}]": t["k_predicted_low"] * ku.factor,
            f"k20_predicted_high [{k}]": t["k_predicted_high"] * ku.factor,
            "prediction_effort": t["prediction_effort"],
            "within_tested_states": t["within_tested_states"],
            "in_fitted_zone": t["in_fitted_zone"],
            "retest_of": t["retest_of"],
            "replaced_by": t["replaced_by"],
            "file_row": t["source_row"],
        }
    )


def lifts_table(check: FieldCheck) -> pd.DataFrame:
    """Counts per lift and overall, shares in percent."""
    lifts = check.lifts
    return lifts.assign(
        share_inside=100 * lifts["share_inside"],
        share_standing_inside=100 * lifts["share_standing_inside"],
    ).rename(
        columns={
            "share_inside": "share_inside [%]",
            "share_standing_inside": "share_standing_inside [%]",
        }
    )


def _frame_markup(frame: pd.DataFrame) -> str:
    numeric = [i for i, c in enumerate(frame.columns) if pd.api.types.is_float_dtype(frame[c])]

    def text(value):
        if isinstance(value, float):
            return escape("" if np.isnan(value) else f"{value:.4g}")
        if isinstance(value, bool | np.bool_):
            return "yes" if value else "no"
        return escape(value)

    rows = [[text(v) for v in row] for row in frame.itertuples(index=False)]
    return table_markup([escape(c) for c in frame.columns], rows, numeric=numeric)


def export_field_check(
    workspace,
    field_tests,
    out: str | Path,
    *,
    criterion=None,
    criterion_source: str | None = None,
    zone: str = "drawn",
    effort: str | None = None,
    same_location: float = SAME_LOCATION,
    k_unit: str = "m/s",
    density_unit: str = "Mg/m³",
    images: bool = True,
    self_contained: bool = False,
    progress: Callable[[int, int, str], None] | None = None,
) -> FieldReport:
    """Judge field tests against a series' zone and write the check report into `out`.

    Parameters
    ----------
    workspace : kitchen.workspace.Workspace
        The series whose zone the tests are held to.
    field_tests : str or pathlib.Path
        The field-tests table: the series folder (its ``field_tests.csv``), a workbook
        (its sheet ``field_tests``) or a CSV file (:func:`kitchen.field.read_field_tests`).
    out : str or pathlib.Path
        Folder for the report; created when missing.
    criterion : float or Criterion, optional
        Overrides the series' own criterion (its project table). [m/s]
    criterion_source : str, optional
        Where a `criterion` given here comes from, in words.
    zone : {"drawn", "fitted"}, default "drawn"
    effort : str, optional
        The laboratory effort whose fitted prediction applies to tests naming none.
    same_location : float, default :data:`kitchen.field.SAME_LOCATION`
        How close a later test of a lift is to be to replace an earlier one. [m]
    k_unit, density_unit : str
        Display units of the tables and charts.
    images : bool, default True
        PNG and SVG of the charts, and the charts in the ``.docx`` (needs Chromium).
    self_contained : bool, default False
        Inline plotly.js in every HTML page.
    progress : callable, optional
        ``progress(done, total, what)`` before each file is written.

    Returns
    -------
    FieldReport

    Raises
    ------
    kitchen.field.FieldTestsError
        A field-tests table that cannot be used (every problem named), before any file is
        written.
    ImageExportUnavailable
        With `images`, when no Chromium is found (before any file is written).
    """
    from plotly.offline import get_plotlyjs, get_plotlyjs_version

    from kitchen.charts import field_distance_figure, field_plane_figure

    started, clock = datetime.now(UTC), time.perf_counter()
    ku, du = display_units.k_unit(k_unit), display_units.density_unit(density_unit)
    tests = read_field_tests(field_tests)
    if images:
        start_image_export()
    out = Path(out)
    given = criterion
    _, source = workspace.criterion_in_force(given)
    if given is not None:
        source = criterion_source or "given for this export"
    analysis = workspace.analysis(given)
    series = workspace.series
    check = check_field_tests(
        tests,
        analysis,
        series=series.name,
        zone=zone,
        effort=effort,
        same_location=same_location,
    )
    criterion = analysis.criterion
    criterion_text = (
        "no criterion given: no zone"
        if criterion is None
        else f"criterion k20 {criterion.symbol} {display_units.scientific(criterion * ku.factor)} "
        f"{ku.unit} ({criterion.words})"
    )
    effective = workspace.effective
    settings = {
        "criterion [m/s]": "none given" if criterion is None else f"{criterion:g}",
        "criterion from": source,
        "zone judged against": zone,
        "effort for predictions": effort or "as each test names it, else the least favourable",
        "same location within [m]": f"{same_location:g}",
        "field tests": f"{tests.label} ({tests.source})",
        "k unit": ku.unit,
        "density unit": du.unit,
    }
    provenance = memo_provenance(
        (*workspace.input_files, tests.source),
        series.name,
        series.source,
        settings,
        effective.revision_count,
        effective.log_path if effective.log_sha256 else None,
        effective.log_sha256,
        started,
    )
    table = field_tests_table(check, du.unit, ku.unit)
    lifts = lifts_table(check)
    plane = field_plane_figure(check, analysis, du.unit)
    by_date = field_distance_figure(check, du.unit)
    charts = [
        ("field_tests_plane", "Field tests on the compaction plane", plane),
        ("field_tests_by_date", "Field tests by date: distance from the zone", by_date),
    ]
    script = ChartScript(
        get_plotlyjs(), get_plotlyjs_version(), None if self_contained else "charts/plotly.min.js"
    )
    formats = ("html", "png", "svg") if images else ("html",)
    steps = ["field_check.csv", "field_check.xlsx"]
    if script.path is not None:
        steps.append(script.path)
    steps += [f"charts/{name}.{ext}" for name, _, _ in charts for ext in formats]
    steps += ["field_check.html", "field_check.docx"]
    # refuses an input's folder, and a folder holding what the tool did not write
    staged = StagedPack(out, inputs=(series.source, tests.source))
    write = PackWriter(staged, steps, progress)
    with staged:
        return _write_report(
            staged, write, check, tests, table, lifts, charts, script, provenance, criterion_text,
            series.name, images, clock,
        )  # fmt: skip


def _write_report(
    staged, write, check, tests, table, lifts, charts, script, provenance, criterion_text,
    series_name, images, clock,
) -> FieldReport:  # fmt: skip
    """Write the files of the check report through `write`, then swap the report in."""

    write(
        "field_check.csv",
        "table",
        lambda: spreadsheet_safe(table).to_csv(index=False).encode("utf-8"),
    )
    notes = notes_sheet(provenance, criterion_text)
    notes = pd.concat(
        [
            pd.DataFrame([("caution", text) for text in FIELD_CAUTIONS], columns=notes.columns),
            notes,
            pd.DataFrame([("summary", check.summary)], columns=notes.columns),
        ],
        ignore_index=True,
    )
    write(
        "field_check.xlsx",
        "workbook",
        lambda: workbook_bytes({"tests": table, "lifts": lifts}, notes),
    )
    if script.path is not None:
        write(script.path, "script", lambda: script.content)
    caption = [f"Caution: {text}" for text in ALL_CAUTIONS] + [
        f"kitchen {provenance.tool_version} · series {series_name} · field tests "
        f"{tests.label} · {provenance.created} · {criterion_text}"
    ]
    plain = PlainFigures()  # each chart's dict and fragment, made once for both pages
    pngs = write_chart_files(
        write, charts, ALL_CAUTIONS, provenance, script, caption, images, plain=plain
    )
    methods = check.methods + tuple(m for m in ANALYSIS_METHODS if "zone" in m[0])
    outside = table[~check.tests["inside"].to_numpy(dtype=bool)]
    title = f"Field check: {tests.label} against {series_name}"
    fragments = "".join(
        f'<h3>{escape(t)}</h3><div class="chart">{plain.html(f, n)}</div>' for n, t, f in charts
    )
    notice, script_check = script.notice("")
    body = "\n".join(
        [
            f"<h1>{escape(title)}</h1>",
            f'<p class="lede">Exported {escape(provenance.created)} by kitchen '
            f"{escape(provenance.tool_version)}; {escape(criterion_text)}.</p>",
            notice + cautions_markup(ALL_CAUTIONS),
            "<h2>Summary</h2>",
            f"<p>{escape(check.summary)}.</p>",
            "<h2>Per lift</h2>",
            _frame_markup(lifts),
            "<h2>Tests outside the zone</h2>",
            _frame_markup(outside) if len(outside) else "<p>None.</p>",
            "<h2>Charts</h2>",
            fragments,
            "<h2>Every test</h2>",
            _frame_markup(table),
            "<h2>Notes</h2>",
            "<ul>" + "".join(f"<li>{escape(n)}</li>" for n in check.notes) + "</ul>"
            if check.notes
            else "<p>None.</p>",
            "<h2>Methods and their sources</h2>",
            table_markup(
                ["step", "method", "source"],
                [tuple(escape(x) for x in row) for row in methods],
            ),
            "<h2>Cautions</h2>",
            cautions_markup(ALL_CAUTIONS),
            "<h2>Provenance</h2>",
            provenance_markup(provenance, script),
            script_check,
        ]
    )
    write(
        "field_check.html",
        "report",
        lambda: page_markup(title, body, script.element("")).encode("utf-8"),
    )
    blocks = [
        Heading("Cautions"),
        Bullets(ALL_CAUTIONS),
        Heading("Summary"),
        Paragraph(f"{check.summary}. Against the {criterion_text}."),
        Heading("Per lift"),
        frame_table(lifts),
        Heading("Tests outside the zone"),
        frame_table(outside) if len(outside) else Paragraph("None."),
        Heading("Charts"),
        *([Image(png, t) for t, png in pngs] or [Paragraph("Exported without images.")]),
        Heading("Every test"),
        frame_table(table),
        Heading("Notes"),
        Bullets(check.notes or ("none",)),
        *methods_blocks(methods),
        *provenance_blocks(provenance),
    ]
    write("field_check.docx", "document", lambda: document_bytes(title, blocks))
    manifest, _ = staged.finish()
    return FieldReport(
        staged.out, (*write.written, manifest), check, provenance, time.perf_counter() - clock
    )
