"""The open-a-series panel, driven without a browser: set a control, check against the core."""

import re
from pathlib import Path

import numpy as np
import pytest
from html_cells import TableCells
from series_files import SAMPLES, copy_sample

from kitchen.io import load_series
from kitchen.panels import series_panel
from kitchen.reduction import results_table, series_results
from kitchen.settings import Settings


@pytest.fixture(scope="module")
def panel():
    return series_panel(SAMPLES / "clay_liner")


def test_loads_the_series_and_shows_the_core_results(panel):
    expected = results_table(series_results(load_series(SAMPLES / "clay_liner")))
    assert panel.error.message == ""
    assert list(panel.table["specimen"]) == list(expected["specimen"])
    np.testing.assert_array_equal(panel.table["k20 [m/s]"], expected["k20 [m/s]"])
    assert "QF-14" in panel.results_view.value
    assert "14 specimens, 686 falling-head readings" in panel.progress.label.value


def test_failed_checks_are_listed_in_words(panel):
    # QF-12 has seven readings without a temperature (sample_data/README.md).
    assert "QF-12" in panel.checks_view.value
    assert "temperature missing at 7 of 66 readings" in panel.checks_view.value


def test_reference_temperature_recomputes(panel):
    panel.reference_temperature.value = 10.0
    try:
        expected = series_results(load_series(SAMPLES / "clay_liner"), Settings(10.0))
        assert "k10 [m/s]" in panel.table.columns
        np.testing.assert_array_equal(panel.table["k10 [m/s]"], expected["k_reference"])
    finally:
        panel.reference_temperature.value = 20.0
    assert "k20 [m/s]" in panel.table.columns


def test_a_bad_series_lists_its_problems_not_a_traceback(tmp_path):
    copy = tmp_path / "clay"
    copy_sample(SAMPLES / "clay_liner", copy)
    lines = (copy / "specimens.csv").read_text().splitlines()
    header = lines[0].split(",")
    cells = lines[2].split(",")
    cells[header.index("specific_gravity")] = "two point seven"
    lines[2] = ",".join(cells)
    (copy / "specimens.csv").write_text("\n".join(lines) + "\n")
    broken = series_panel(copy)
    assert broken.series is None and broken.table is None
    assert "specimens.csv, row 3, column 'specific_gravity': expected a number" in (
        broken.error.message
    )
    assert "<li>" in broken.error.widget.value
    assert "Traceback" not in broken.error.widget.value
    assert broken.progress.bar.bar_style == "danger"


def test_path_box_and_load_button_open_another_series(tmp_path):
    other = series_panel(tmp_path / "nowhere")
    assert "not found" in other.error.message
    other.path.value = str(SAMPLES / "drainage_sand.xlsx")
    other.load.click()
    assert other.error.message == ""
    assert list(other.table["method"].unique()) == ["constant_head"]
    assert len(other.table) == 4


def _header_and_rows(markup: str):
    parser = TableCells()
    parser.feed(markup)
    header = [text for tag, _, text in parser.cells if tag == "th"]
    cells = [(text, kind) for tag, kind, text in parser.cells if tag == "td"]
    rows = [cells[i : i + len(header)] for i in range(0, len(cells), len(header))]
    return header, rows


def test_the_results_open_compact_with_every_column_on_demand(panel):
    # the notebook's area is about 1,200 px wide: the compact view shows the state, k20
    # with its interval, validity and the notes; the rest is one click away
    assert panel.columns.value == "compact"
    header, rows = _header_and_rows(panel.results_view.value)
    assert header[:2] == ["specimen", "method"] and "notes" in header
    assert "porosity" not in header and "gradient" not in header and len(header) <= 11
    notes = [row[header.index("notes")] for row in rows]
    assert all(kind == "kitchen-text" for _, kind in notes)  # left-aligned, wrapping
    k20 = [text for text, _ in (row[header.index("k20 [m/s]")] for row in rows)]
    assert all(re.fullmatch(r"\d\.\d\d×10⁻[⁰¹²³⁴⁵⁶⁷⁸⁹]+", text) for text in k20)
    panel.columns.value = "all columns"
    header, _ = _header_and_rows(panel.results_view.value)
    assert {"porosity", "gradient", "temperature [degC]", "k [m/s]"} <= set(header)
    panel.columns.value = "compact"


def test_densities_read_to_the_same_decimals(panel):
    header, rows = _header_and_rows(panel.results_view.value)
    densities = [row[header.index("dry_density [Mg/m3]")][0] for row in rows]
    assert all(re.fullmatch(r"\d\.\d{3}", text) for text in densities)


@pytest.mark.browser
def test_the_compact_results_fit_the_notebook_width_in_chromium(panel):
    # JupyterLab's notebook area on a 1,400 px window is about 1,214 px wide: the compact
    # table is laid out by a real browser there and must not be wider; notes read from the
    # left (the panel's own style)
    sync_api = pytest.importorskip("playwright.sync_api")
    chromium = Path("/usr/bin/chromium")
    if not chromium.exists():
        pytest.skip("no Chromium at /usr/bin/chromium (apt-get install chromium)")
    assert panel.columns.value == "compact"
    markup = panel.results_view.value
    with sync_api.sync_playwright() as playwright:
        browser = playwright.chromium.launch(
            executable_path=str(chromium), headless=True, args=["--no-sandbox", "--disable-gpu"]
        )
        try:
            page = browser.new_page(viewport={"width": 1214, "height": 900})
            page.set_content(
                "<body style='margin:0;font: 13px sans-serif'>"
                f"<div style='width:1214px'>{markup}</div></body>"
            )
            width = page.evaluate("document.querySelector('.kitchen-table table').scrollWidth")
            align = page.evaluate(
                "getComputedStyle(document.querySelector('td.kitchen-text')).textAlign"
            )
        finally:
            browser.close()
    assert width <= 1214 and align == "left"
