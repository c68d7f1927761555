"""The HTML pages of the memo pack, built as text: the report of a series and one per chart.

The pages make no request to the network: styles are inline, and plotly.js, described by
a :class:`ChartScript`, is either a file of the pack that each page loads by a relative
path (``<script src="plotly.min.js">``), or inlined in every page. With a shared file, a
page opened without it (a chart mailed on its own, a page opened from inside a zip) shows
a notice saying what is missing instead of blank charts. :mod:`kitchen.memo.pack` turns the
figures into HTML and decides which. Every value that comes from the input (specimen ids,
effort labels, notes) is escaped. The markup the pages share, and :class:`ChartScript`, are
in :mod:`kitchen.memo.markup`.
"""

from __future__ import annotations

import pandas as pd

from kitchen.analysis import (
    ANALYSIS_METHODS,
    CHAPUIS_VALIDITY,
    DOES_NOT_MEET,
    HAZEN_VALIDITY,
    KOZENY_CARMAN_VALIDITY,
    MEETS,
    NO_CRITERION,
    NOT_CONCLUSIVE,
    NOT_JUDGED,
    SeriesAnalysis,
)
from kitchen.display_units import (
    DisplayUnit,
    column_format,
    distinct_texts,
    restate_conductivities,
    scientific,
)
from kitchen.settings import reference_label

from .markup import STYLE as STYLE
from .markup import ChartScript, cautions_markup, escape, number_text, page_markup, table_markup
from .provenance import Provenance

__all__ = ["REDUCTION_METHODS", "VERDICT_MARKS", "chart_page", "provenance_markup", "report_page"]

PERCENT = column_format("[%]")
"""Water content and saturation: to 0.1 % (the one format, as in the panels and the workbook)."""
VOID_RATIO = column_format("void_ratio")
"""Void ratio: to 0.001."""

REDUCTION_METHODS = (
    (
        "specimen state",
        "A = πD²/4, ρd = Ms/(A·L), e = Gs·ρw/ρd − 1, n = e/(1+e), S = w·Gs/e, ρw = 1.000 Mg/m³",
        "Das & Sobhan, Principles of Geotechnical Engineering; Holtz & Kovacs",
    ),
    (
        "constant head",
        "k = Q·L/(A·h·t), i = h/L; per specimen the slope of v on i through the origin",
        "ASTM D2434; ASTM D5084 Method A; ISO 17892-11",
    ),
    (
        "falling head",
        "k = a·L/(A·Δt)·ln(h1/h2); with many readings the least squares of ln h on t, "
        "k = −m·a·L/A; rising tailwater: a = a_in·a_out/(a_in + a_out)",
        "ASTM D5084 Methods B and C; ASTM D5856; ISO 17892-11; Draper & Smith",
    ),
    (
        "temperature",
        "k_ref = R_T·k_T, R_T = μ_T/μ_ref; drifting temperature: ln h fitted on ∫dt/R_T",
        "ASTM D5084, D5856, D2434; μ from Kestin, Sokolov & Wakeham (1978), IAPWS 2008 "
        "(Huber et al. 2009) or the ASTM D5084 equation",
    ),
    (
        "interval and validity",
        "95 % interval of k from the fit and the measurement resolutions; validity checks "
        "recorded per test (see Checks)",
        "JCGM 100:2008 (GUM); ASTM D5084 termination criteria; trend tests are the tool's own",
    ),
)
"""(step, method, source) of the test reductions (the README's methods table)."""

VERDICT_MARKS = {
    MEETS: "●",
    DOES_NOT_MEET: "○",
    NOT_CONCLUSIVE: "◎",
    NOT_JUDGED: "◍",
    NO_CRITERION: "◆",
}
"""The mark beside each verdict: the fill of its marker on the charts (a half-tone for a
test not judged; a solid marker in the ink colour for a valid test with no criterion to be
judged against)."""


def _script_row(script: ChartScript) -> tuple[str, str]:
    where = "inlined in every page"
    if script.path is not None:
        where = f"<code>{escape(script.path)}</code>"
    return (
        "chart script",
        f"plotly.js {escape(script.version)}, {where}, {len(script.content)} bytes, SHA-256 "
        f'<span class="hash">{script.sha256}</span>',
    )


def provenance_markup(provenance: Provenance, script: ChartScript) -> str:
    """The provenance as the report pages show it: tool, time, series, every setting, the
    revision log, the environment, plotly.js, and each input file with its SHA-256."""
    rows = [
        ("tool", f"kitchen {escape(provenance.tool_version)}"),
        ("exported", escape(provenance.created)),
        ("series", f"{escape(provenance.series)} (<code>{escape(provenance.source)}</code>)"),
    ]
    rows += [(f"setting: {escape(k)}", escape(v)) for k, v in provenance.settings]
    rows.append(("revisions applied", str(provenance.revision_count)))
    log = provenance.revision_log_sha256
    rows.append(
        (
            "revision log SHA-256",
            f'<span class="hash">{escape(log)}</span> '
            f"(<code>{escape(provenance.revision_log)}</code>)"
            if log
            else "no revision log",
        )
    )
    rows.append(("environment", escape(", ".join(f"{n} {v}" for n, v in provenance.environment))))
    rows.append(_script_row(script))
    rows = [(f'<span class="nowrap">{a}</span>', b) for a, b in rows]
    files = table_markup(
        ["input file", "bytes", "SHA-256"],
        [
            (f"<code>{escape(f.path)}</code>", str(f.size), f'<span class="hash">{f.sha256}</span>')
            for f in provenance.input_files
        ],
        numeric=(1,),
    )
    return table_markup(["item", "value"], rows) + files


def chart_page(
    title: str,
    figure_html: str,
    cautions,
    provenance: Provenance,
    script: ChartScript | None = None,
    folder: str = "",
) -> str:
    """A page holding one interactive chart, its cautions and a provenance line.

    Parameters
    ----------
    title : str
        The chart's title.
    figure_html : str
        The figure as an HTML fragment (``Figure.to_html(full_html=False, ...)``); with
        plotly.js inlined when `script` is None.
    cautions : iterable of str
    provenance : Provenance
    script : ChartScript, optional
        How the page gets plotly.js; None when `figure_html` carries it.
    folder : str, default ""
        The page's folder inside the pack, ``/``-separated (``charts``), from which the
        script's relative path is worked out.
    """
    line = (
        f"kitchen {escape(provenance.tool_version)} · series {escape(provenance.series)} · "
        f"exported {escape(provenance.created)} · {provenance.revision_count} revision(s) "
        "applied"
    )
    notice, check = script.notice(folder) if script is not None else ("", "")
    body = (
        f'<h1>{escape(title)}</h1>\n{notice}<div class="chart">{figure_html}</div>\n'
        f'{cautions_markup(cautions)}\n<p class="note">{line}</p>\n{check}'
    )
    return page_markup(title, body, script.element(folder) if script is not None else "")


def _specimen_rows(analysis: SeriesAnalysis, ku: DisplayUnit, du: DisplayUnit) -> list:
    rows = []
    # yes or no where a zone is drawn; "–" where there is no zone for the specimen to lie in
    zones = ["–" if pd.isna(v) else ("yes" if v else "no") for v in analysis.zone_membership()]
    for (_, row), zone in zip(analysis.specimens.iterrows(), zones, strict=True):
        interval = "–"
        k_text = ku.number.text(row["k"] * ku.factor, html=True)
        if pd.notna(row["k_low"]):
            low, high = distinct_texts(ku, row["k_low"], row["k_high"])
            interval = f"{low} – {high}"
        water = row["water_content"]
        saturation = pd.to_numeric(row["saturation"], errors="coerce")
        rows.append(
            (
                escape(row["specimen"]),
                escape(row["effort"]) if pd.notna(row["effort"]) else "–",
                escape(str(row["method"]).replace("_", " ")),
                PERCENT.text(100 * water),
                du.number.text(row["dry_density"] * du.factor),
                VOID_RATIO.text(row["void_ratio"]),
                PERCENT.text(100 * saturation),
                k_text,
                interval,
                _validity_text(row),
                f"{VERDICT_MARKS[row['verdict']]} {escape(row['verdict'])}",
                zone,
            )
        )
    return rows


def _validity_text(row) -> str:
    """The validity of a specimen's test, for the specimens table."""
    if bool(row["valid"]):
        return "yes"
    if row["kept_on_record"]:
        return "no, kept on record"
    return "no"


def _verdict_rule(analysis: SeriesAnalysis, label: str) -> str:
    """How a verdict is reached against the analysis's criterion, as HTML."""
    interval = f"{100 * analysis.confidence:g} % interval of {label}"
    if analysis.criterion is None:
        return (
            f"none drawn: no criterion was given (none typed, none in the series' project "
            f"table), so {VERDICT_MARKS[NO_CRITERION]} every valid test is marked "
            f"'{NO_CRITERION}' and no limit is assumed. Validity still shows: "
            f"{VERDICT_MARKS[NOT_JUDGED]} a test that failed a validity check is not judged, "
            "and is not used to fit the trends, unless the engineer keeps it on record with "
            "a reason."
        )
    if analysis.criterion.kind == "minimum":
        meets, fails = "lower end", "upper end"
        meets_how, fails_how = "at or above", "below"
    else:
        meets, fails = "upper end", "lower end"
        meets_how, fails_how = "at or below", "above"
    return (
        f"{VERDICT_MARKS[MEETS]} meets where the {meets} of the {interval} is {meets_how} "
        f"the criterion; {VERDICT_MARKS[DOES_NOT_MEET]} does not meet where its {fails} is "
        f"{fails_how} it; {VERDICT_MARKS[NOT_CONCLUSIVE]} not conclusive where the interval "
        f"straddles it. Validity comes first: {VERDICT_MARKS[NOT_JUDGED]} a test that failed a "
        "validity check is not judged (neither meets nor does not meet), and is not used to "
        "draw the acceptable zone or to fit the trends, unless the engineer keeps it on "
        "record with a reason (listed under Revisions and tests kept on record)."
    )


def _summary(analysis: SeriesAnalysis, ku: DisplayUnit, criterion_text: str) -> str:
    counts = analysis.counts
    words = ", ".join(f"{VERDICT_MARKS[v]} {escape(v)}: {counts[v]}" for v in analysis.verdicts)
    if analysis.criterion is None:
        parts = [
            "<p>No criterion given (none typed, none in the series' project table): no "
            "verdict is drawn and there is no acceptable zone. Give one in the series' "
            f"project table or with <code>--criterion</code>. {words} (of "
            f"{len(analysis.specimens)} specimens).</p>"
        ]
    else:
        parts = [
            f"<p>Against the {escape(criterion_text)}: {words} (of {len(analysis.specimens)} "
            "specimens).</p>"
        ]
    mean = analysis.geometric_mean
    if mean is not None:
        parts.append(
            f"<p>Geometric mean k = {scientific(mean.geometric_mean * ku.factor, html=True)} "
            f"{ku.unit} ({100 * mean.confidence:g} %: "
            f"{scientific(mean.low * ku.factor, html=True)} – "
            f"{scientific(mean.high * ku.factor, html=True)}), standard deviation of log10 k "
            f"{mean.log10_standard_deviation:.2f}, n = {mean.n}.</p>"
        )
    for effort, curve in analysis.compaction_curves.items():
        if curve.peak_found:
            parts.append(
                f"<p>Effort {escape(effort)}: optimum water content "
                f"{100 * curve.optimum_water_content:.1f} %, maximum dry density "
                f"{curve.maximum_dry_density / 1000:.3f} Mg/m³ ({escape(curve.method)} fit, "
                f"n = {curve.n}).</p>"
            )
    return "".join(parts)


def _fit_number(value, unit: str) -> str:
    """A number of the fits table: a conductivity in the one format of k (``1.28×10⁻⁹``),
    a density or a percentage in theirs, anything else to four significant figures."""
    style = column_format(f"value [{unit}]")
    if style is None or pd.isna(value):
        return number_text(value, 4)
    return style.text(value, html=True)


def _fits(tables) -> str:
    fits = tables["fits"]
    rows = [
        (
            escape(r["fit"]),
            escape(r["subject"]),
            escape(r["quantity"]),
            *(_fit_number(r[c], r["unit"]) for c in ("value", "low", "high")),
            escape(r["unit"]),
            "–" if pd.isna(r["n"]) else str(int(r["n"])),
            escape(r["note"]),
        )
        for _, r in fits.iterrows()
    ]
    return table_markup(
        ["fit", "subject", "quantity", "value", "low", "high", "unit", "n", "note"],
        rows,
        numeric=(3, 4, 5, 7),
    )


def _checks(tables, ku: DisplayUnit) -> str:
    rows = [
        (
            escape(r["specimen"]),
            escape(str(r["method"]).replace("_", " ")),
            escape(restate_conductivities(str(r["check"]), ku.unit)),
        )
        for _, r in tables["checks"].iterrows()
    ]
    return table_markup(["specimen", "test", "check or note"], rows)


def _on_record(tables) -> str:
    """Every revision of the data and every test kept on record, as the logs hold them."""
    revisions = tables.get("revisions")
    if revisions is None or revisions.empty:
        parts = ["<p>No revision on record: the data are the files as written.</p>"]
    else:
        status = revisions["status"]
        standing = int((status == "in force").sum())
        withdrawn = int(status.str.startswith("withdrawn by").sum())
        parts = [
            f"<p>{standing} revision(s) in force and {withdrawn} withdrawn; every row of the "
            "revision log, withdrawals included, in its order, with the old and new values "
            "in the units of the file. The files as written are never changed.</p>",
            table_markup(
                ["id", "status", "when", "who", "table", "specimen", "reading row", "value"]
                + ["old → new", "as typed", "why"],
                [tuple(escape(str(v)) for v in row) for row in revisions.itertuples(index=False)],
                nowrap=(0, 2, 8),
            ),
        ]
    kept = tables.get("kept tests")
    if kept is None or kept.empty:
        parts.append("<p>No test kept on record despite a failed check.</p>")
    else:
        parts += [
            "<p>Tests kept on record despite a failed check: each one in force is judged "
            "against the criterion and used in the zone and the fits.</p>",
            table_markup(
                ["id", "status", "when", "who", "specimen", "test", "why"],
                [tuple(escape(str(v)) for v in row) for row in kept.itertuples(index=False)],
                nowrap=(0, 2),
            ),
        ]
    return "".join(parts)


def _grading(analysis: SeriesAnalysis, ku: DisplayUnit) -> str:
    if analysis.grading is None:
        return "<p>No specimen has a d10: no prediction from grading.</p>"
    rows = []
    for _, r in analysis.grading.iterrows():
        rows.append(
            (
                escape(r["specimen"]),
                number_text(1000 * r["d10"]),
                number_text(r["void_ratio"]),
                scientific(r["hazen_k"] * ku.factor, html=True)
                + ("" if r["hazen_within_range"] else " (outside range)"),
                scientific(r["chapuis_k"] * ku.factor, html=True)
                + ("" if r["chapuis_within_range"] else " (outside range)"),
                escape(r["note"]),
            )
        )
    return (
        "<p>Predictions, not measurements; each method holds only within its range: "
        f"Hazen (1892) for {escape(HAZEN_VALIDITY)}; Chapuis (2004) for "
        f"{escape(CHAPUIS_VALIDITY)}; the Kozeny–Carman ratio for "
        f"{escape(KOZENY_CARMAN_VALIDITY)}.</p>"
        + table_markup(
            ["specimen", "d10 [mm]", "e", f"Hazen k [{ku.unit}]", f"Chapuis k [{ku.unit}]", "note"],
            rows,
            numeric=(1, 2, 3, 4),
        )
    )


def report_page(
    analysis: SeriesAnalysis,
    tables: dict,
    charts,
    script: ChartScript,
    provenance: Provenance,
    cautions,
    ku: DisplayUnit,
    du: DisplayUnit,
    criterion_text: str,
    skipped=(),
    criterion_source: str = "",
    test_links: str = "",
) -> str:
    """The report of a series, at the top of the memo pack.

    Parameters
    ----------
    analysis : SeriesAnalysis
    tables : dict of str to pandas.DataFrame
        ``fits`` and ``checks`` (:mod:`kitchen.memo.tables`).
    charts : iterable of (name, title, figure HTML without plotly.js)
    script : ChartScript
        plotly.js: loaded once in the page's head, from its file in the pack or inlined;
        its version, size and SHA-256 go in the provenance.
    provenance : Provenance
    cautions : iterable of str
    ku, du : DisplayUnit
        Units of k and of density in the tables.
    criterion_text : str
        The criterion in words.
    skipped : iterable of str
        Charts not drawn, and why.
    criterion_source : str, optional
        Where the criterion comes from, in words (``"from the series' project table
        (project.csv, row 2, column 'value')"``, ``"given on the command line"``).
    test_links : str, optional
        HTML of the links to the pages of the tests, one per test
        (:func:`kitchen.memo.specimen_pages.specimen_links`).
    """
    label = reference_label(analysis.reference_temperature)
    title = f"Hydraulic conductivity of series {provenance.series}"
    specimens = table_markup(
        [
            "specimen",
            "effort",
            "test",
            "w [%]",
            f"{du.symbol} [{du.unit}]",
            "e",
            "S [%]",
            f"{label} [{ku.unit}]",
            f"{100 * analysis.confidence:g} % interval",
            "valid",
            "verdict",
            "in acceptable zone",
        ],
        _specimen_rows(analysis, ku, du),
        numeric=(3, 4, 5, 6, 7),
        nowrap=(0, 2, 8, 10),
    )
    figures = []
    for name, chart_title, figure_html in charts:
        figures.append(
            f'<h3 id="{escape(name)}">{escape(chart_title)}</h3>'
            f'<div class="chart">{figure_html}</div>'
        )
    methods = table_markup(
        ["step", "method", "source"],
        [(escape(a), escape(b), escape(c)) for a, b, c in REDUCTION_METHODS + ANALYSIS_METHODS],
    )
    criterion = analysis.criterion
    zone = "not drawn (no water contents)"
    if criterion is None:
        zone = "not drawn (no criterion given)"
    elif analysis.acceptable_zone is not None:
        zone = escape(analysis.acceptable_zone.method)
    if criterion is not None:  # the zone's words follow the criterion's kind
        bound = f"{criterion.bound} {scientific(criterion * ku.factor)} {ku.unit}"
        zone = f"where {escape(label)} is {escape(bound)} ({escape(criterion.words)}): {zone}"
        given = (
            f"{escape(criterion_text)}, {escape(criterion_source or 'given')} (from the "
            "project specification; an input, never a constant)"
        )
    else:
        given = (
            "No criterion: none was typed and the series' project table gives none, so no "
            "limit is assumed (give one in the series' project table, "
            "<code>project.csv</code> or a sheet <code>project</code>, or with "
            "<code>--criterion</code>)"
        )
    criteria = (
        f"<ul><li>{given}.</li>"
        f"<li>Verdict: {_verdict_rule(analysis, label)}</li>"
        f"<li>Acceptable zone: {zone}.</li>"
        f"<li>Reference temperature and viscosity: see the settings under Provenance.</li></ul>"
    )
    notes = "".join(f"<li>{escape(n)}</li>" for n in list(analysis.notes) + list(skipped))
    notice, check = script.notice("")
    body = "\n".join(
        [
            f"<h1>{escape(title)}</h1>",
            f'<p class="lede">Exported {escape(provenance.created)} by kitchen '
            f"{escape(provenance.tool_version)}; {provenance.revision_count} revision(s) "
            "applied.</p>",
            notice + cautions_markup(cautions),
            "<h2>Summary</h2>",
            _summary(analysis, ku, criterion_text),
            "<h2>Specimens</h2>",
            specimens,
            test_links,
            "<h2>Charts</h2>",
            "".join(figures) or "<p>No chart could be drawn.</p>",
            "<h2>Fits</h2>",
            _fits(tables),
            "<h2>Predictions from grading</h2>",
            _grading(analysis, ku),
            "<h2>Criteria applied</h2>",
            criteria,
            "<h2>Checks and notes</h2>",
            _checks(tables, ku),
            f"<ul>{notes}</ul>" if notes else "",
            "<h2>Revisions and tests kept on record</h2>",
            _on_record(tables),
            "<h2>Methods and their sources</h2>",
            methods,
            "<h2>Cautions</h2>",
            cautions_markup(cautions),
            "<h2>Provenance</h2>",
            provenance_markup(provenance, script),
            check,
        ]
    )
    return page_markup(title, body, script.element(""))
