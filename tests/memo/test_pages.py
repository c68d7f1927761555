"""The memo's HTML pages: what they hold, and that input text is escaped."""

import hashlib
import html
from pathlib import Path

import pandas as pd
import pytest

from kitchen.analysis import (
    CHAPUIS_VALIDITY,
    HAZEN_VALIDITY,
    KOZENY_CARMAN_VALIDITY,
    analyse_series,
)
from kitchen.display_units import density_unit, k_unit
from kitchen.io import load_series
from kitchen.memo import (
    VERDICT_MARKS,
    chart_page,
    checks_table,
    fits_table,
    memo_provenance,
    report_page,
)
from kitchen.memo.markup import ChartScript
from kitchen.reduction import series_results

SAMPLES = Path(__file__).resolve().parents[2] / "sample_data"
CAUTIONS = ("Lab k & field k differ.", "Defer to local codes <and> licensed practice.")
SHARED = ChartScript("/*PLOTLY-JS*/", "4.1.1", "charts/plotly.min.js")
INLINED = ChartScript("/*PLOTLY-JS*/", "4.1.1")


@pytest.fixture(scope="module")
def clay():
    series = load_series(SAMPLES / "clay_liner")
    results = series_results(series)
    results.loc[0, "specimen"] = "<script>alert(1)</script>"
    results.loc[1, "effort"] = "<i>heavy</i>"
    analysis = analyse_series(results, 1e-9)
    tables = {"fits": fits_table(analysis), "checks": checks_table(results, analysis)}
    provenance = memo_provenance(series.input_files, series.name, series.source, {"x": 1})
    return analysis, tables, provenance


def test_chart_page(clay):
    _, _, provenance = clay
    page = chart_page("A <chart>", '<div id="chart-a">FIGURE</div>', CAUTIONS, provenance)
    assert page.startswith("<!DOCTYPE html>") and '<div id="chart-a">FIGURE</div>' in page
    assert "<title>A &lt;chart&gt;</title>" in page
    for caution in CAUTIONS:
        assert html.escape(caution) in page
    assert f"kitchen {provenance.tool_version}" in page and "revision(s) applied" in page
    assert "<script" not in page  # no script given: the figure carries its own


def test_chart_page_loads_the_shared_script_from_its_folder(clay):
    _, _, provenance = clay
    page = chart_page("A", "<div>FIGURE</div>", CAUTIONS, provenance, SHARED, "charts")
    head = page[: page.index("</head>")]
    assert '<script type="text/javascript" src="plotly.min.js"></script>' in head
    assert "/*PLOTLY-JS*/" not in page
    notice = '<p class="cautions" id="chart-script-missing" hidden>'
    assert page.count(notice) == 1 and "<code>plotly.min.js</code>" in page
    check = 'if (typeof Plotly === "undefined")'
    assert page.index(notice) < page.index("FIGURE") < page.index(check)  # check comes last
    inlined = chart_page("A", "<div>FIGURE</div>", CAUTIONS, provenance, INLINED, "charts")
    assert inlined.count("/*PLOTLY-JS*/") == 1 and "src=" not in inlined
    assert "chart-script-missing" not in inlined


def test_report_page(clay):
    analysis, tables, provenance = clay
    page = report_page(
        analysis,
        tables,
        [("cc", "Compaction", "<div>CC-FIGURE</div>")],
        SHARED,
        provenance,
        CAUTIONS,
        k_unit("cm/s"),
        density_unit("kN/m3"),
        "criterion k20 ≤ 1e-7 cm/s",
        ["trend: not drawn (too few)"],
    )
    assert "/*PLOTLY-JS*/" not in page and "<div>CC-FIGURE</div>" in page
    assert '<script type="text/javascript" src="charts/plotly.min.js"></script>' in page
    assert page.count('id="chart-script-missing" hidden') == 1
    assert (
        f"plotly.js 4.1.1, <code>charts/plotly.min.js</code>, {len(SHARED.content)} bytes, "
        f'SHA-256 <span class="hash">{hashlib.sha256(b"/*PLOTLY-JS*/").hexdigest()}</span>'
    ) in page
    for heading in (
        "Summary",
        "Specimens",
        "Charts",
        "Fits",
        "Predictions from grading",
        "Criteria applied",
        "Checks and notes",
        "Methods and their sources",
        "Cautions",
        "Provenance",
    ):
        assert f"<h2>{heading}</h2>" in page
    for caution in CAUTIONS:
        assert page.count(html.escape(caution)) == 2  # at the top and in its section
    for f in provenance.input_files:
        assert f.sha256 in page and html.escape(f.path) in page
    assert "Tavenas" in page and "Daniel &amp; Benson (1990)" in page
    assert "criterion k20 ≤ 1e-7 cm/s" in page and "trend: not drawn (too few)" in page
    assert f"{VERDICT_MARKS['meets']} meets" in page
    assert "γd [kN/m³]" in page and "k20 [cm/s]" in page


def test_report_escapes_input_text(clay):
    analysis, tables, provenance = clay
    page = report_page(
        analysis, tables, [], INLINED, provenance, CAUTIONS, k_unit(), density_unit(), "criterion"
    )
    assert "<script>alert(1)</script>" not in page and "<i>heavy</i>" not in page
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in page and "&lt;i&gt;heavy&lt;/i&gt;" in page


def test_report_shows_the_dry_density_in_the_unit_chosen(clay):
    analysis, tables, provenance = clay
    page = report_page(
        analysis,
        tables,
        [],
        INLINED,
        provenance,
        CAUTIONS,
        k_unit(),
        density_unit("lb/ft3"),
        "criterion",
        [],
    )
    rho = analysis.specimens["dry_density"].iloc[2] * density_unit("lb/ft3").factor
    assert f"{rho:.4g}" in page
    assert isinstance(pd.Timestamp(provenance.created), pd.Timestamp)


def test_report_names_the_range_each_prediction_holds_in():
    series = load_series(SAMPLES / "drainage_sand")
    analysis = analyse_series(series_results(series), 1e-9)
    results = series_results(series)
    tables = {"fits": fits_table(analysis), "checks": checks_table(results, analysis)}
    provenance = memo_provenance(series.input_files, series.name, series.source, {})
    page = report_page(
        analysis, tables, [], INLINED, provenance, CAUTIONS, k_unit(), density_unit(), "c"
    )
    grading = page.split("<h2>Predictions from grading</h2>", 1)[1].split("<h2>", 1)[0]
    for words in (HAZEN_VALIDITY, CHAPUIS_VALIDITY, KOZENY_CARMAN_VALIDITY):
        assert html.escape(words) in grading
    assert "No revision on record" in page and "No test kept on record" in page
