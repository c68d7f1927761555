"""One report page per test: every item the standards ask a report to hold, stated or marked.

:func:`report_items` gathers, for one specimen and test method, the items ASTM D5084 and
ISO 17892-11 list for a test report — identification, preparation, description, cell and
method, permeant, the flexible-wall conditions, the gradients, the state before, during and
after the test, the temperatures, k at the test temperature and corrected, the last k values
with their outflow/inflow, the checks and the deviations — each as a :class:`ReportItem`
whose value is the recorded one or :data:`NOT_RECORDED` (or why it does not apply), never
silently missing. :func:`specimen_page` lays them out as one HTML page with the test's
record over time (:func:`kitchen.charts.flow_record_figure`), the cautions, and a link back
to the series report.

The lists of report items are from memory of ASTM D5084 (its Report section) and ISO
17892-11 (clause 7, test report); each item names the standard that lists it, and a clause
number is never quoted. Check them against a licensed copy before relying on the page for
a signed report.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

import numpy as np
import pandas as pd

from kitchen.reduction import FlowRecord

from .markup import cautions_markup, escape, page_markup, table_markup

__all__ = [
    "NOT_RECORDED",
    "ReportItem",
    "ReportPage",
    "page_name",
    "report_pages",
    "report_items",
    "specimen_page",
    "specimen_links",
]

NOT_RECORDED = "not recorded"
"""What a report item without a recorded value says."""

_BOTH = "ASTM D5084; ISO 17892-11"
_D5084 = "ASTM D5084"
_FLEXIBLE_ONLY = "not applicable: rigid-wall cell"


@dataclass(frozen=True)
class ReportItem:
    """One item of a test report: its section, name, value in words, and who lists it."""

    section: str
    item: str
    value: str
    listed_in: str

    @property
    def recorded(self) -> bool:
        return self.value != NOT_RECORDED


def page_name(specimen: str, method: str) -> str:
    """The file name (without extension) of a test's page: safe in a path and a URL."""
    safe = re.sub(r"[^A-Za-z0-9._-]+", "_", str(specimen)).strip("._") or "specimen"
    return f"{safe}_{method}"


def _number(value, unit: str = "", digits: int = 4, scale: float = 1.0) -> str:
    if value is None or (isinstance(value, float) and not math.isfinite(value)) or pd.isna(value):
        return NOT_RECORDED
    text = f"{float(value) * scale:.{digits}g}"
    return f"{text} {unit}".strip()


def _text(value) -> str:
    if value is None or pd.isna(value) or not str(value).strip():
        return NOT_RECORDED
    return str(value).strip()


def _k(value, ku) -> str:
    if value is None or pd.isna(value) or not math.isfinite(float(value)):
        return NOT_RECORDED
    return f"{float(value) * ku.factor:.3g} {ku.unit}"


def _method_words(method: str, prepared: pd.Series) -> str:
    if method == "constant_head":
        return "constant head"
    tailwater = prepared.get("tailwater_standpipe_area")
    if tailwater is not None and not pd.isna(tailwater):
        return "falling head, rising tailwater (two burettes)"
    return "falling head, constant tailwater"


def report_items(
    workspace,
    specimen: str,
    method: str,
    row: dict,
    analysis,
    flow: FlowRecord | None,
    final: pd.Series | None,
    ku,
    reference: str,
) -> list[ReportItem]:
    """Every item a report of one test holds, each stated or marked :data:`NOT_RECORDED`.

    Parameters
    ----------
    workspace : Workspace
        The series as opened.
    specimen, method : str
        The test (``falling_head`` or ``constant_head``).
    row : dict
        Its row of :meth:`kitchen.workspace.Workspace.results`.
    analysis : FallingHeadAnalysis or ConstantHeadAnalysis
    flow : FlowRecord or None
    final : pandas.Series or None
        Its row of :func:`kitchen.specimen.final_state`.
    ku : DisplayUnit
        The k unit.
    reference : str
        The corrected k's name (``k20``).

    Returns
    -------
    list of ReportItem

    References
    ----------
    ASTM D5084, Report; ISO 17892-11, test report (both from memory).
    """
    prepared = workspace.prepared_state(specimen)
    permeated = workspace.permeation_state(specimen)
    project = workspace.project_settings
    series = workspace.series
    flexible = series.flexible_wall[series.flexible_wall["specimen"] == specimen]
    checks = series.b_value_checks[series.b_value_checks["specimen"] == specimen]
    is_flexible = not flexible.empty
    conditions = flexible.iloc[0] if is_flexible else None
    items: list[ReportItem] = []

    def add(section, item, value, listed_in=_BOTH):
        items.append(ReportItem(section, item, value, listed_in))

    section = "Identification"
    add(section, "project", _text(project["project"].value if "project" in project else None))
    add(section, "series", series.name)
    add(section, "specimen", str(specimen))
    add(section, "source or boring", _text(prepared.get("boring")))
    add(section, "sample", _text(prepared.get("sample")))
    add(section, "depth", _number(prepared.get("depth"), "m", 3))

    section = "Soil and preparation"
    add(section, "soil description or classification", _text(prepared.get("description")))
    add(section, "preparation (compacted how, to what target)", _text(prepared.get("preparation")))
    add(section, "compactive effort", _text(prepared.get("effort")))
    add(section, "specific gravity Gs used", _number(prepared.get("specific_gravity"), "", 3))

    section = "Cell, method and permeant"
    add(section, "permeameter", str(permeated.get("cell", "rigid wall")))
    add(section, "method", _method_words(method, prepared))
    add(section, "flow direction", _text(prepared.get("flow_direction")))
    add(section, "permeant water", _text(prepared.get("permeant")))
    for item, column in (
        ("headwater standpipe (burette) area", "standpipe_area"),
        ("tailwater burette area", "tailwater_standpipe_area"),
    ):
        value = _number(prepared.get(column), "mm²", 4, 1e6)
        add(section, item, value if method == "falling_head" else "not applicable: constant head")

    section = "Saturation and consolidation"
    if is_flexible:
        add(section, "cell pressure", _number(conditions["cell_pressure"], "kPa", 4, 1e-3))
        add(section, "back pressure", _number(conditions["back_pressure"], "kPa", 4, 1e-3))
        add(
            section,
            "effective consolidation stress (cell less back pressure)",
            _number(conditions["cell_pressure"] - conditions["back_pressure"], "kPa", 4, 1e-3),
        )
        if len(checks):
            last = checks.iloc[-1]
            b = last["pore_pressure_increment"] / last["cell_pressure_increment"]
            value = f"{b:.2f} (last of {len(checks)} checks)"
        else:
            value = _number(conditions.get("b_value"), "", 3)
        add(section, "B-value at the end of saturation", value)
        add(
            section,
            "height and diameter during permeation",
            f"{permeated['height'] * 1e3:.2f} mm × {permeated['diameter'] * 1e3:.2f} mm "
            f"({permeated['dimensions_note']})",
        )
    else:
        for item in (
            "cell pressure",
            "back pressure",
            "effective consolidation stress (cell less back pressure)",
            "B-value at the end of saturation",
        ):
            add(section, item, _FLEXIBLE_ONLY, _D5084)
        add(section, "height and diameter during permeation", "as prepared (rigid-wall cell)")

    section = "Specimen before and after"
    w0 = prepared.get("water_content")
    add(section, "initial diameter", _number(prepared["diameter"], "mm", 4, 1e3))
    add(section, "initial height", _number(prepared["height"], "mm", 4, 1e3))
    add(section, "dry mass", _number(prepared["dry_mass"], "g", 5, 1e3))
    add(
        section,
        "initial (moist) mass",
        _number(prepared["dry_mass"] * (1 + w0), "g", 5, 1e3) + " (dry mass × (1 + w))"
        if w0 is not None and not pd.isna(w0)
        else NOT_RECORDED,
    )
    add(section, "initial water content", _number(w0, "%", 3, 100))
    add(section, "initial dry density", _number(prepared["dry_density"], "Mg/m³", 4, 1e-3))
    add(section, "initial void ratio", _number(prepared["void_ratio"], "", 3))
    add(section, "initial degree of saturation", _number(prepared["saturation"], "%", 3, 100))
    final = final if final is not None else pd.Series(dtype=object)
    add(section, "final diameter", _number(prepared.get("final_diameter"), "mm", 4, 1e3))
    add(section, "final height", _number(prepared.get("final_height"), "mm", 4, 1e3))
    add(section, "final (moist) mass", _number(prepared.get("final_mass"), "g", 5, 1e3))
    add(section, "final water content", _number(final.get("final_water_content"), "%", 3, 100))
    add(section, "final dry density", _number(final.get("final_dry_density"), "Mg/m³", 4, 1e-3))
    add(section, "final void ratio", _number(final.get("final_void_ratio"), "", 3))
    add(section, "final degree of saturation", _number(final.get("final_saturation"), "%", 3, 100))
    add(section, "change of volume during the test", _text(final.get("change")))

    section = "Test"
    gradient = row.get("gradient")
    if method == "falling_head":
        add(
            section,
            "hydraulic gradient (first and last reading used)",
            f"{analysis.gradient_start:.3g} to {analysis.gradient_end:.3g}",
        )
        add(section, "readings used", f"{analysis.stop - analysis.start} of {analysis.time.size}")
    else:
        add(section, "hydraulic gradient(s)", ", ".join(f"{g:.3g}" for g in analysis.gradient))
        add(section, "collections used", str(analysis.n))
    if is_flexible:
        add(
            section,
            "effective stress across the specimen (at the largest head)",
            f"mean {row['effective_stress'] / 1e3:.3g} kPa; inflow end "
            f"{row['effective_stress_inflow'] / 1e3:.3g} kPa, outflow end "
            f"{row['effective_stress_outflow'] / 1e3:.3g} kPa",
            _D5084,
        )
        direction = prepared.get("flow_direction")
        if direction in ("upward", "downward"):
            top, bottom = ("outflow", "inflow") if direction == "upward" else ("inflow", "outflow")
            value = (
                f"top {row[f'effective_stress_{top}'] / 1e3:.3g} kPa, bottom "
                f"{row[f'effective_stress_{bottom}'] / 1e3:.3g} kPa"
            )
        else:
            value = f"{NOT_RECORDED} (flow direction not recorded as upward or downward)"
        add(section, "effective stress at top and bottom", value, _D5084)
    else:
        add(section, "effective stress across the specimen", _FLEXIBLE_ONLY, _D5084)
    add(section, "test temperature (mean)", _number(row.get("temperature"), "°C", 3))
    add(section, "reference temperature", f"{workspace.settings.reference_temperature:g} °C")
    add(section, "k at the test temperature", _k(row.get("k"), ku))
    add(
        section,
        f"{reference}, corrected to the reference temperature",
        _k(row.get("k_reference"), ku)
        + (
            f" (95 % interval {_k(row.get('k_reference_low'), ku)} to "
            f"{_k(row.get('k_reference_high'), ku)})"
            if not pd.isna(row.get("k_reference"))
            else ""
        ),
    )
    add(
        section,
        "pore volumes of flow",
        f"{flow.total_pore_volumes:.3g}" if flow is not None else NOT_RECORDED,
        _D5084,
    )
    add(section, "gradient of the largest head", _number(gradient, "", 3))

    section = "Checks and deviations"
    add(section, "validity", "every criterion met" if row.get("valid") else "not valid")
    add(
        section,
        "checks",
        "; ".join(row.get("checks", [])) or "none failed",
    )
    add(section, "deviations from the procedure", _text(prepared.get("deviations")))
    return items


def _last_values(analysis, flow: FlowRecord | None, ku, reference: str) -> str:
    """The last k values judged, each with the outflow/inflow of its interval."""
    if hasattr(analysis, "value_k"):
        times, values = np.asarray(analysis.value_time), np.asarray(analysis.value_k)
    else:
        times, values = flow.k_time if flow is not None else [], np.asarray(analysis.k_each)
    rows = []
    for t, k in zip(times, values, strict=False):
        ratio = NOT_RECORDED
        if flow is not None and flow.ratio.size:
            nearest = int(np.argmin(np.abs(flow.ratio_time - t)))
            ratio = f"{flow.ratio[nearest]:.2f}"
        rows.append((f"{t / 3600:.4g}", _k(k, ku), escape(ratio)))
    if not rows:
        return f"<p>{NOT_RECORDED}</p>"
    return table_markup(
        ["time [h]", f"{escape(reference)}", "outflow/inflow"], rows, numeric=(0, 1, 2)
    )


def _b_checks(workspace, specimen: str) -> str:
    checks = workspace.series.b_value_checks
    mine = checks[checks["specimen"] == specimen]
    if mine.empty:
        return ""
    rows = [
        (
            _number(r["back_pressure"], "kPa", 4, 1e-3),
            _number(r["cell_pressure_increment"], "kPa", 4, 1e-3),
            _number(r["pore_pressure_increment"], "kPa", 4, 1e-3),
            f"{r['pore_pressure_increment'] / r['cell_pressure_increment']:.3f}",
        )
        for _, r in mine.iterrows()
    ]
    return "<h2>B-value checks during saturation</h2>" + table_markup(
        ["back pressure", "Δσ3", "Δu", "B = Δu/Δσ3"], rows, numeric=(0, 1, 2, 3)
    )


def specimen_page(
    items: list[ReportItem],
    title: str,
    figure_html: str,
    images: tuple[str, ...],
    last_values: str,
    b_checks: str,
    cautions,
    provenance_line: str,
    head_script: str,
    report_link: str = "../report.html",
) -> str:
    """The page of one test: its report items, its record over time, the cautions."""
    sections: dict[str, list[ReportItem]] = {}
    for item in items:
        sections.setdefault(item.section, []).append(item)
    body = [
        f"<h1>{escape(title)}</h1>",
        f'<p class="lede"><a href="{escape(report_link)}">back to the series report</a>. '
        f"{sum(i.recorded for i in items)} of {len(items)} report items recorded; the others "
        f"say “{NOT_RECORDED}” or why they do not apply.</p>",
        cautions_markup(cautions),
    ]
    for section, members in sections.items():
        body.append(f"<h2>{escape(section)}</h2>")
        body.append(
            table_markup(
                ["item", "value", "listed in"],
                [
                    (
                        escape(i.item),
                        f"<em>{escape(i.value)}</em>" if not i.recorded else escape(i.value),
                        escape(i.listed_in + " (from memory)"),
                    )
                    for i in members
                ],
            )
        )
    body.append(b_checks)
    body.append("<h2>Last k values and outflow/inflow</h2>" + last_values)
    body.append("<h2>The test over time</h2>")
    body.append(f'<div class="chart">{figure_html}</div>')
    if images:
        links = " · ".join(f'<a href="{escape(i)}">{escape(i)}</a>' for i in images)
        body.append(f'<p class="note">The same charts as images: {links}</p>')
    body.append("<h2>Cautions</h2>" + cautions_markup(cautions))
    body.append(f'<p class="note">{escape(provenance_line)}</p>')
    return page_markup(title, "\n".join(body), head_script)


def specimen_links(pages) -> str:
    """The list of test pages for the series report: ``pages`` of (name, specimen, method)."""
    if not pages:
        return ""
    items = "".join(
        f'<li><a href="specimens/{escape(name)}.html">{escape(specimen)}, '
        f"{escape(method.replace('_', ' '))}</a></li>"
        for name, specimen, method in pages
    )
    return (
        "<h2>Test reports, one page per test</h2><p>Every item the standards ask a test "
        f"report to hold, stated or marked “{NOT_RECORDED}”.</p><ul>{items}</ul>"
    )


@dataclass(frozen=True)
class ReportPage:
    """What one test's page is built from."""

    name: str
    specimen: str
    method: str
    title: str
    items: tuple[ReportItem, ...]
    figure: object
    last_values: str
    b_checks: str


def report_pages(workspace, results: pd.DataFrame, ku, reference: str) -> list[ReportPage]:
    """The page of every test of the series, in the order of the results."""
    from kitchen.charts import flow_record_figure
    from kitchen.specimen import final_state

    finals = final_state(workspace.series.specimens).set_index("specimen")
    pages = []
    for row in results.to_dict("records"):
        specimen, method = row["specimen"], row["method"]
        if method == "falling_head":
            analysis = workspace.falling_head(specimen)
        else:
            analysis = workspace.constant_head(specimen)
        flow = workspace.flow_record(specimen, method)
        title = f"Test report: specimen {specimen}, {method.replace('_', ' ')}"
        items = report_items(
            workspace,
            specimen,
            method,
            row,
            analysis,
            flow,
            finals.loc[specimen] if specimen in finals.index else None,
            ku,
            reference,
        )
        figure = flow_record_figure(
            flow,
            f"{specimen}: the test over time",
            ku.unit,
            reference,
            (
                workspace.settings.criteria.flow_ratio_low,
                workspace.settings.criteria.flow_ratio_high,
            ),
        )
        pages.append(
            ReportPage(
                page_name(specimen, method),
                str(specimen),
                method,
                title,
                tuple(items),
                figure,
                _last_values(analysis, flow, ku, reference),
                _b_checks(workspace, specimen),
            )
        )
    return pages


def write_report_pages(write, pages, cautions, caption, script, images: bool, plain=None) -> None:
    """Write each test's page (``specimens/NAME.html``), linking, with `images`, the PNG and
    SVG of its record over time (:func:`write_report_images` writes them).

    `write` is called as ``write(relative, kind, data)``; `script` is the pack's
    :class:`kitchen.memo.markup.ChartScript`; the last line of `caption` is the page's
    provenance line; the figures' dicts and fragments come from `plain`
    (:class:`kitchen.memo._export.PlainFigures`) when it is given.
    """
    from ._export import figure_html

    for page in pages:
        shown = tuple(f"{page.name}.{ext}" for ext in ("png", "svg") if images)
        write(
            f"specimens/{page.name}.html",
            "test page",
            lambda p=page, i=shown: specimen_page(
                list(p.items),
                p.title,
                figure_html(p.figure, p.name, plain),
                i,
                p.last_values,
                p.b_checks,
                cautions,
                caption[-1],
                script.element("specimens"),
            ).encode("utf-8"),
        )


def write_report_images(write, pages, requested: dict) -> None:
    """Write the PNG and SVG of each test's record over time (``specimens/NAME.png`` and
    ``.svg``) as Chromium hands them back: `requested` holds them by (page name, format),
    asked for with the caption already (:func:`kitchen.memo._export.request_images`)."""
    from .images import image_result

    for page in pages:
        for ext in ("png", "svg"):
            write(
                f"specimens/{page.name}.{ext}",
                "test page",
                lambda r=requested[page.name, ext]: image_result(r),
            )
