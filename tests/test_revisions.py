"""Revisions: the raw files never change, the log only grows, and the physics follows."""

import csv
import hashlib
import io
import multiprocessing
import shutil
import subprocess
import sys
import tempfile
from functools import partial
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from kitchen import cli, files
from kitchen.results import series_results
from kitchen.revisions import (
    LOG_COLUMNS,
    RevisionError,
    apply_revisions,
    format_history,
    history_table,
    load_effective_series,
    log_sha256,
    read_revisions,
    revise,
    revision_effect,
    revisions_path,
    what_changed,
)
from kitchen.series import SeriesError, load_series, read_tables
from kitchen.workspace import Workspace

SAMPLES = Path(__file__).resolve().parents[1] / "sample_data"
WHEN = "2025-05-02T14:30:00+02:00"

SPECIMENS = """specimen,diameter [mm],height [mm],dry_mass [g],specific_gravity,water_content [%],effort,standpipe_diameter [mm]
A1,101.6,116.4,1650,2.70,18.0,standard,5
A2,101.6,116.4,1600,2.70,16.0,standard,5
"""
FALLING = """specimen,time [min],head [cm],temperature [degC]
A1,0,100,20
A1,10,95,20.5
A1,20,90.3,21
A1,30,85.9,21
A2,0,100,19
A2,10,97,19
A2,20,94.1,19
A2,30,91.3,19
"""


def small_series(folder: Path, specimens: str = SPECIMENS) -> Path:
    folder.mkdir(parents=True, exist_ok=True)
    (folder / "specimens.csv").write_text(specimens, encoding="utf-8")
    (folder / "falling_head.csv").write_text(FALLING, encoding="utf-8")
    return folder


@pytest.fixture
def small(tmp_path):
    return small_series(tmp_path / "small")


@pytest.fixture
def clay(tmp_path):
    return Path(shutil.copytree(SAMPLES / "clay_liner", tmp_path / "clay_liner"))


def raw_digests(folder: Path) -> dict[str, str]:
    """SHA-256 of every file of a series except its revision log."""
    return {
        p.name: hashlib.sha256(p.read_bytes()).hexdigest()
        for p in sorted(folder.iterdir())
        if p.name != "revisions.csv"
    }


def log_bytes(series: Path) -> bytes | None:
    log = revisions_path(series)
    return log.read_bytes() if log.exists() else None


def log_rows(series: Path) -> list[dict]:
    return list(csv.DictReader(io.StringIO(revisions_path(series).read_text(encoding="utf-8"))))


# --- the log -------------------------------------------------------------------------------


def test_log_sits_in_the_folder_or_beside_the_workbook(tmp_path):
    assert revisions_path(tmp_path / "clay") == tmp_path / "clay" / "revisions.csv"
    assert revisions_path(tmp_path / "sand.xlsx") == tmp_path / "sand.revisions.csv"


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


def test_effective_series_cites_the_log(clay):
    plain = load_effective_series(clay)
    assert plain.revision_count == 0 and plain.log_sha256 is None and log_sha256(clay) is None
    revise(clay, specimen="QF-02", field="height", value="116.5 mm", reason="re-measured")
    effective = load_effective_series(clay)
    expected = hashlib.sha256(revisions_path(clay).read_bytes()).hexdigest()
    assert effective.log_sha256 == expected == log_sha256(clay)
    assert effective.revision_count == 1 and effective.log_rows == 1
    assert effective.series.specimens.loc[1, "height"] == pytest.approx(0.1165, rel=1e-15)


# --- the physics of a height revision --------------------------------------------------------


@pytest.mark.parametrize("value", ["125.73 mm", "4.95 in", "11.2 cm", "0.1301 m"])
def test_height_change_moves_k_and_density_as_the_physics_says(clay, value):
    # Falling head, constant tailwater: k = a·L/(A·t)·ln(h1/h2) (ASTM D5084 Method B; Das,
    # Principles of Geotechnical Engineering): with the readings unchanged k ∝ L, and so is
    # k20 (the viscosity ratio does not involve L). Dry density ρd = Ms/(A·L) (Das; Holtz &
    # Kovacs) ∝ 1/L, hence 1 + e = Gs·ρw/ρd ∝ L.
    before = series_results(load_series(clay))
    revise(clay, specimen="QF-01", field="height", value=value, reason="re-measured")
    effective = load_effective_series(clay).series
    after = series_results(effective)
    ratio = effective.specimens.loc[0, "height"] / 0.11627
    old, new = before.iloc[0], after.iloc[0]
    for column in ("k", "k_reference"):
        assert new[column] / old[column] == pytest.approx(ratio, rel=1e-12), column
    assert new["k_reference_low"] <= new["k_reference"] <= new["k_reference_high"]
    assert new["dry_density"] * ratio == pytest.approx(old["dry_density"], rel=1e-12)
    assert (1 + new["void_ratio"]) == pytest.approx((1 + old["void_ratio"]) * ratio, rel=1e-12)
    pd.testing.assert_frame_equal(before.iloc[1:], after.iloc[1:])  # the others stay put


@pytest.mark.parametrize(
    ("specimen", "height", "new_height", "k_follows_height"),
    [("DL-A", 6.052, 6.3, False), ("DL-B", 6.119, 6.3, True)],
)
def test_constant_head_k_follows_the_flow_length(
    tmp_path, specimen, height, new_height, k_follows_height
):
    # Constant head, k = Q·L/(A·h·t) (ASTM D2434; ASTM D5084 Method A), L the manometer tap
    # spacing where flow_length is given (DL-A) and the specimen height where it is not
    # (DL-B). A new height moves ρd ∝ 1/L for both, and k ∝ L only for DL-B.
    sand = Path(shutil.copytree(SAMPLES / "drainage_sand", tmp_path / "sand"))
    before = series_results(load_series(sand))
    revise(sand, specimen=specimen, field="height", value=f"{new_height} in", reason="re-measured")
    after = series_results(load_effective_series(sand).series)
    ratio = new_height / height
    row = (after["specimen"] == specimen).to_numpy()
    k_ratio = after.loc[row, "k_reference"].item() / before.loc[row, "k_reference"].item()
    assert k_ratio == pytest.approx(ratio if k_follows_height else 1.0, rel=1e-12)
    density_ratio = after.loc[row, "dry_density"].item() / before.loc[row, "dry_density"].item()
    assert density_ratio == pytest.approx(1 / ratio, rel=1e-12)
    pd.testing.assert_frame_equal(before.loc[~row], after.loc[~row])


def test_withdrawing_restores_the_original_results_exactly(clay):
    original = series_results(load_series(clay))
    raw = raw_digests(clay)
    height = revise(clay, specimen="QF-01", field="height", value="4.95 in", reason="swelled")
    head = revise(clay, specimen="QF-01", field="head", reading=3, value="184.5 cm", reason="typo")
    assert not series_results(load_effective_series(clay).series).equals(original)
    from kitchen.revisions import withdraw

    withdraw(clay, head.id, reason="the first reading was right")
    withdraw(clay, height.id, reason="measured the wrong specimen")
    effective = load_effective_series(clay)
    assert effective.revision_count == 0 and len(effective.withdrawn) == 2
    pd.testing.assert_frame_equal(series_results(effective.series), original)
    plain = load_series(clay)
    pd.testing.assert_frame_equal(effective.series.specimens, plain.specimens)
    pd.testing.assert_frame_equal(effective.series.falling_head, plain.falling_head)
    assert raw_digests(clay) == raw
    assert [row["action"] for row in log_rows(clay)] == ["revise"] * 2 + ["withdraw"] * 2
    statuses = history_table(read_revisions(clay))["status"].tolist()
    assert statuses[0].startswith("withdrawn by") and statuses[2] == f"withdraws {head.id}"


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


# --- raw data the loader refuses, raw files edited, logs damaged -----------------------------


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


def test_raw_file_edited_after_a_revision_is_named(small):
    from kitchen.revisions import withdraw

    made = revise(small, specimen="A1", field="height", value="117 mm", reason="re-measured")
    specimens = small / "specimens.csv"  # a person edits their own file by hand
    specimens.write_text(SPECIMENS.replace("A1,101.6,116.4", "A1,101.6,116.6"), encoding="utf-8")
    with pytest.raises(RevisionError) as caught:
        load_effective_series(small)
    text = str(caught.value)
    assert f"revision {made.id}" in text and "row 2 now holds 116.6 mm, not 116.4 mm" in text
    withdraw(small, made.id, reason="the file was corrected instead")
    assert load_effective_series(small).series.specimens.loc[0, "height"] == pytest.approx(0.1166)


@pytest.mark.parametrize(
    ("line", "message"),
    [
        (
            "12345678,2025-05-02T14:30:00+02:00,,revise,specimens,A1",
            "row 3: expected 13 fields, found 6",
        ),
        (
            "XYZ,2025-05-02T14:30:00+02:00,,revise,specimens,A1,,height,116.4 mm,117 mm,117 mm,r,",
            "column 'id': expected 8 hexadecimal digits",
        ),
        (
            "12345678,2025-05-02T14:30:00,,revise,specimens,A1,,height,116.4 mm,117 mm,117 mm,r,",
            "column 'when': '2025-05-02T14:30:00' has no time zone",
        ),
        (
            "12345678,2025-05-02T14:30:00Z,,erase,specimens,A1,,height,116.4 mm,117 mm,117 mm,r,",
            "column 'action': expected revise or withdraw",
        ),
        (
            "12345678,2025-05-02T14:30:00Z,,withdraw,specimens,A1,,height,,,,r,0badf00d",
            "no earlier revision '0badf00d'",
        ),
        (
            "12345678,2025-05-02T14:30:00Z,,revise,specimens,A1,,height,116.4 mm,117 mm,117 mm,,",
            "column 'reason': every revision needs a reason",
        ),
    ],
)
def test_damaged_log_is_named_by_row_and_column(small, line, message):
    revise(small, specimen="A2", field="height", value="117 mm", reason="ok")
    with revisions_path(small).open("a", encoding="utf-8") as stream:
        stream.write(line + "\n")
    with pytest.raises(RevisionError, match="revisions.csv, row 3"):
        load_effective_series(small)
    with pytest.raises(RevisionError) as caught:
        read_revisions(small)
    assert message in str(caught.value)


def test_log_with_a_foreign_header_is_refused(small):
    revisions_path(small).write_text("when,what\n", encoding="utf-8")
    with pytest.raises(RevisionError, match="row 1: expected the columns id, when"):
        revise(small, specimen="A1", field="height", value="117 mm", reason="r")
    assert revisions_path(small).read_text(encoding="utf-8") == "when,what\n"


# --- values of every kind, workbooks, and columns the file lacks ----------------------------


def test_reading_values_are_converted_to_the_file_unit(small):
    # 68 degF = 20 degC (T_C = (T_F - 32)·5/9; NIST SP 811, from memory).
    made = revise(small, specimen="A1", field="temperature", reading=3, value="68 degF",
                  reason="thermometer read in F")  # fmt: skip
    assert (made.old_value, made.applied_value) == ("20.5 degC", "20 degC")
    water = revise(small, specimen="A2", field="water_content", value="0.17 -", reason="oven")
    assert (water.old_value, water.applied_value) == ("16 %", "17 %")
    label = revise(small, specimen="A2", field="effort", value="modified", reason="mislabelled")
    assert label.applied_value == "modified"
    effective = load_effective_series(small).series
    assert effective.falling_head.loc[1, "temperature"] == pytest.approx(20.0, abs=1e-12)
    assert effective.specimens.loc[1, "water_content"] == pytest.approx(0.17)
    assert effective.specimens.loc[1, "effort"] == "modified"


def test_workbook_series_keeps_its_log_beside_it(tmp_path):
    book = Path(shutil.copy(SAMPLES / "drainage_sand.xlsx", tmp_path / "drainage_sand.xlsx"))
    before = hashlib.sha256(book.read_bytes()).hexdigest()
    made = revise(book, specimen="DL-B", field="height", value="155 mm", reason="re-measured")
    assert (tmp_path / "drainage_sand.revisions.csv").exists()
    assert made.old_value == "6.119 in" and made.applied_value.endswith(" in")
    timed = revise(book, specimen="DL-A", field="duration", reading=3, value="7 min",
                   reason="stopwatch misread")  # fmt: skip
    assert (timed.table, timed.old_value, timed.applied_value) == (
        "constant_head",
        "425 s",
        "420 s",
    )
    effective = load_effective_series(book).series
    height = effective.specimens.set_index("specimen").loc["DL-B"]
    assert height["height"] == pytest.approx(0.155, rel=1e-14)
    assert effective.constant_head.loc[1, "duration"] == 420.0
    assert hashlib.sha256(book.read_bytes()).hexdigest() == before
    assert sorted(p.name for p in tmp_path.iterdir()) == [
        "drainage_sand.revisions.csv",
        "drainage_sand.xlsx",
    ]


def test_a_value_the_file_lacks_takes_the_typed_unit(clay):
    made = revise(clay, specimen="QF-03", field="d10", value="0.002 mm", reason="hydrometer")
    assert (made.old_value, made.applied_value) == ("", "0.002 mm")
    effective = load_effective_series(clay).series
    assert effective.specimens.loc[2, "d10"] == pytest.approx(2e-6)
    assert effective.specimens["d10"].isna().sum() == 13
    assert effective.units["specimens"]["d10"] == "mm"


def test_apply_revisions_leaves_the_raw_tables_alone(small):
    revise(small, specimen="A1", field="height", value="117 mm", reason="r")
    tables, _ = read_tables(small)
    snapshot = tables["specimens"].frame.copy()
    effective, applied = apply_revisions(tables, read_revisions(small))
    pd.testing.assert_frame_equal(tables["specimens"].frame, snapshot)
    assert effective["specimens"].frame.loc[0, "height"] == 117.0 and len(applied) == 1


# --- what changed ------------------------------------------------------------------------------


def _results(k_values, density=(1700.0, 1710.0, 1720.0), valid=(True, True, False)):
    k = np.array(k_values, dtype=float)
    return pd.DataFrame(
        {
            "specimen": ["S1", "S2", "S3"],
            "method": ["falling_head"] * 3,
            "dry_density": density,
            "void_ratio": [0.59, 0.58, 0.57],
            "k_reference": k,
            "k_reference_low": k * 0.8,
            "k_reference_high": k * 1.2,
            "valid": valid,
        }
    )


def test_what_changed_lists_only_what_moved():
    before = _results([5e-10, 2e-9, np.nan])
    after = _results([5e-10, 8e-10, np.nan], density=(1700.0, 1650.0, 1720.0))
    moved = what_changed(before, after, criterion=1e-9)
    assert moved["specimen"].tolist() == ["S2"]
    row = moved.iloc[0]
    assert row["moved"] == "dry_density, k_reference, verdict"
    assert (row["dry_density_before"], row["dry_density_after"]) == (1710.0, 1650.0)
    # meets when k_high <= criterion (kitchen.trends.classify_against_criterion)
    assert (row["verdict_before"], row["verdict_after"]) == ("does not meet", "meets")
    same = what_changed(before, before, criterion=1e-9)
    assert same.empty and list(same.columns) == list(moved.columns)


def test_what_changed_without_a_criterion_and_with_missing_k():
    before = _results([5e-10, 2e-9, np.nan])
    after = _results([5e-10, 2e-9, 3e-9], valid=(True, True, True))
    moved = what_changed(before, after)
    assert moved["specimen"].tolist() == ["S3"]
    assert moved.loc[0, "moved"] == "k_reference, valid"
    assert moved[["verdict_before", "verdict_after"]].isna().all(axis=None)
    judged = what_changed(before, after, criterion=1e-9)
    assert (judged.loc[0, "verdict_before"], judged.loc[0, "verdict_after"]) == (
        "no result",
        "does not meet",
    )


def test_what_changed_names_missing_columns():
    with pytest.raises(ValueError, match="after: results table lacks the columns valid"):
        what_changed(_results([1e-9] * 3), _results([1e-9] * 3).drop(columns="valid"))


def test_revision_effect_compares_across_one_row(clay):
    from kitchen.revisions import withdraw

    made = revise(clay, specimen="QF-05", field="height", value="120 mm", reason="swelled")
    effect = revision_effect(clay, made.id, criterion=1e-9)
    assert effect["specimen"].tolist() == ["QF-05"]
    assert effect.loc[0, "dry_density_after"] < effect.loc[0, "dry_density_before"]
    undone = withdraw(clay, made.id, reason="no")
    back = revision_effect(clay, undone.id)
    assert back.loc[0, "k_reference_after"] == effect.loc[0, "k_reference_before"]
    with pytest.raises(RevisionError, match="no revision 'cafef00d'"):
        revision_effect(clay, "cafef00d")


def test_history_reads_in_words(small):
    revise(small, specimen="A1", field="height", value="4.6 in", reason="re-measured", who="J")
    text = format_history(read_revisions(small))
    assert "specimens A1 height: 116.4 mm -> 116.84 mm (typed 4.6 in)" in text
    assert "in force" in text and "re-measured" in text
    assert format_history(()) == "no revisions"


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
    workers, count = 4, 12  # the raw appends are tested 4 x 50 in test_files.py
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


# --- the command line -------------------------------------------------------------------------


def run(*arguments):
    return subprocess.run(
        [sys.executable, "-m", "kitchen", *map(str, arguments)], capture_output=True, text=True
    )


def test_command_line_revise_history_report(clay, tmp_path, capsys):
    def main(*arguments):
        status = cli.main([str(a) for a in arguments])
        output = capsys.readouterr()
        assert status == 0, output.err
        return output.out

    out = main("revise", clay, "--specimen", "QF-01", "--field", "height", "--value", "4.95 in",
               "--reason", "re-measured after test", "--who", "R. Okafor", "--criterion", "1e-9")  # fmt: skip
    [row] = log_rows(clay)
    assert f"recorded revision {row['id']}" in out
    # 116.27 mm -> 125.73 mm: rho_d falls by 116.27/125.73 (rho_d = Ms/(A L); Das)
    assert "QF-01 falling_head: dry density 1.7049 -> 1.5767 Mg/m3" in out
    main("revise", clay, "--specimen", "QF-01", "--field", "head", "--reading", "3",
         "--value", "184.5 cm", "--reason", "typo")  # fmt: skip
    out = main("history", clay, "--out", tmp_path / "history.csv")
    assert "2 row(s)" in out and "reading row 3 head: 184.7 cm -> 184.5 cm" in out
    assert pd.read_csv(tmp_path / "history.csv")["status"].tolist() == ["in force"] * 2
    done = run("report", clay, "--out", tmp_path / "out", "--no-images")  # as a user runs it
    assert done.returncode == 0, done.stderr
    assert "2 revision(s) applied" in done.stdout
    table = pd.read_csv(tmp_path / "out" / "results.csv")
    assert table.loc[0, "dry_density [Mg/m3]"] == pytest.approx(1.5767, abs=1e-4)
    out = main("revise", clay, "--withdraw", row["id"], "--reason", "wrong specimen")
    assert f"of revision {row['id']}" in out


@pytest.mark.parametrize(
    ("arguments", "message"),
    [
        (
            ["--specimen", "QF-99", "--field", "height", "--value", "4.95 in"],
            "unknown specimen 'QF-99'",
        ),
        (
            ["--specimen", "QF-01", "--field", "height", "--value", "4.95 g"],
            "unit 'g' is not a length",
        ),
        (["--specimen", "QF-01", "--field", "height"], "revise needs --value"),
        (["--withdraw", "abcdef12", "--specimen", "QF-01"], "--withdraw takes only --reason"),
        (["--withdraw", "abcdef12"], "no revision 'abcdef12'"),
    ],
)
def test_command_line_bad_input_exits_2_and_writes_nothing(clay, arguments, message, capsys):
    try:
        status = cli.main(["revise", str(clay), *arguments, "--reason", "r"])
    except SystemExit as stop:  # argparse's usage errors
        status = stop.code
    assert status == 2
    assert message in capsys.readouterr().err
    assert not revisions_path(clay).exists()


def test_command_line_bad_input_shows_no_traceback(clay):
    done = run("revise", clay, "--specimen", "QF-01", "--field", "height", "--value", "-1 mm",
               "--reason", "r")  # fmt: skip
    assert done.returncode == 2 and "Traceback" not in done.stderr
    assert "must be greater than zero; nothing was written" in done.stderr
    assert not revisions_path(clay).exists()


def _snapshot(folder: Path) -> dict[str, bytes]:
    return {str(p.relative_to(folder)): p.read_bytes() for p in folder.rglob("*") if p.is_file()}


def test_export_failure_leaves_the_previous_report(clay, tmp_path, monkeypatch, capsys):
    out = tmp_path / "out"
    assert cli.main(["report", str(clay), "--out", str(out), "--no-images"]) == 0
    previous = _snapshot(out)
    assert "results.csv" in previous
    revise(clay, specimen="QF-01", field="height", value="4.95 in", reason="re-measured")

    def full_disk(*arguments):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(files.os, "replace", full_disk)
    assert cli.main(["report", str(clay), "--out", str(out), "--no-images"]) == 2
    monkeypatch.undo()
    assert "No space left on device" in capsys.readouterr().err
    assert _snapshot(out) == previous  # every file as it was, and no temporary left behind
