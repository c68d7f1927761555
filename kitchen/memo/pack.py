"""The memo pack: every chart, table and the report a reviewer needs, written in one go.

:func:`export_memo_pack` writes, into one folder:

- ``results.csv`` and ``results.xlsx`` (sheets ``specimens``, ``tests``, ``fits``,
  ``checks``, ``revisions``, ``kept tests`` and ``cautions``), every text cell
  spreadsheet-safe;
- ``charts/plotly.min.js`` (:data:`CHART_SCRIPT`): plotly.js, once for the whole pack;
- ``charts/NAME.html`` (interactive, loading ``plotly.min.js`` beside it), ``charts/NAME.png``
  and ``charts/NAME.svg`` (static, through kaleido and Chromium) for each chart;
- ``report.html``: the specimens table, the charts (loading ``charts/plotly.min.js``), every
  revision of the data and every test kept on record (who, when, what, why), the methods
  and their sources, the criteria applied, the cautions and the provenance, which names
  the version, size and SHA-256 of the plotly.js the pages run;
- ``report.docx``: the same report as a document a word processor opens (summary, tables,
  the PNG charts, methods with their sources, cautions, provenance;
  :mod:`kitchen.memo.documents`);
- ``manifest.csv``, last: every file above with its size and SHA-256
  (:mod:`kitchen.memo.manifest`), so a reviewer can check the pack received is the pack
  exported, and a pack with a manifest is known to be whole.

The pages load plotly.js by relative paths and make no request to the network, so the pack
opens offline wherever its folder goes, whole: copied, moved, or zipped and unzipped. A
reviewer receives the pack as one folder or one zip; a chart page sent on its own, or
opened from inside a zip without unzipping, finds no plotly.js and says so. With
``self_contained=True`` (``report --self-contained``) every HTML page inlines plotly.js
instead and stands alone, for a page that must travel by itself (the PNG and SVG charts
always do), at about 4.8 MB a page.

Every item carries the cautions. The pack is built in a folder beside `out` and swapped
in whole once its manifest is written (:class:`kitchen.memo.manifest.StagedPack`): `out`
holds the previous pack or the new one, never a mixture, whatever stops the export. A
pack is refused before any file is written when images are asked for without Chromium,
when `out` is the series' own folder or inside it, and when `out` holds anything but a
whole pack the tool wrote; a failure part-way removes the files it wrote beside `out` and
leaves `out` as it was. The previous pack is removed only once the new one is in place,
and only the files it can be proven to hold (listed in its manifest, SHA-256 matching).

The charts are built in :mod:`kitchen.memo.figures`, their static images made in
:mod:`kitchen.memo.images` and the workbook, with the cautions, written in
:mod:`kitchen.memo.workbook`.
"""

from __future__ import annotations

import time
from collections.abc import Callable
from dataclasses import asdict, dataclass, is_dataclass
from datetime import UTC, datetime
from pathlib import Path

from kitchen import display_units
from kitchen.analysis import ANALYSIS_METHODS, SeriesAnalysis
from kitchen.cautions import CAUTIONS
from kitchen.io import spreadsheet_safe
from kitchen.revisions import kept_log_sha256, standing_choices
from kitchen.revisions import window_log_sha256 as window_log_digest
from kitchen.settings import Settings, reference_label
from kitchen.workspace import Workspace

from ._export import PackWriter, PlainFigures, request_images, write_chart_files
from .documents import memo_document
from .figures import memo_charts
from .images import FIRST_IMAGE_TIMEOUT as FIRST_IMAGE_TIMEOUT
from .images import PNG_SCALE as PNG_SCALE
from .images import start_image_export
from .manifest import StagedPack
from .markup import ChartScript
from .pages import REDUCTION_METHODS, report_page
from .provenance import Provenance, memo_provenance, start_hashing
from .specimen_pages import (
    report_pages,
    specimen_links,
    write_report_images,
    write_report_pages,
)
from .tables import (
    checks_table,
    fits_table,
    kept_tests_table,
    revisions_table,
    specimens_table,
)
from .workbook import notes_sheet, setting_texts, workbook_bytes

__all__ = ["CHART_SCRIPT", "PACK_SPECIMEN_LIMIT", "MemoPack", "export_memo_pack"]

PACK_SPECIMEN_LIMIT = 1000
"""The most specimens one memo pack holds: a chart page (and its images) per specimen and
one report a reviewer reads through. A larger series is refused before any work, with
this number, rather than reduced for minutes first (10⁴ specimens took some five minutes
without images, two of them before the first file); split it by batch or effort."""

CHART_SCRIPT = "charts/plotly.min.js"
"""Where a pack keeps plotly.js, ``/``-separated from the pack's folder; pages load it by a
path relative to their own folder."""


@dataclass(frozen=True)
class MemoPack:
    """The files a memo export wrote, with the analysis and provenance behind them.

    Iterating over a pack gives its files; ``seconds`` is how long the export took. [s]
    """

    folder: Path
    files: tuple[Path, ...]
    analysis: SeriesAnalysis
    provenance: Provenance
    seconds: float
    manifest: Path | None = None
    """``manifest.csv``: every file of `files` with its size and SHA-256."""
    removed: tuple[Path, ...] = ()
    """Files of a pack exported before into the same folder that this one no longer has."""

    def __iter__(self):
        return iter(self.files)

    def __len__(self) -> int:
        return len(self.files)


def _criterion_text(analysis: SeriesAnalysis, ku, label: str) -> str:
    """The criterion of an analysis in words, in the unit `ku`: ``criterion k20 ≤ 1×10⁻⁹
    m/s (largest k allowed)``, or, without one, that none was given and no verdict drawn."""
    criterion = analysis.criterion
    if criterion is None:
        return "no criterion given: no verdicts drawn"
    return (
        f"criterion {label} {criterion.symbol} "
        f"{display_units.scientific(criterion * ku.factor)} {ku.unit} ({criterion.words})"
    )


def _caption(provenance: Provenance, criterion_text: str) -> list[str]:
    return [f"Caution: {text}" for text in CAUTIONS] + [
        f"kitchen {provenance.tool_version} · series {provenance.series} · "
        f"{provenance.created} · {criterion_text} · "
        f"{provenance.revision_count} revision(s) applied"
    ]


# --- the export ------------------------------------------------------------------------------


def _settings_dict(settings: Settings) -> dict:
    """Every field of the settings, nested ones flattened (``criteria.steady_count``)."""
    flat = {}

    def walk(prefix: str, value) -> None:
        if is_dataclass(value) and not isinstance(value, type):
            value = asdict(value)
        if isinstance(value, dict):
            for key, item in value.items():
                walk(f"{prefix}.{key}" if prefix else str(key), item)
        else:
            flat[prefix] = value

    walk("", settings)
    return flat


def _windows_text(windows: dict | None, choices) -> str:
    """The falling-head reading windows in force, in words, for the provenance."""
    if not windows:
        return "proposed by the tool for every specimen"
    standing = standing_choices(choices)
    parts = []
    for specimen, (start, stop) in windows.items():
        choice = standing.get(specimen)
        if choice is not None and not choice.proposed:
            who = f"{choice.who}, " if choice.who else ""
            parts.append(
                f"{specimen}: file rows {choice.first_row}-{choice.last_row} "
                f"({who}{choice.when}: {choice.reason})"
            )
        else:
            parts.append(f"{specimen}: readings {start + 1}-{stop}")
    return "chosen for " + "; ".join(parts) + "; proposed by the tool for the others"


def export_memo_pack(
    workspace: Workspace,
    out: str | Path,
    *,
    criterion: float | None = None,
    criterion_source: str | None = None,
    k_unit: str = "m/s",
    density_unit: str = "Mg/m³",
    images: bool = True,
    self_contained: bool = False,
    progress: Callable[[int, int, str], None] | None = None,
) -> MemoPack:
    """Write the memo pack of a series into the folder `out`.

    Parameters
    ----------
    workspace : Workspace
        The series as opened (:class:`kitchen.workspace.Workspace`): its effective data,
        settings, reading windows on record and capillary rises; every specimen's
        reduction is taken from it, so the charts show the k of the tables and no
        specimen is reduced twice.
    out : str or pathlib.Path
        Folder for the pack; created when missing.
    criterion : float or Criterion, optional
        Largest conductivity allowed (a number), or a :class:`kitchen.analysis.Criterion` of
        either kind (a drainage layer's smallest k required), from the project
        specification; it overrides the series' own. [m/s] None (the default): the
        criterion of the series' project table, and where it has none, no verdict is drawn
        and the report says so (:meth:`kitchen.workspace.Workspace.analysis`).
    criterion_source : str, optional
        Where a `criterion` given here comes from, in words, for the report and the
        provenance (``"given on the command line"``); default ``"given for this export"``.
    k_unit : {"m/s", "cm/s"}
        Conductivity unit of the charts and the report.
    density_unit : {"Mg/m³", "kN/m³", "lb/ft³"}
        Density unit of the charts and the report (ASCII spellings accepted).
    images : bool, default True
        Write PNG and SVG beside each chart's HTML (needs Chromium).
    self_contained : bool, default False
        Inline plotly.js in every HTML page, so that each opens on its own (about 4.8 MB a
        page). By default it is written once, as :data:`CHART_SCRIPT`, and every page
        loads it: a pack many times smaller, which opens as a whole folder.
    progress : callable, optional
        Called as ``progress(done, total, what)`` before each file is written.

    Returns
    -------
    MemoPack

    Raises
    ------
    ImageExportUnavailable
        With `images`, when no Chromium is found (before any file is written).
    ValueError
        When the criterion or a unit is not understood, or the series has more than
        :data:`PACK_SPECIMEN_LIMIT` specimens (before any work is done).
    PackFolderError
        When `out` is the series' folder, inside it, or holds anything but a whole pack
        the tool wrote (before any file is written).
    OSError
        When an input cannot be read or the folder cannot be written (a full disk): `out`
        is then left as it was.
    """
    from plotly.offline import get_plotlyjs, get_plotlyjs_version

    started, clock = datetime.now(UTC), time.perf_counter()
    settings, series = workspace.settings, workspace.series
    windows, window_choices = workspace.windows, workspace.window_choices
    capillary_rises = workspace.capillary_rises
    effective = workspace.effective
    ku, du = display_units.k_unit(k_unit), display_units.density_unit(density_unit)
    if images:
        start_image_export()
    out = Path(out)
    count = len(workspace.specimen_ids())
    if count > PACK_SPECIMEN_LIMIT:
        raise ValueError(
            f"{series.source}: {count} specimens, more than the {PACK_SPECIMEN_LIMIT} one memo "
            "pack holds (a chart page per specimen, one report to read through); split the "
            "series (by batch or compaction effort) and report each part. Nothing was written"
        )
    # refuses the series' folder, and a folder holding what the tool did not write
    staged = StagedPack(out, inputs=(series.source,))
    hashes = start_hashing(workspace.input_files)  # on a thread, while the series is reduced
    results = workspace.results()
    given = criterion
    _, source = workspace.criterion_in_force(given)
    if given is not None:
        source = criterion_source or "given for this export"
    analysis = workspace.analysis(given)
    criterion = analysis.criterion
    label = reference_label(settings)
    criterion_text = _criterion_text(analysis, ku, label)
    chosen = {
        **setting_texts(_settings_dict(settings)),
        "criterion [m/s]": "none given" if criterion is None else f"{criterion:g}",
        "criterion kind": "none given" if criterion is None else criterion.kind,
        "criterion from": source,
        "k unit": ku.unit,
        "density unit": du.unit,
        "confidence": f"{analysis.confidence:g}",
        "compaction curve": "quadratic",
        "reading windows": _windows_text(windows, window_choices),
        "window log SHA-256": (window_choices and window_log_digest(series.source))
        or "no window log",
        "kept-tests log SHA-256": (workspace.kept_tests and kept_log_sha256(series.source))
        or "no kept-tests log",
        "measured capillary rises": ", ".join(
            f"{specimen}: {1e3 * rise:.1f} mm" for specimen, rise in capillary_rises.items()
        )
        if capillary_rises
        else "none (see capillary_rise)",
    }
    provenance = memo_provenance(
        workspace.input_files,
        series.name,
        series.source,
        chosen,
        effective.revision_count,
        effective.log_path if effective.log_sha256 else None,
        effective.log_sha256,
        started,
        hashes,
    )
    caption = _caption(provenance, criterion_text)
    # every image is asked for as soon as its figure exists, before the first file is
    # written: Chromium draws the charts while the next charts and the test pages are
    # built, and the rest while the tables and pages are written
    chart_images: dict = {}
    page_images = None
    plain = PlainFigures()  # each figure's dict and fragment, made once for pages and images

    def ask(name: str, figure) -> None:
        if images:
            chart_images.update(request_images([(name, figure)], caption, plain))

    charts, skipped = memo_charts(workspace, analysis, ku.unit, du.unit, on_chart=ask)
    tables = {
        "specimens": specimens_table(analysis, ku.unit, du.unit),
        "tests": workspace.results_table(),
        "fits": fits_table(analysis),
        "checks": checks_table(results, analysis, skipped),
        "revisions": revisions_table(workspace.revisions),
        "kept tests": kept_tests_table(workspace.kept_tests),
    }
    script = ChartScript(
        get_plotlyjs(), get_plotlyjs_version(), None if self_contained else CHART_SCRIPT
    )
    formats = ("html", "png", "svg") if images else ("html",)
    steps = ["results.csv", "results.xlsx"]
    if script.path is not None:
        steps.append(script.path)
    steps += [f"charts/{name}.{ext}" for name, _, _ in charts for ext in formats]
    pages = report_pages(workspace, results, ku, label)
    steps += [f"specimens/{page.name}.html" for page in pages]
    steps += ["report.html", "report.docx"]
    steps += [f"specimens/{page.name}.{ext}" for page in pages for ext in formats[1:]]
    write = PackWriter(staged, steps, progress)
    if images:
        page_images = request_images([(page.name, page.figure) for page in pages], caption, plain)
    with staged:
        write(
            "results.csv",
            "table",
            lambda: spreadsheet_safe(tables["tests"]).to_csv(index=False).encode("utf-8"),
        )
        notes = notes_sheet(provenance, criterion_text, analysis.counts)
        write("results.xlsx", "workbook", lambda: workbook_bytes(tables, notes))
        if script.path is not None:  # before any page that loads it
            write(script.path, "script", lambda: script.content)
        pngs = write_chart_files(
            write, charts, CAUTIONS, provenance, script, caption, images, chart_images, plain
        )
        write_report_pages(write, pages, CAUTIONS, caption, script, images, plain)
        fragments = [(name, title, plain.html(figure, name)) for name, title, figure in charts]
        write(
            "report.html",
            "report",
            lambda: report_page(
                analysis,
                tables,
                fragments,
                script,
                provenance,
                CAUTIONS,
                ku,
                du,
                criterion_text,
                skipped,
                source,
                specimen_links([(p.name, p.specimen, p.method) for p in pages]),
            ).encode("utf-8"),
        )
        write(
            "report.docx",
            "document",
            lambda: memo_document(
                analysis,
                tables,
                pngs,
                provenance,
                CAUTIONS,
                criterion_text,
                REDUCTION_METHODS + ANALYSIS_METHODS,
            ),
        )
        # the test pages' images last: Chromium draws them while the report and the
        # document (which embeds the charts' PNGs only) are written
        if images:
            write_report_images(write, pages, page_images)
        manifest, removed = staged.finish()
    return MemoPack(
        out,
        tuple(write.written),
        analysis,
        provenance,
        time.perf_counter() - clock,
        manifest,
        removed,
    )
