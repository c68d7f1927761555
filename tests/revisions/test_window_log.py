"""Reading windows chosen by the engineer: a log beside the data, applied wherever the series
is reduced, and every choice kept.

The outside reference for the reductions is the core's own reduction of the same window
given by position (FallingHeadRecord.analyse), itself checked against the standards'
formulas in tests/reduction/test_falling_head_record.py; here what is checked is that a row
of the log names the same readings everywhere and that nothing is lost or silently ignored.
"""

import hashlib
from pathlib import Path

import pandas as pd
import pytest
from series_files import SAMPLES, copy_sample

from kitchen import cli
from kitchen.panels import falling_head_panel, series_chart_panel
from kitchen.reduction import series_results
from kitchen.revisions import (
    WindowLogError,
    choose_window,
    chosen_windows,
    clear_window,
    load_effective_series,
    read_window_choices,
    windows_path,
)
from kitchen.workspace import Workspace

WHEN = "2025-05-06T09:15:00+02:00"


@pytest.fixture
def clay(tmp_path) -> Path:
    return copy_sample(SAMPLES / "clay_liner", tmp_path / "clay_liner")


def rows_of(folder: Path, specimen: str) -> list[int]:
    series = load_effective_series(folder).series
    table = series.falling_head
    return table.loc[table["specimen"] == specimen, "source_row"].tolist()


def raw_digests(folder: Path) -> dict[str, str]:
    return {
        p.name: hashlib.sha256(p.read_bytes()).hexdigest()
        for p in folder.iterdir()
        if p.name != "windows.csv"
    }


def test_a_chosen_window_is_the_window_by_position_everywhere(clay):
    rows = rows_of(clay, "QF-02")
    raw = raw_digests(clay)
    choice = choose_window(
        clay,
        "QF-02",
        rows[8],
        rows[-3],
        reason="transient",
        when=WHEN,
        series=Workspace(clay).series,
    )
    assert raw_digests(clay) == raw  # the data files are never written
    assert choice.describe() == f"QF-02: readings at file rows {rows[8]} to {rows[-3]}"
    series = load_effective_series(clay).series
    windows = chosen_windows(series)
    assert windows == {"QF-02": (8, len(rows) - 2)}
    expected = series_results(series, windows={"QF-02": (8, len(rows) - 2)})
    pd.testing.assert_frame_equal(Workspace(clay).results(), expected)
    moved = expected.set_index("specimen").loc["QF-02", "k_reference"]
    proposed = series_results(series).set_index("specimen").loc["QF-02", "k_reference"]
    assert moved != proposed  # the window made a difference, so the check above is not empty


def test_the_last_row_stands_and_every_row_is_kept(clay):
    rows = rows_of(clay, "QF-07")
    choose_window(
        clay,
        "QF-07",
        rows[2],
        rows[-1],
        reason="first try",
        when=WHEN,
        series=Workspace(clay).series,
    )
    choose_window(
        clay,
        "QF-07",
        rows[5],
        rows[-1],
        reason="second look",
        who="lab lead",
        series=Workspace(clay).series,
    )
    series = load_effective_series(clay).series
    assert chosen_windows(series) == {"QF-07": (5, len(rows))}
    clear_window(clay, "QF-07", reason="the proposal does as well")
    assert chosen_windows(series) == {}
    choices = read_window_choices(clay)
    assert [c.reason for c in choices] == ["first try", "second look", "the proposal does as well"]
    assert windows_path(SAMPLES / "drainage_sand.xlsx").name == "drainage_sand.windows.csv"


@pytest.mark.parametrize(
    ("first", "last", "reason", "message"),
    [
        (0, -1, "", "a chosen window needs a reason"),
        (0, -1, "=cmd()", "a spreadsheet would run as a formula"),
        (5, 2, "r", "is not after the first row"),
        (0, None, "r", "has no reading at file row 99999"),
    ],
)
def test_a_bad_choice_is_refused_and_writes_nothing(clay, first, last, reason, message):
    rows = rows_of(clay, "QF-03")
    last_row = 99999 if last is None else rows[last]
    with pytest.raises(ValueError, match=message):
        choose_window(
            clay, "QF-03", rows[first], last_row, reason=reason, series=Workspace(clay).series
        )
    assert not windows_path(clay).exists()


def test_rows_of_another_specimen_are_refused(clay):
    other = rows_of(clay, "QF-01")
    with pytest.raises(WindowLogError, match="specimen QF-03 has no reading at file row"):
        choose_window(clay, "QF-03", other[0], other[5], reason="r", series=Workspace(clay).series)


@pytest.mark.parametrize(
    ("line", "message"),
    [
        ("zz,2025-05-06T09:15:00+02:00,,QF-01,180,200,r", "column 'id': expected 8"),
        ("0123abcd,yesterday,,QF-01,180,200,r", "column 'when'"),
        ("0123abcd,2025-05-06T09:15:00+02:00,,QF-01,180,,r", "column 'last_row': empty"),
        ("0123abcd,2025-05-06T09:15:00+02:00,,QF-01,1,200,r", "column 'first_row'"),
        ("0123abcd,2025-05-06T09:15:00+02:00,,QF-01,180,200,", "column 'reason'"),
        ("0123abcd,2025-05-06T09:15:00+02:00,,QF-01,180", "expected 7 fields, found 5"),
    ],
)
def test_a_damaged_log_is_named_by_row_and_column(clay, line, message):
    header = "id,when,who,specimen,first_row,last_row,reason\n"
    windows_path(clay).write_text(header + line + "\n", encoding="utf-8")
    with pytest.raises(WindowLogError, match=f"windows.csv, row 2.*{message}"):
        read_window_choices(clay)


def test_a_workspace_follows_the_log(clay):
    workspace = Workspace(clay)
    rows = rows_of(clay, "QF-05")
    choose_window(
        clay,
        "QF-05",
        rows[3],
        rows[-1],
        reason="drop the first readings",
        series=Workspace(clay).series,
    )
    assert workspace.sync() == ("QF-05",)
    assert workspace.falling_head("QF-05").start == 3
    assert workspace.set_window("QF-05", None) == ("QF-05",)  # tried here, not recorded
    assert workspace.falling_head("QF-05").window_proposed
    assert workspace.sync() == ()


def test_the_panels_keep_a_window_and_the_series_chart_uses_it(clay):
    panel = falling_head_panel(clay, specimen="QF-02")
    assert "No window on record" in panel.choice_label.value
    rows = panel.readings()["source_row"].tolist()
    panel.window.value = (6, len(rows) - 1)
    panel.reason.value = "early readings before saturation"
    panel.keep.click()
    assert panel.error.message == ""
    (choice,) = read_window_choices(clay)
    assert (choice.first_row, choice.last_row) == (rows[6], rows[-1])
    assert "On record in <code>windows.csv</code>" in panel.choice_label.value
    chart = series_chart_panel(clay)
    expected = series_results(load_effective_series(clay).series, windows={"QF-02": (6, len(rows))})
    pd.testing.assert_frame_equal(chart.results, expected)
    panel.keep.click()  # no reason typed: refused in words
    assert "needs a reason" in panel.error.message and len(read_window_choices(clay)) == 1
    panel.reason.value = "the proposal is fine after all"
    panel.release.click()
    assert panel.analysis.window_proposed and chosen_windows(chart.series) == {}


def test_command_line_records_a_window_and_the_report_uses_it(clay, tmp_path, capsys):
    rows = rows_of(clay, "QF-04")
    code = cli.main(["window", str(clay), "--specimen", "QF-04", "--first-row", str(rows[10]),
                     "--last-row", str(rows[-1]), "--reason", "after the drift settled"])  # fmt: skip
    assert code == 0 and "QF-04: readings at file rows" in capsys.readouterr().out
    out = tmp_path / "pack"
    assert cli.main(["report", str(clay), "--out", str(out), "--no-images"]) == 0
    report = (out / "report.html").read_text()
    assert f"QF-04: file rows {rows[10]}-{rows[-1]}" in report and "after the drift" in report
    table = pd.read_csv(out / "results.csv").set_index("specimen")
    assert table.loc["QF-04", "n_readings"] == len(rows) - 10
    assert cli.main(["report", str(clay), "--out", str(tmp_path / "p2"), "--no-images",
                     "--proposed-windows"]) == 0  # fmt: skip
    proposed = pd.read_csv(tmp_path / "p2" / "results.csv").set_index("specimen")
    assert proposed.loc["QF-04", "n_readings"] != len(rows) - 10
    with pytest.raises(SystemExit) as stopped:  # neither rows nor --proposed: a usage error
        cli.main(["window", str(clay), "--specimen", "QF-04", "--reason", "r"])
    assert stopped.value.code == 2
    assert "give --first-row and --last-row, or --proposed" in capsys.readouterr().err
