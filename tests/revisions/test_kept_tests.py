"""Tests kept on record despite a failed check: an append-only log beside the data, read by
the workspace and honoured by the series analysis.

QF-04 of the sample clay series drifts by design ("a check for a trend of k with time
should fail this specimen", sample_data/README.md): it is the test kept here. The outside
reference is the generator's truth (sample_data/clay_liner/truth.json): its true k20 is
below the 1e-9 m/s criterion, so once kept it meets.
"""

import hashlib
import json
from pathlib import Path

import pytest
from series_files import SAMPLES, copy_sample

from kitchen.analysis import MEETS, NOT_JUDGED
from kitchen.revisions import (
    KEPT_LOG_COLUMNS,
    KeptTestError,
    keep_test,
    kept_tests_path,
    read_kept_tests,
    standing_kept,
    withdraw_kept_test,
)
from kitchen.workspace import Workspace

WHEN = "2025-05-06T09:15:00+02:00"
REASON = "drift within the scatter of the series"


@pytest.fixture
def clay(tmp_path) -> Path:
    return copy_sample(SAMPLES / "clay_liner", tmp_path / "clay_liner")


def raw_digests(folder: Path) -> dict[str, str]:
    return {
        p.name: hashlib.sha256(p.read_bytes()).hexdigest()
        for p in folder.iterdir()
        if p.name != "kept_tests.csv"
    }


def verdict_of(workspace: Workspace, specimen: str) -> str:
    return workspace.analysis(1e-9).specimens.set_index("specimen").loc[specimen, "verdict"]


def test_a_kept_test_is_judged_and_a_withdrawal_undoes_it(clay):
    truth = json.loads((clay / "truth.json").read_text())["specimens"]["QF-04"]
    assert truth["k20_m_per_s"] <= 1e-9 and truth["behaviour"] == "drift"
    workspace = Workspace(clay)
    assert verdict_of(workspace, "QF-04") == NOT_JUDGED
    raw = raw_digests(clay)
    kept = keep_test(clay, "QF-04", "falling_head", reason=REASON, who="A. B.", when=WHEN,
                     series=workspace.series)  # fmt: skip
    assert raw_digests(clay) == raw  # the data files are never written
    assert workspace.sync() == ()  # keeping a test reduces nothing again...
    assert workspace.kept == {("QF-04", "falling_head"): f"kept {kept.id}, A. B., {WHEN}: {REASON}"}
    assert verdict_of(workspace, "QF-04") == MEETS  # ...but it is judged now
    assert verdict_of(Workspace(clay), "QF-04") == MEETS  # wherever the series is opened
    back = withdraw_kept_test(clay, kept.id, reason="the drift matters after all", when=WHEN)
    workspace.sync()
    assert verdict_of(workspace, "QF-04") == NOT_JUDGED
    rows = read_kept_tests(clay)
    assert [r.id for r in rows] == [kept.id, back.id] and rows[1].withdraws == kept.id
    assert standing_kept(rows) == {}
    text = kept_tests_path(clay).read_text().splitlines()
    assert text[0] == ",".join(KEPT_LOG_COLUMNS) and len(text) == 3  # appended, never edited


@pytest.mark.parametrize(
    "specimen, method, reason, message",
    [
        ("QF-04", "falling_head", "  ", "needs a reason"),
        ("QF-04", "constant_head", REASON, "QF-04' has no constant head test"),
        ("QF-99", "falling_head", REASON, "QF-99' has no falling head test"),
        ("QF-04", "flexible_wall", REASON, "method 'flexible_wall': expected one of"),
        ("QF-04", "falling_head", "=HYPERLINK(1)", "a spreadsheet would run as a formula"),
    ],
)
def test_a_bad_keep_is_refused_and_writes_nothing(clay, specimen, method, reason, message):
    series = Workspace(clay).series
    with pytest.raises(KeptTestError, match=message):
        keep_test(clay, specimen, method, reason=reason, series=series)
    assert not kept_tests_path(clay).exists()


def test_a_test_is_kept_once_and_only_a_standing_keep_is_withdrawn(clay):
    series = Workspace(clay).series
    kept = keep_test(clay, "QF-04", "falling_head", reason=REASON, series=series)
    with pytest.raises(KeptTestError, match=f"already kept on record \\({kept.id}, row 2\\)"):
        keep_test(clay, "QF-04", "falling_head", reason=REASON, series=series)
    withdraw_kept_test(clay, kept.id, reason="wrong test")
    with pytest.raises(KeptTestError, match=f"no keep '{kept.id}' in force"):
        withdraw_kept_test(clay, kept.id, reason="again")
    assert len(read_kept_tests(clay)) == 2


@pytest.mark.parametrize(
    "line, message",
    [
        ("zz,2025-05-06T09:15:00+02:00,,QF-04,falling_head,,r", "row 2, column 'id'"),
        ("0000000a,yesterday,,QF-04,falling_head,,r", "row 2, column 'when'"),
        ("0000000a,2025-05-06T09:15:00+02:00,,QF-04,falling head,,r", "row 2, column 'method'"),
        ("0000000a,2025-05-06T09:15:00+02:00,,QF-04,falling_head,,", "row 2, column 'reason'"),
        ("0000000a,2025-05-06T09:15:00+02:00,,QF-04,falling_head,0000000b,r", "'withdraws'"),
        ("0000000a,2025-05-06T09:15:00+02:00,,QF-04", "row 2: expected 7 fields, found 4"),
    ],
)
def test_a_damaged_log_is_named_by_row_and_column(clay, line, message):
    kept_tests_path(clay).write_text(",".join(KEPT_LOG_COLUMNS) + "\n" + line + "\n")
    with pytest.raises(KeptTestError, match=message):
        Workspace(clay)


def test_a_withdrawal_must_name_the_test_it_withdraws(clay):
    header = ",".join(KEPT_LOG_COLUMNS)
    kept_tests_path(clay).write_text(
        f"{header}\n0000000a,{WHEN},,QF-04,falling_head,,r\n"
        f"0000000b,{WHEN},,QF-05,falling_head,0000000a,r\n"
    )
    with pytest.raises(KeptTestError, match="row 3, column 'specimen': 0000000a kept QF-04"):
        read_kept_tests(clay)


def test_beside_a_workbook_the_log_is_named_after_it(tmp_path):
    book = tmp_path / "drainage_sand.xlsx"
    assert kept_tests_path(book) == tmp_path / "drainage_sand.kept_tests.csv"
