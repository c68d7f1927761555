"""Shared panel parts: the message area, the progress bar, the figure refresh, formats."""

import warnings

import pandas as pd
import pytest
from html_cells import TableCells

from kitchen.io import InputProblem, SeriesError
from kitchen.panels import scratch_copy
from kitchen.panels.common import MessageArea, ProgressBar, format_conductivity, html_table


def test_series_error_is_listed_problem_by_problem():
    area = MessageArea()
    problems = [
        InputProblem("specimens.csv", 3, "height [mm]", "must be greater than zero"),
        InputProblem("falling_head.csv", 9, "time [min]", "time does not increase"),
    ]

    @area.guard("loading the series")
    def load():
        raise SeriesError(problems)

    assert load() is None
    assert "specimens.csv, row 3, column 'height [mm]': must be greater than zero" in area.message
    assert area.widget.value.count("<li>") == 2
    assert "Traceback" not in area.widget.value


def test_plain_refusal_is_shown_in_words_and_cleared_by_the_next_success():
    area = MessageArea()
    calls = []

    @area.guard("refitting")
    def refit(fail):
        calls.append(fail)
        if fail:
            raise ValueError("the window needs at least three readings")
        return 42

    refit(True)
    assert area.message == "Could not finish refitting: the window needs at least three readings"
    assert isinstance(area.exception, ValueError)
    assert refit(False) == 42
    assert area.message == "" and area.widget.value == ""


def test_unexpected_failure_keeps_its_traceback_folded_away():
    area = MessageArea()

    @area.guard("drawing")
    def draw():
        return 1 / 0

    draw()
    assert "ZeroDivisionError" in area.message
    assert "<details>" in area.widget.value and "Traceback" in area.widget.value


def test_warnings_in_a_callback_become_notes():
    area = MessageArea()

    @area.guard("fitting curves")
    def fit():
        warnings.warn("effort 'reduced': no curve drawn", stacklevel=1)
        return "done"

    assert fit() == "done"
    assert area.notes == ["effort 'reduced': no curve drawn"]
    assert "no curve drawn" in area.widget.value and area.message == ""


def test_progress_bar_counts_and_finishes():
    bar = ProgressBar("Export")
    bar(2, 5, "charts")
    assert (bar.bar.value, bar.bar.max) == (2, 5)
    assert bar.label.value == "2 of 5: charts"
    bar.finish("written", failed=False)
    assert bar.bar.value == 5 and bar.bar.bar_style == "success"


@pytest.mark.parametrize(
    ("value", "unit", "text"),
    [
        (7.5592e-9, "m/s", "7.56 × 10⁻⁹ m/s"),
        (7.5592e-9, "cm/s", "7.56 × 10⁻⁷ cm/s"),
        (9.996e-10, "m/s", "1.00 × 10⁻⁹ m/s"),
        (float("nan"), "m/s", "–"),
    ],
)
def test_conductivity_format(value, unit, text):
    assert format_conductivity(value, unit) == text


def test_table_values_are_escaped_and_read_back_by_an_html_parser():
    # read back by Python's own html.parser (a reference parser)
    frame = pd.DataFrame(
        {
            "specimen": ["A<1>", "B & C"],
            "k [m/s]": [7.5592e-9, float("nan")],
            "valid": [True, False],
            "note": ["ok", None],
        }
    )
    parser = TableCells()
    parser.feed(html_table(frame, {"k [m/s]": format_conductivity}, text_columns=("note",)))
    assert parser.cells == [
        ("th", None, "specimen"),
        ("th", None, "k [m/s]"),
        ("th", None, "valid"),
        ("th", None, "note"),
        ("td", None, "A<1>"),
        ("td", None, "7.56 × 10⁻⁹ m/s"),
        ("td", None, "yes"),
        ("td", "kitchen-text", "ok"),
        ("td", None, "B & C"),
        ("td", None, "–"),
        ("td", None, "no"),
        ("td", "kitchen-text", "–"),
    ]


def test_scratch_copy_leaves_the_original_alone(tmp_path):
    source = tmp_path / "series"
    source.mkdir()
    (source / "specimens.csv").write_text("specimen\nA\n")
    copy = scratch_copy(source, tmp_path / "scratch")
    assert copy == tmp_path / "scratch" / "series"
    (copy / "specimens.csv").write_text("changed")
    assert (source / "specimens.csv").read_text() == "specimen\nA\n"
    with pytest.raises(FileNotFoundError, match="not found"):
        scratch_copy(tmp_path / "missing")
    again = scratch_copy(source, tmp_path / "scratch")  # a second run replaces the first copy
    assert again == copy and (again / "specimens.csv").read_text() == "specimen\nA\n"
    assert [p.name for p in (tmp_path / "scratch").iterdir()] == ["series"]
    with pytest.raises(ValueError, match="would replace the series itself"):
        scratch_copy(source, tmp_path)


def test_scratch_copy_of_a_workbook_takes_its_own_log(tmp_path):
    # a workbook's log sits beside it as <stem>.revisions.csv (kitchen.revisions)
    book = tmp_path / "liner.xlsx"
    book.write_bytes(b"not read here")
    (tmp_path / "liner.revisions.csv").write_text("log")
    copy = scratch_copy(book, tmp_path / "scratch")
    assert (tmp_path / "scratch" / "liner.revisions.csv").read_text() == "log"
    (tmp_path / "liner.revisions.csv").unlink()
    scratch_copy(book, tmp_path / "scratch")
    assert copy.exists() and not (tmp_path / "scratch" / "liner.revisions.csv").exists()


def test_an_expected_failure_is_a_refusal_not_a_fault():
    class NoBrowser(RuntimeError):
        pass

    area = MessageArea()

    @area.guard("exporting", expected=(NoBrowser,))
    def export():
        raise NoBrowser("static chart export needs Chromium")

    export()
    assert area.message == "Could not finish exporting: static chart export needs Chromium"
    assert "<details>" not in area.widget.value
