"""The memo pack: every chart, table and the report a reviewer needs, written in one go.

:func:`export_memo_pack` writes, into one folder:

- ``results.csv`` and ``results.xlsx`` (sheets ``specimens``, ``tests``, ``fits``,
  ``checks`` and ``cautions``), every text cell spreadsheet-safe;
- ``charts/plotly.min.js`` (:data:`CHART_SCRIPT`): plotly.js, once for the whole pack;
- ``charts/NAME.html`` (interactive, loading ``plotly.min.js`` beside it), ``charts/NAME.png``
  and ``charts/NAME.svg`` (static, through kaleido and Chromium) for each chart;
- ``report.html``: the specimens table, the charts (loading ``charts/plotly.min.js``), the
  methods and their sources, the criteria applied, the cautions and the provenance, which
  names the version, size and SHA-256 of the plotly.js the pages run;
- ``manifest.csv``, last: every file above with its size and SHA-256
  (:mod:`kitchen.pack_manifest`), so a reviewer can check the pack received is the pack
  exported, and a pack with a manifest is known to be whole.

The pages load plotly.js by relative paths and make no request to the network, so the pack
opens offline wherever its folder goes, whole: copied, moved, or zipped and unzipped. A
reviewer receives the pack as one folder or one zip; a chart page sent on its own, or
opened from inside a zip without unzipping, finds no plotly.js and says so. With
``self_contained=True`` (``report --self-contained``) every HTML page inlines plotly.js
instead and stands alone, for a page that must travel by itself (the PNG and SVG charts
always do), at about 4.8 MB a page.

Every item carries the cautions. Every file goes through
:func:`kitchen.files.atomic_write_bytes`, so each is whole or absent. A pack is refused
before any file is written when images are asked for without Chromium; a failure part-way
leaves the files already written, plotly.js first among the pages, so every page present
can draw its charts, and no new manifest. Exporting again into the same folder removes the
files the previous manifest lists that the new pack no longer has, and nothing else.
"""

from __future__ import annotations

import io
import math
import posixpath
import re
import threading
import time
from collections.abc import Callable
from dataclasses import asdict, dataclass, is_dataclass
from datetime import UTC, datetime
from pathlib import Path

import numpy as np
import pandas as pd

from . import CAUTIONS, __version__, display_units
from .constant_head import collection_table, constant_head_analysis
from .falling_head import falling_head_analysis
from .files import atomic_write_bytes, spreadsheet_safe
from .memo_tables import checks_table, fits_table, specimens_table
from .pack_manifest import read_manifest, write_manifest
from .provenance import Provenance, memo_provenance
from .report_html import ChartScript, chart_page, report_page
from .results import Settings, reference_label, results_table, series_results
from .series import Series
from .series_analysis import SeriesAnalysis, analyse_series
from .specimen import specimen_state
from .window_log import standing_choices

__all__ = [
    "CHART_SCRIPT",
    "MEMO_CAUTIONS",
    "ImageExportUnavailable",
    "MemoPack",
    "memo_charts",
    "workbook_bytes",
    "start_image_export",
    "figure_image",
    "export_memo_pack",
]

MEMO_CAUTIONS = CAUTIONS + (
    "ASTM D5084 itself says its results apply to the field with caution and by qualified "
    "personnel.",
)
"""The cautions every exported item carries: :data:`kitchen.CAUTIONS` and ASTM D5084's own."""

CHART_SCRIPT = "charts/plotly.min.js"
"""Where a pack keeps plotly.js, ``/``-separated from the pack's folder; pages load it by a
path relative to their own folder."""

PNG_SCALE = 2
"""PNG pixels per layout pixel: a 980-pixel chart prints 16 cm wide at about 300 dpi."""

_CHROMIUM_HELP = (
    "static chart export (PNG, SVG) needs Chromium and found none: install Debian's "
    "chromium package (apt-get install chromium), or set BROWSER_PATH to a Chromium or "
    "Chrome executable"
)


class ImageExportUnavailable(RuntimeError):
    """Static images cannot be made on this machine (no Chromium for kaleido)."""


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


# --- charts ----------------------------------------------------------------------------------


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
    :func:`kitchen.results.series_results`, so each shows the k of the results table.

    Returns
    -------
    charts : list of (file name, title, plotly Figure)
        The series charts the data allow, then one chart per specimen and method.
    skipped : list of str
        A sentence for each chart left out.
    """
    from . import charts

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


def _browser_path() -> str | None:
    from choreographer.browsers.chromium import Chromium

    try:
        return Chromium.find_browser(skip_local=False)
    except (RuntimeError, ValueError, OSError):
        return None


_image_server = {"started": False, "answered": False}
FIRST_IMAGE_TIMEOUT = 180.0
"""Seconds to wait for Chromium to render the first image before giving up. [s]"""


def start_image_export() -> None:
    """Start kaleido's image server once per process, after checking for Chromium.

    Raises
    ------
    ImageExportUnavailable
        When no Chromium is found, naming what to install.
    """
    import kaleido

    if _image_server["started"]:
        return
    path = _browser_path()
    if path is None or not Path(path).exists():
        raise ImageExportUnavailable(_CHROMIUM_HELP)
    kaleido.start_sync_server(mathjax=False, silence_warnings=True)
    _image_server["started"] = True


def _render(figure_dict: dict, options: dict) -> bytes:
    """One image from the server; the first waits at most FIRST_IMAGE_TIMEOUT seconds.

    A Chromium that starts but cannot render would otherwise leave the call waiting for
    ever; after the first image has come back, calls are made directly.
    """
    import kaleido

    if _image_server["answered"]:
        return kaleido.calc_fig_sync(figure_dict, opts=options)
    outcome: dict = {}

    def first() -> None:
        try:
            outcome["image"] = kaleido.calc_fig_sync(figure_dict, opts=options)
        except Exception as error:  # handed to the caller below
            outcome["error"] = error

    worker = threading.Thread(target=first, daemon=True)
    worker.start()
    worker.join(FIRST_IMAGE_TIMEOUT)
    if "image" in outcome:
        _image_server["answered"] = True
        return outcome["image"]
    reason = outcome.get("error") or f"no answer within {FIRST_IMAGE_TIMEOUT:g} s"
    raise ImageExportUnavailable(
        f"Chromium was found but did not render a chart ({reason}); check that it starts "
        "headless on this machine (chromium --headless --no-sandbox)"
    )


def figure_image(figure, image_format: str) -> bytes:
    """A figure as PNG or SVG bytes through kaleido's image server (started when needed)."""
    start_image_export()
    layout = figure.layout
    options = dict(
        format=image_format,
        width=layout.width or 980,
        height=layout.height or 620,
        scale=PNG_SCALE if image_format == "png" else 1,
    )
    return _render(figure.to_dict(), options)


def _caption(provenance: Provenance, criterion_text: str) -> list[str]:
    return [f"Caution: {text}" for text in MEMO_CAUTIONS] + [
        f"kitchen {provenance.tool_version} · series {provenance.series} · "
        f"{provenance.created} · {criterion_text} · "
        f"{provenance.revision_count} revision(s) applied"
    ]


# --- workbook --------------------------------------------------------------------------------


def _cell(value):
    if value is None or value is pd.NA or value is pd.NaT:
        return None
    if isinstance(value, float | np.floating):
        return None if not math.isfinite(float(value)) else float(value)
    if isinstance(value, np.integer):
        return int(value)
    if isinstance(value, np.bool_):
        return bool(value)
    if isinstance(value, list | tuple):
        return "; ".join(map(str, value))
    return value


def workbook_bytes(sheets: dict[str, pd.DataFrame], notes: pd.DataFrame) -> bytes:
    """An .xlsx workbook of the sheets given, plus a ``cautions`` sheet, as bytes.

    Every text cell is made spreadsheet-safe (:func:`kitchen.files.spreadsheet_safe`).
    """
    from openpyxl import Workbook
    from openpyxl.styles import Font

    book = Workbook()
    book.remove(book.active)
    for name, frame in {**sheets, "cautions": notes}.items():
        sheet = book.create_sheet(name)
        safe = spreadsheet_safe(frame.map(_cell) if not frame.empty else frame)
        sheet.append([str(c) for c in safe.columns])
        for cell in sheet[1]:
            cell.font = Font(bold=True)
        for row in safe.itertuples(index=False):
            sheet.append([_cell(v) for v in row])
        sheet.freeze_panes = "A2"
        for index, column in enumerate(safe.columns, start=1):
            width = max([len(str(column))] + [len(str(v)) for v in safe[column].head(200)])
            sheet.column_dimensions[sheet.cell(1, index).column_letter].width = min(width + 2, 80)
    book.properties.creator = f"kitchen {__version__}"
    book.properties.description = " ".join(MEMO_CAUTIONS)
    buffer = io.BytesIO()
    book.save(buffer)
    return buffer.getvalue()


def _notes_sheet(provenance: Provenance, criterion_text: str) -> pd.DataFrame:
    rows = [("caution", text) for text in MEMO_CAUTIONS]
    rows.append(("criterion", criterion_text))
    rows += [("setting", f"{key} = {value}") for key, value in provenance.settings]
    rows += [("provenance", line) for line in provenance.lines()]
    return pd.DataFrame(rows, columns=["item", "text"])


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


def _figure_html(figure, name: str) -> str:
    """The figure as an HTML fragment without plotly.js (the page's head loads it)."""
    return figure.to_html(
        full_html=False,
        include_plotlyjs=False,
        div_id=f"chart-{name}",
        config={"displaylogo": False, "responsive": False},
    )


def export_memo_pack(
    series: Series,
    out: str | Path,
    *,
    settings: Settings | None = None,
    criterion: float = 1e-9,
    k_unit: str = "m/s",
    density_unit: str = "Mg/m³",
    results: pd.DataFrame | None = None,
    windows: dict | None = None,
    capillary_rises: dict | None = None,
    window_choices=(),
    window_log_sha256: str | None = None,
    images: bool = True,
    self_contained: bool = False,
    revision_count: int = 0,
    revision_log: str | Path | None = None,
    revision_log_sha256: str | None = None,
    progress: Callable[[int, int, str], None] | None = None,
) -> MemoPack:
    """Write the memo pack of a series into the folder `out`.

    Parameters
    ----------
    series : Series
        The series (its effective data, with revisions applied).
    out : str or pathlib.Path
        Folder for the pack; created when missing.
    settings : Settings, optional
        Reference temperature and viscosity method.
    criterion : float or Criterion, default 1e-9
        Largest conductivity allowed (a number), or a :class:`kitchen.trends.Criterion` of
        either kind (a drainage layer's smallest k required), from the project
        specification. [m/s]
    k_unit : {"m/s", "cm/s"}
        Conductivity unit of the charts and the report.
    density_unit : {"Mg/m³", "kN/m³", "lb/ft³"}
        Density unit of the charts and the report (ASCII spellings accepted).
    results : pandas.DataFrame, optional
        :func:`kitchen.results.series_results` of the series, when already reduced.
    windows : dict, optional
        Falling-head reading windows ``{specimen: (start, stop)}``; the others are
        proposed by the tool.
    capillary_rises : dict, optional
        Measured capillary rises ``{specimen: rise [m]}``, as for
        :func:`kitchen.results.series_results`.
    window_choices : sequence of WindowChoice, optional
        The rows of the series' window log (:func:`kitchen.window_log.read_window_choices`),
        so that the provenance names who chose each window, when and why.
    window_log_sha256 : str, optional
        SHA-256 of that log (:func:`kitchen.window_log.window_log_sha256`).
    images : bool, default True
        Write PNG and SVG beside each chart's HTML (needs Chromium).
    self_contained : bool, default False
        Inline plotly.js in every HTML page, so that each opens on its own (about 4.8 MB a
        page). By default it is written once, as :data:`CHART_SCRIPT`, and every page
        loads it: a pack many times smaller, which opens as a whole folder.
    revision_count, revision_log, revision_log_sha256 : optional
        The revisions applied (see :func:`kitchen.revisions.load_effective_series`).
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
        When the criterion or a unit is not understood.
    OSError
        When an input cannot be read or the folder cannot be written.
    """
    from plotly.offline import get_plotlyjs, get_plotlyjs_version

    from .charts import add_caption

    started, clock = datetime.now(UTC), time.perf_counter()
    settings = settings or Settings()
    ku, du = display_units.k_unit(k_unit), display_units.density_unit(density_unit)
    if images:
        start_image_export()
    out = Path(out)
    previous = read_manifest(out)  # an unreadable manifest stops the export here
    if results is None:
        results = series_results(series, settings, windows, capillary_rises)
    analysis = analyse_series(results, criterion, settings.reference_temperature)
    criterion = analysis.criterion
    label = reference_label(settings)
    criterion_text = (
        f"criterion {label} {criterion.symbol} "
        f"{display_units.scientific(criterion * ku.factor)} {ku.unit} ({criterion.words})"
    )
    chosen = {
        **_settings_dict(settings),
        "criterion [m/s]": f"{criterion:g}",
        "criterion kind": criterion.kind,
        "k unit": ku.unit,
        "density unit": du.unit,
        "confidence": f"{analysis.confidence:g}",
        "compaction curve": "quadratic",
        "reading windows": _windows_text(windows, window_choices),
        "window log SHA-256": window_log_sha256 or "no window log",
        "measured capillary rises": ", ".join(
            f"{specimen}: {1e3 * rise:.1f} mm" for specimen, rise in capillary_rises.items()
        )
        if capillary_rises
        else "none (see capillary_rise)",
    }
    provenance = memo_provenance(
        series.input_files,
        series.name,
        series.source,
        chosen,
        revision_count,
        revision_log,
        revision_log_sha256,
        started,
    )
    charts, skipped = memo_charts(
        series, analysis, settings, ku.unit, du.unit, windows, capillary_rises
    )
    tables = {
        "specimens": specimens_table(analysis),
        "tests": results_table(results, settings),
        "fits": fits_table(analysis),
        "checks": checks_table(results, analysis, skipped),
    }
    script = ChartScript(
        get_plotlyjs(), get_plotlyjs_version(), None if self_contained else CHART_SCRIPT
    )
    formats = ("html", "png", "svg") if images else ("html",)
    steps = ["results.csv", "results.xlsx"]
    if script.path is not None:
        steps.append(script.path)
    steps += [f"charts/{name}.{ext}" for name, _, _ in charts for ext in formats]
    steps.append("report.html")
    written: list[Path] = []

    def write(relative: str, kind: str, data: Callable[[], bytes]) -> None:
        if progress is not None:
            progress(len(written) + 1, len(steps), f"{kind} {relative}")
        written.append(atomic_write_bytes(out / relative, data()))

    write(
        "results.csv",
        "table",
        lambda: spreadsheet_safe(tables["tests"]).to_csv(index=False).encode("utf-8"),
    )
    notes = _notes_sheet(provenance, criterion_text)
    write("results.xlsx", "workbook", lambda: workbook_bytes(tables, notes))
    if script.path is not None:  # before any page that loads it
        write(script.path, "script", lambda: script.content)
    caption = _caption(provenance, criterion_text)
    for name, title, figure in charts:
        page = f"charts/{name}.html"
        write(
            page,
            "chart",
            lambda f=figure, n=name, t=title, p=page: chart_page(
                t, _figure_html(f, n), MEMO_CAUTIONS, provenance, script, posixpath.dirname(p)
            ).encode("utf-8"),
        )
        if images:
            captioned = add_caption(figure, caption)
            for ext in ("png", "svg"):
                write(
                    f"charts/{name}.{ext}", "chart", lambda c=captioned, e=ext: figure_image(c, e)
                )
    fragments = [(name, title, _figure_html(figure, name)) for name, title, figure in charts]
    write(
        "report.html",
        "report",
        lambda: report_page(
            analysis,
            tables,
            fragments,
            script,
            provenance,
            MEMO_CAUTIONS,
            ku,
            du,
            criterion_text,
            skipped,
        ).encode("utf-8"),
    )
    manifest, removed = write_manifest(out, written, previous)
    return MemoPack(
        out, tuple(written), analysis, provenance, time.perf_counter() - clock, manifest, removed
    )
