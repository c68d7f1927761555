"""The workspace: the same results as a full reduction, with only what changed recomputed.

The reference for every check is the package's own full path, reading the files again and
reducing every specimen (:func:`kitchen.revisions.load_effective_series` and
:func:`kitchen.reduction.results.series_results`): the cache must never give anything else.
"""

import csv
import sys
from pathlib import Path

import pandas as pd
import pytest
from series_files import SAMPLES, copy_sample

from kitchen.analysis import NO_CRITERION, Criterion
from kitchen.io import SeriesError
from kitchen.reduction import series_results
from kitchen.revisions import RevisionError, load_effective_series, revise
from kitchen.settings import Settings
from kitchen.workspace import Workspace

WHEN = "2025-05-02T14:30:00+02:00"


@pytest.fixture
def clay(tmp_path) -> Path:
    """A copy of the invented clay-liner series (falling head), free to revise."""
    return copy_sample(SAMPLES / "clay_liner", tmp_path / "clay_liner")


@pytest.fixture
def sand(tmp_path) -> Path:
    """A copy of the invented drainage-sand series (constant head)."""
    return copy_sample(SAMPLES / "drainage_sand", tmp_path / "drainage_sand")


def full_results(folder: Path, settings=None, **options) -> pd.DataFrame:
    return series_results(load_effective_series(folder).series, settings, **options)


def assert_same_results(workspace: Workspace, folder: Path, **options):
    pd.testing.assert_frame_equal(
        workspace.results(), full_results(folder, workspace.settings, **options)
    )


def revise_height(folder: Path, specimen: str, value: str):
    return revise(
        folder, specimen=specimen, field="height", value=value, reason="re-measured", when=WHEN
    )


def test_results_are_those_of_a_full_reduction(clay, sand):
    for folder in (clay, sand):
        assert_same_results(Workspace(folder), folder)


def test_a_height_revision_recomputes_that_specimen_only(clay):
    workspace = Workspace(clay)
    before = {s: workspace.falling_head(s) for s in workspace.specimen_ids()}
    assert workspace.sync() == ()  # nothing new in the log
    revise_height(clay, "QF-04", "117.10 mm")
    assert workspace.sync() == ("QF-04",)
    after = {s: workspace.falling_head(s) for s in workspace.specimen_ids()}
    assert [s for s in before if after[s] is not before[s]] == ["QF-04"]
    assert after["QF-04"].time is before["QF-04"].time  # the readings were not prepared again
    assert workspace.series.specimens.set_index("specimen").loc["QF-04", "height"] == 0.1171
    assert_same_results(workspace, clay)


def test_revise_and_withdraw_through_the_workspace(clay):
    workspace = Workspace(clay)
    original = workspace.results()
    row = workspace.revise(
        specimen="QF-02", field="height", value="4.6 in", reason="re-measured", when=WHEN
    )
    assert workspace.last_moved == ("QF-02",)
    assert workspace.effective.applied == (row,)
    workspace.withdraw(row.id, reason="measured the wrong specimen", when=WHEN)
    assert workspace.last_moved == ("QF-02",)
    assert workspace.effective.withdrawn == (row,) and workspace.effective.applied == ()
    pd.testing.assert_frame_equal(workspace.results(), original)


def test_a_reading_revision_recomputes_that_specimen_only(clay):
    workspace = Workspace(clay)
    readings = workspace.readings("QF-07")
    row = int(readings["source_row"].iloc[5])
    head_cm = readings["head"].iloc[5] * 100
    revise(
        clay,
        specimen="QF-07",
        field="head",
        value=f"{head_cm - 0.05:.2f} cm",
        reason="typed wrong",
        reading=row,
        when=WHEN,
    )
    assert workspace.sync() == ("QF-07",)
    assert_same_results(workspace, clay)


def test_a_new_window_reuses_the_prepared_record(clay):
    workspace = Workspace(clay)
    proposed = workspace.falling_head("QF-05")
    assert workspace.set_window("QF-05", (3, proposed.n)) == ("QF-05",)
    moved = workspace.falling_head("QF-05")
    assert (moved.start, moved.stop) == (3, proposed.n)
    assert moved.time is proposed.time  # the same prepared readings, not a new record
    assert_same_results(workspace, clay, windows={"QF-05": (3, proposed.n)})
    assert workspace.set_window("QF-05", None) == ("QF-05",)
    assert workspace.falling_head("QF-05").start == proposed.start


def test_a_capillary_rise_and_new_settings(clay):
    workspace = Workspace(clay)
    assert workspace.set_capillary_rise("QF-01", 0.004) == ("QF-01",)
    assert_same_results(workspace, clay, capillary_rises={"QF-01": 0.004})
    settings = Settings(reference_temperature=10.0)
    assert workspace.set_settings(settings) == tuple(workspace.specimen_ids())
    assert_same_results(workspace, clay, capillary_rises={"QF-01": 0.004})


def test_a_log_row_that_no_longer_fits_leaves_the_workspace_as_it_was(clay):
    workspace = Workspace(clay)
    before = workspace.results()
    revise_height(clay, "QF-03", "117.00 mm")
    log = clay / "revisions.csv"
    fields = next(csv.reader([log.read_text(encoding="utf-8").splitlines()[-1]]))
    fields[0], fields[8] = "0badc0de", "1.0 mm"  # id, and an old value the file never held
    with log.open("a", encoding="utf-8", newline="") as out:
        csv.writer(out, lineterminator="\n").writerow(fields)
    with pytest.raises(RevisionError, match="now holds"):
        workspace.sync()
    assert workspace.revisions == ()
    pd.testing.assert_frame_equal(workspace.results(), before)


def test_unknown_specimen_is_named(clay):
    with pytest.raises(KeyError, match="QF-99"):
        Workspace(clay).readings("QF-99")
    with pytest.raises(ValueError, match="unknown readings table"):
        Workspace(clay).readings("QF-01", "readings")


# --- the criterion in force ---------------------------------------------------------------


def test_the_analysis_takes_the_series_criterion_unless_one_is_given(clay, sand):
    # the clay liner's project table says 1e-9 m/s (US 40 CFR 258.40, sample_data/README.md)
    workspace = Workspace(clay)
    own = workspace.analysis()
    assert own.criterion == 1e-9 and own.criterion.kind == "maximum"
    assert own.counts == workspace.analysis(1e-9).counts
    criterion, source = workspace.criterion_in_force()
    assert criterion == 1e-9
    assert source == "from the series' project table (project.csv, row 2, column 'value')"
    # a criterion given for the analysis overrides the series' own
    given = workspace.analysis(Criterion(1e-4, "minimum"))
    assert given.criterion.kind == "minimum"
    assert workspace.criterion_in_force(5e-10) == (5e-10, "given for this analysis")
    # the sand carries none: no verdict is drawn, never a liner's limit
    bare = Workspace(sand)
    assert bare.criterion_in_force() == (None, "none given")
    analysis = bare.analysis()
    assert analysis.criterion is None and set(analysis.specimens["verdict"]) == {NO_CRITERION}


def test_a_criterion_that_does_not_read_stops_the_analysis_that_needs_it(clay):
    (clay / "project.csv").write_text("setting,value\ncriterion,1e-9 furlongs\n")
    workspace = Workspace(clay)
    with pytest.raises(SeriesError, match=r"project.csv, row 2, column 'value': criterion"):
        workspace.analysis()
    assert workspace.analysis(1e-9).criterion == 1e-9  # one given is used as it stands


# --- garbage -------------------------------------------------------------------------------


def test_opening_and_reducing_leaves_no_garbage_cycles_holding_data():
    # python -m kitchen freezes, uncollected, what exists when its imports are done, while
    # report parses the series' CSV files on a thread (kitchen.cli.imports_done): a cycle
    # made by the reading would never be freed, with the arrays it holds. CSV series leave none;
    # openpyxl leaves a few thousand small objects of a workbook's XML, and no data
    import gc

    import numpy as np

    gc.collect()
    gc.disable()
    gc.set_debug(gc.DEBUG_SAVEALL)
    try:
        for name in ("clay_liner", "transducer_log", "drainage_sand.xlsx"):
            workspace = Workspace(SAMPLES / name)
            workspace.results()
            del workspace
            found = gc.collect()
            if not name.endswith(".xlsx"):
                assert found == 0, name
            held = [o for o in gc.garbage if isinstance(o, np.ndarray | pd.DataFrame | pd.Series)]
            assert held == [], name
            assert sum(map(sys.getsizeof, gc.garbage)) < 1e6, name
            gc.garbage.clear()
    finally:
        gc.set_debug(0)
        gc.garbage.clear()
        gc.enable()
