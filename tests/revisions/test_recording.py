"""Recording revisions and withdrawals: the raw files never change, the log only grows."""

import multiprocessing
import sys
import tempfile
from functools import partial
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from revision_series import SPECIMENS, WHEN, log_bytes, log_rows, raw_digests, small_series
from series_files import SAMPLES, copy_sample

from kitchen.io import SeriesError, load_series, read_tables
from kitchen.revisions import (
    LOG_COLUMNS,
    RevisionError,
    load_effective_series,
    read_revisions,
    revise,
)
from kitchen.workspace import Workspace


@pytest.fixture
def small(tmp_path):
    return small_series(tmp_path / "small")


@pytest.fixture
def clay(tmp_path):
    return copy_sample(SAMPLES / "clay_liner", tmp_path / "clay_liner")


# --- the row written -------------------------------------------------------------------------


def test_revision_row_records_everything(clay):
    before = raw_digests(clay)
    made = revise(
        clay, specimen="QF-01", field="height", value="4.95 in",
        reason="re-measured after test", who="R. Okafor", when=WHEN,
    )  # fmt: skip
    [row] = log_rows(clay)
    assert list(row) == list(LOG_COLUMNS)
    # 1 in = 25.4 mm exactly (international yard and pound agreement, 1959; NIST SP 811).
    assert row | {"id": ""} == {
        "id": "", "when": WHEN, "who": "R. Okafor", "action": "revise", "table": "specimens",
        "specimen": "QF-01", "reading_row": "", "field": "height", "old_value": "116.27 mm",
        "new_value": "4.95 in", "applied_value": "125.73 mm",
        "reason": "re-measured after test", "withdraws": "",
    }  # fmt: skip
    assert row["id"] == made.id and len(made.id) == 8
    assert read_revisions(clay) == (made,)
    assert raw_digests(clay) == before


def test_withdrawing_one_keeps_the_others(small):
    from kitchen.revisions import withdraw

    first = revise(small, specimen="A1", field="height", value="117 mm", reason="a")
    revise(small, specimen="A2", field="dry_mass", value="1.61 kg", reason="b")
    withdraw(small, first.id, reason="not needed")
    specimens = load_effective_series(small).series.specimens
    assert specimens["height"].tolist() == pytest.approx([0.1164, 0.1164], rel=1e-15)
    assert specimens["dry_mass"].tolist() == pytest.approx([1.650, 1.610], rel=1e-15)


# --- any sequence of revisions ---------------------------------------------------------------

_VALUES = {
    "height": ["117 mm", "4.6 in", "-3 mm", "12 g", "11.64 cm"],
    "dry_mass": ["1.62 kg", "1590 g", "0 g", "3 mm"],
    "water_content": ["18.5 %", "0.17 -", "12"],
    "heigth": ["117 mm"],
}
_operation = st.one_of(
    st.tuples(
        st.just("revise"),
        st.sampled_from(["A1", "A2", "A9"]),
        st.sampled_from(sorted(_VALUES)),
        st.integers(0, 4),
    ),
    st.tuples(st.just("withdraw"), st.integers(0, 6)),
)


@settings(max_examples=20, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.lists(_operation, min_size=1, max_size=6))
def test_any_sequence_keeps_raw_files_and_log_history(operations):
    from kitchen.revisions import withdraw

    with tempfile.TemporaryDirectory() as folder:
        series = small_series(Path(folder) / "s")
        raw = raw_digests(series)
        made = []
        for operation in operations:
            log_before = log_bytes(series) or b""
            try:
                if operation[0] == "revise":
                    _, specimen, field, pick = operation
                    value = _VALUES[field][pick % len(_VALUES[field])]
                    made.append(revise(series, specimen=specimen, field=field, value=value,
                                       reason="property test"))  # fmt: skip
                elif made:
                    target = made[operation[1] % len(made)]
                    made.append(withdraw(series, target.id, reason="property test"))
            except RevisionError:
                assert (log_bytes(series) or b"") == log_before  # refused: nothing written
            assert (log_bytes(series) or b"").startswith(log_before)  # the log only grows
            assert raw_digests(series) == raw
        # The model: each value is the applied value of its last standing revision.
        effective = load_effective_series(series).series.specimens.set_index("specimen")
        expected = {}
        for revision in read_revisions(series):
            key = (revision.specimen, revision.field)
            if revision.action == "revise":
                expected[key] = revision.applied_value
            elif revision.old_value == expected.get(key):
                expected[key] = revision.new_value
        tables, _ = read_tables(series)
        for (specimen, field), text in expected.items():
            number, unit = text.split(" ")
            assert unit == tables["specimens"].units[field]
            scale = {"mm": 1e-3, "g": 1e-3, "%": 1e-2}[unit]
            assert effective.loc[specimen, field] == pytest.approx(float(number) * scale)


# --- refusals: nothing written ---------------------------------------------------------------

_REFUSED = [
    ({"specimen": "A9"}, "unknown specimen 'A9': specimens.csv lists A1, A2"),
    ({"field": "heigth"}, "unknown field 'heigth' in specimens"),
    ({"field": "specimen", "value": "B1"}, "cannot itself be revised"),
    ({"value": "4.95 g"}, "height: value '4.95 g': unit 'g' is not a length"),
    ({"value": "116"}, "has no unit"),
    ({"value": "tall"}, "is not a number followed by a unit"),
    ({"value": "  "}, "the new value is empty"),
    ({"reason": ""}, "a revision needs a reason"),
    ({"reason": "   "}, "a revision needs a reason"),
    ({"reason": "=HYPERLINK(1)"}, "a spreadsheet would run as a formula"),
    ({"value": "-5 mm"}, "specimens.csv, row 2, column 'height [mm]': must be greater than zero"),
    ({"value": "11.64 cm"}, "A1 height is already 116.4 mm"),
    ({"field": "specific_gravity", "value": "27"}, "expected a specific gravity"),
    ({"field": "water_content", "value": "18"}, "has no unit"),
    ({"field": "head", "value": "90 cm"}, "'head' is a value of falling_head"),
    (
        {"field": "head", "reading": 99, "value": "90 cm"},
        "no reading at row 99 (its readings: rows 2-9)",
    ),
    (
        {"field": "head", "reading": 6, "value": "90 cm"},
        "row 6 is a reading of specimen 'A2', not of 'A1'",
    ),
    (
        {"field": "time", "reading": 4, "value": "5 min"},
        "row 4, column 'time [min]': time does not increase",
    ),
    ({"field": "head", "reading": 4, "value": "1.2 m"}, "row 4, column 'head [cm]': head rises"),
    ({"field": "head", "reading": 4, "value": "0 cm"}, "must be greater than zero"),
    ({"table": "specimens", "reading": 3}, "a specimen value takes no reading"),
    ({"table": "triaxial"}, "unknown table 'triaxial'"),
    ({"table": "constant_head", "field": "duration", "reading": 2}, "no constant_head table"),
    # values that would overflow a later report are refused at entry, in words
    ({"value": "1e308 mm"}, "is outside 5 mm to 1 m, what a specimen's height"),
    ({"value": "1e400 mm"}, "expected a finite number"),
    ({"field": "dry_mass", "value": "1e300 kg"}, "what a specimen's dry mass"),
    ({"field": "head", "reading": 4, "value": "1e308 cm"}, "row 4, column 'head [cm]'"),
    ({"field": "time", "reading": 5, "value": "1e308 min"}, "'1e308 min': expected a finite"),
    ({"reason": "fixed \x1b[2J"}, "the reason holds a control character"),
    ({"who": "\u202eana"}, "the who holds a control character"),
    ({"when": "2025-05-02 14:30"}, "has no time zone"),
    ({"when": "yesterday"}, "is not an ISO 8601 date and time"),
]


@pytest.mark.parametrize("through", ["files", "workspace"])
@pytest.mark.parametrize("with_log", [False, True], ids=["no log yet", "log exists"])
@pytest.mark.parametrize(("changes", "message"), _REFUSED, ids=[m for _, m in _REFUSED])
def test_refused_revision_writes_nothing(small, changes, message, with_log, through):
    # "workspace": recorded from the tables a Workspace holds (HeldSeries), which must
    # refuse exactly what reading the files again refuses
    if with_log:
        revise(small, specimen="A2", field="height", value="116.9 mm", reason="re-measured")
    raw, log = raw_digests(small), log_bytes(small)
    request = {"specimen": "A1", "field": "height", "value": "117 mm", "reason": "r"} | changes
    record = Workspace(small).revise if through == "workspace" else partial(revise, small)
    with pytest.raises(RevisionError) as caught:
        record(**request)
    assert message in str(caught.value)
    assert raw_digests(small) == raw and log_bytes(small) == log
    assert (log is None) == (not with_log)


def test_refused_withdrawals_write_nothing(small):
    from kitchen.revisions import withdraw

    first = revise(small, specimen="A1", field="height", value="117 mm", reason="a")
    second = revise(small, specimen="A1", field="height", value="117.2 mm", reason="b")
    other = revise(small, specimen="A2", field="height", value="117 mm", reason="c")
    gone = withdraw(small, other.id, reason="no")
    log = log_bytes(small)
    cases = [
        ("deadbeef", "no revision 'deadbeef'"),
        (gone.id, "is a withdrawal"),
        (other.id, f"already withdrawn by {gone.id}"),
        (first.id, f"revision {second.id} changes the same value after {first.id}"),
    ]
    for revision_id, message in cases:
        with pytest.raises(RevisionError, match=message):
            withdraw(small, revision_id, reason="r")
        with pytest.raises(RevisionError, match="needs a reason"):
            withdraw(small, second.id, reason="")
        assert log_bytes(small) == log


# --- raw data the loader refuses, raw files rewritten ---------------------------------------


def test_a_workspace_reads_a_file_again_once_it_was_rewritten(small):
    workspace = Workspace(small)
    assert workspace._held().current(read_revisions(small))
    specimens = small / "specimens.csv"
    specimens.write_text(SPECIMENS.replace("A1,101.6,116.4", "A1,101.6,116.45"), encoding="utf-8")
    assert not workspace._held().current(read_revisions(small))
    row = workspace.revise(specimen="A1", field="height", value="117 mm", reason="re-measured")
    assert row.old_value == "116.45 mm"  # as the file now reads, not as the workspace held it
    assert workspace.series.specimens.loc[0, "height"] == pytest.approx(0.117)
    assert workspace._held().current(read_revisions(small))  # read again by the sync
    other = revise(small, specimen="A2", field="height", value="117 mm", reason="re-measured")
    assert not workspace._held().current(read_revisions(small))  # a row it has not read
    workspace.sync()
    assert workspace._held().current(read_revisions(small)) and other in workspace.revisions


def test_revision_can_correct_a_value_the_loader_refuses(tmp_path):
    from kitchen.revisions import withdraw

    series = small_series(tmp_path / "s", SPECIMENS.replace("116.4,1650", "11a6.4,1650"))
    with pytest.raises(SeriesError, match="expected a number, found '11a6.4'"):
        load_series(series)
    fix = revise(series, specimen="A1", field="height", value="116.4 mm", reason="typo")
    assert fix.old_value == "11a6.4 mm"
    assert load_effective_series(series).series.specimens.loc[0, "height"] == pytest.approx(0.1164)
    with pytest.raises(RevisionError, match="would not load: .*found '11a6.4'"):
        withdraw(series, fix.id, reason="second thoughts")


# --- several people at once -------------------------------------------------------------------


# Real processes with their own descriptors; fork where the system has it (quicker to start).
START_METHOD = "fork" if "fork" in multiprocessing.get_all_start_methods() else "spawn"


def _revise_many(series, worker, count, barrier):
    barrier.wait()
    for index in range(count):
        revise(series, specimen="A1", field="height", value=f"{110 + worker}.{index:03d} mm",
               reason=f"worker {worker} pass {index}")  # fmt: skip


@pytest.mark.slow
@pytest.mark.skipif(sys.platform == "win32", reason="the folder lock needs POSIX flock")
def test_concurrent_revisions_keep_every_row_in_a_consistent_chain(small):
    context = multiprocessing.get_context(START_METHOD)
    workers, count = 4, 12  # the raw appends are tested 4 x 50 in tests/io/test_files.py
    barrier = context.Barrier(workers)
    processes = [
        context.Process(target=_revise_many, args=(small, worker, count, barrier))
        for worker in range(workers)
    ]
    for process in processes:
        process.start()
    for process in processes:
        process.join(300)
    assert [process.exitcode for process in processes] == [0] * workers
    rows = read_revisions(small)
    assert len(rows) == workers * count and len({row.id for row in rows}) == len(rows)
    assert sorted(row.reason for row in rows) == sorted(
        f"worker {w} pass {i}" for w in range(workers) for i in range(count)
    )
    # Each revision was checked against the value the one before it left.
    assert rows[0].old_value == "116.4 mm"
    assert all(b.old_value == a.applied_value for a, b in zip(rows, rows[1:], strict=False))
    assert load_effective_series(small).revision_count == workers * count
