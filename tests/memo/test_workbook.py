"""The memo's workbook: its sheets, its cautions, and text no spreadsheet reads as a formula.

The workbook is read back with openpyxl, the library that wrote it, and with pandas.
"""

import math

import pandas as pd
import pytest
from openpyxl import load_workbook
from series_files import SAMPLES, copy_sample

from kitchen import __version__
from kitchen.cautions import CAUTIONS
from kitchen.memo import export_memo_pack, workbook_bytes
from kitchen.workspace import Workspace


def test_workbook_cells_and_cautions_sheet(tmp_path):
    # an empty or non-finite number is an empty cell; a list is one text cell; text that
    # starts like a formula gets a leading apostrophe (OWASP advice on CSV injection)
    frame = pd.DataFrame(
        {
            "specimen": ["A", "=SUM(A1)"],
            "k [m/s]": [1.5e-9, math.nan],
            "notes": [["steady", "trend"], None],
        }
    )
    notes = pd.DataFrame({"item": ["caution"], "text": [CAUTIONS[0]]})
    path = tmp_path / "book.xlsx"
    path.write_bytes(workbook_bytes({"tests": frame}, notes))
    book = load_workbook(path)
    assert book.sheetnames == ["tests", "cautions"]
    rows = list(book["tests"].iter_rows(values_only=True))
    assert rows == [
        ("specimen", "k [m/s]", "notes"),
        ("A", 1.5e-9, "steady; trend"),
        ("'=SUM(A1)", None, None),
    ]
    assert all(cell.data_type != "f" for row in book["tests"].iter_rows() for cell in row)
    assert [c.value for c in book["cautions"][2]] == ["caution", CAUTIONS[0]]
    assert book.properties.creator == f"kitchen {__version__}"
    assert book.properties.description == " ".join(CAUTIONS)
    assert book["tests"].freeze_panes == "A2"


@pytest.fixture(scope="module")
def hostile_series(tmp_path_factory):
    """The sand series with text a spreadsheet would read as formulas."""
    folder = tmp_path_factory.mktemp("hostile") / "sand"
    copy_sample(SAMPLES / "drainage_sand", folder)
    specimens = (folder / "specimens.csv").read_text()
    lines = specimens.splitlines()
    lines[0] += ",effort"
    lines[1:] = [line + ',=HYPERLINK("http://example.invalid")' for line in lines[1:]]
    (folder / "specimens.csv").write_text("\n".join(lines).replace("DL-A", "-DL-A") + "\n")
    tests = (folder / "constant_head.csv").read_text().replace("DL-A", "-DL-A")
    (folder / "constant_head.csv").write_text(tests)
    return folder


def test_formula_like_text_is_neutralised(hostile_series, tmp_path):
    pack = export_memo_pack(Workspace(hostile_series), tmp_path, images=False)
    csv_text = (tmp_path / "results.csv").read_text()
    assert "'-DL-A" in csv_text and "'=HYPERLINK" in csv_text
    book = load_workbook(tmp_path / "results.xlsx")
    cells = [c for sheet in book for row in sheet.iter_rows() for c in row if c.value is not None]
    texts = [c for c in cells if isinstance(c.value, str)]
    assert all(c.data_type != "f" for c in cells)  # no cell became a formula
    assert not [c.value for c in texts if c.value.startswith(("=", "+", "-", "@"))]
    assert '\'=HYPERLINK("http://example.invalid")' in [c.value for c in texts]
    assert "'-DL-A" in [c.value for c in texts]
    assert len(pack) > 3
