"""The revision log: where it lives, and a damaged or foreign log named by row and column."""

import pytest
from revision_series import small_series

from kitchen.revisions import (
    RevisionError,
    load_effective_series,
    read_revisions,
    revise,
    revisions_path,
)


@pytest.fixture
def small(tmp_path):
    return small_series(tmp_path / "small")


# --- the log -------------------------------------------------------------------------------


def test_log_sits_in_the_folder_or_beside_the_workbook(tmp_path):
    assert revisions_path(tmp_path / "clay") == tmp_path / "clay" / "revisions.csv"
    assert revisions_path(tmp_path / "sand.xlsx") == tmp_path / "sand.revisions.csv"


# --- logs damaged -------------------------------------------------------------------------


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
