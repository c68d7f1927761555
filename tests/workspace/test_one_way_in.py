"""Every view opens a series the one way (kitchen.workspace.Workspace) and so shows the same
k20 for the same specimen: the report, the open-a-series panel, the falling-head panel, the
series chart panel and the revise summary, with a reading window on record.

The expected values are the report's own results.csv, read back as a user would; the
window on record drops the first readings of one specimen, which moves its k20, so a view
that forgot the window would show another number.
"""

import shutil
from pathlib import Path

import pandas as pd
import pytest
from series_files import SAMPLES

from kitchen import cli
from kitchen.panels import falling_head_panel, revise_panel, series_chart_panel, series_panel
from kitchen.reduction import FallingHeadRecord
from kitchen.revisions import choose_window, revise
from kitchen.workspace import Workspace, revision_effect

SPECIMEN = "QF-05"
CRITERION = "1e-9 m/s"  # the liner limit of US 40 CFR 258.40 and EU 1999/31/EC Annex I


@pytest.fixture()
def clay(tmp_path) -> Path:
    """The clay sample's raw tables only (no log a user may have left beside them), with
    one window on record."""
    folder = tmp_path / "clay_liner"
    folder.mkdir()
    for name in ("specimens.csv", "falling_head.csv"):
        shutil.copy2(SAMPLES / "clay_liner" / name, folder / name)
    opened = Workspace(folder)
    rows = opened.readings(SPECIMEN)["source_row"].to_list()
    choose_window(
        folder, SPECIMEN, rows[6], rows[-1], reason="early readings before saturation",
        series=opened.series,
    )  # fmt: skip
    return folder


def _report_k20(folder: Path, out: Path) -> pd.Series:
    arguments = ["report", str(folder), "--out", str(out), "--no-images"]
    assert cli.main([*arguments, "--criterion", CRITERION]) == 0
    table = pd.read_csv(out / "results.csv")
    return table.set_index("specimen")["k20 [m/s]"]


def test_every_view_shows_the_k20_of_the_report(clay, tmp_path, capsys):
    report = _report_k20(clay, tmp_path / "pack")
    proposed = Workspace(clay, windows_on_record=False).results().set_index("specimen")
    assert proposed.at[SPECIMEN, "k_reference"] != report[SPECIMEN]  # the window matters

    opened = series_panel(clay)
    assert opened.table.set_index("specimen").at[SPECIMEN, "k20 [m/s]"] == report[SPECIMEN]
    falling = falling_head_panel(clay, specimen=SPECIMEN)
    assert falling.analysis.k_reference == report[SPECIMEN]
    chart = series_chart_panel(clay, images=False)
    assert chart.results.set_index("specimen").at[SPECIMEN, "k_reference"] == report[SPECIMEN]

    row = revise(clay, specimen=SPECIMEN, field="height", value="116.30 mm", reason="re-measured")
    moved = revision_effect(clay, row.id).set_index("specimen")
    assert moved.at[SPECIMEN, "k_reference_before"] == report[SPECIMEN]
    after = _report_k20(clay, tmp_path / "pack-after")
    assert after[SPECIMEN] != report[SPECIMEN]  # the revision moved it
    assert moved.at[SPECIMEN, "k_reference_after"] == after[SPECIMEN]

    # after the revision: the revise panel, the workbook, the series chart and notebook 01
    revising = revise_panel(clay, criterion=CRITERION)
    assert revising.results.set_index("specimen").at[SPECIMEN, "k_reference"] == after[SPECIMEN]
    book = pd.read_excel(tmp_path / "pack-after" / "results.xlsx", sheet_name=None)
    # two files, two number parsers: the same value to within the last digit of a double
    in_book = book["tests"].set_index("specimen").at[SPECIMEN, "k20 [m/s]"]
    assert in_book == pytest.approx(after[SPECIMEN], rel=1e-15)
    chart = series_chart_panel(clay, criterion=CRITERION, images=False)
    shown = chart.analysis.specimens.set_index("specimen")
    assert shown.at[SPECIMEN, "k"] == after[SPECIMEN]
    verdicts = book["specimens"].set_index("specimen")["verdict"]
    assert verdicts.to_dict() == shown["verdict"].to_dict()
    assert (
        series_panel(clay).table.set_index("specimen").at[SPECIMEN, "k20 [m/s]"] == after[SPECIMEN]
    )


def test_a_report_reduces_each_specimen_once(clay, tmp_path, monkeypatch, capsys):
    calls = []
    analyse = FallingHeadRecord.analyse

    def counted(self, *args, **kwargs):
        calls.append(self.specimen)
        return analyse(self, *args, **kwargs)

    monkeypatch.setattr(FallingHeadRecord, "analyse", counted)
    _report_k20(clay, tmp_path / "pack")
    specimens = Workspace(clay).specimen_ids()
    assert sorted(calls) == sorted(specimens)  # results, tables and charts share one each
