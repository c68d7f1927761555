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


@pytest.fixture(scope="module")
def clay_book(tmp_path_factory):
    out = tmp_path_factory.mktemp("pack")
    export_memo_pack(Workspace(SAMPLES / "clay_liner"), out, criterion=1e-9, images=False)
    return load_workbook(out / "results.xlsx")


def _column(sheet, header):
    names = [cell.value for cell in sheet[1]]
    index = names.index(header) + 1
    return [row[index - 1] for row in sheet.iter_rows(min_row=2)]


@pytest.mark.parametrize(
    ("sheet", "header", "cell_format"),
    # the one format of each quantity (kitchen.display_units.column_format): k to three
    # significant figures, ρd to 0.001 Mg/m³, w and S to 0.1 %, e to 0.001 (common practice,
    # no source); the cell keeps the full value
    [
        ("specimens", "k20 [m/s]", "0.00E+00"),
        ("specimens", "k20_low [m/s]", "0.00E+00"),
        ("specimens", "dry_density [Mg/m3]", "0.000"),
        ("specimens", "water_content [%]", "0.0"),
        ("specimens", "void_ratio", "0.000"),
        ("tests", "k20 [m/s]", "0.00E+00"),
        ("tests", "saturation [%]", "0.0"),
        ("tests", "dry_density [Mg/m3]", "0.000"),
    ],
)
def test_numbers_keep_their_value_and_show_the_page_format(clay_book, sheet, header, cell_format):
    cells = [c for c in _column(clay_book[sheet], header) if c.value is not None]
    assert cells and all(c.number_format == cell_format for c in cells)
    assert all(isinstance(c.value, float | int) for c in cells)  # 20.0 reads back as 20
    # the full value, not a rounded copy: QF-01's ρd 1.704932... Mg/m3 (the sample's results)
    if header == "dry_density [Mg/m3]":
        assert abs(cells[0].value - 1.704932532704562) < 1e-12


def test_settings_carry_their_units_and_no_tuple_is_printed(clay_book):
    rows = [(item, text) for item, text in clay_book["cautions"].iter_rows(values_only=True)]
    settings = [text for item, text in rows if item == "setting"]
    assert "reference_temperature [°C] = 20" in settings
    assert "resolutions.caliper [m] = 1e-05" in settings
    assert "resolutions.thermometer [°C] = 0.1" in settings
    assert "criteria.low_k_threshold [m/s] = 1e-10" in settings
    # the D5084 gradient table (from memory): 2 for k from 1e-6 to 1e-5 m/s ... 30 below 1e-9
    table = next(t for t in settings if t.startswith("criteria.gradient_table"))
    assert "k from 1e-06 to 1e-05 m/s: largest gradient 2" in table
    assert "k below 1e-09 m/s: largest gradient 30" in table
    assert not any("((" in str(text) or "('" in str(text) for _, text in rows)


def test_the_fits_sheet_formats_each_number_by_its_row_unit(clay_book):
    # one quantity a row: the geometric mean in m/s as k (three significant figures), the
    # maximum dry density in Mg/m3 to 0.001, the optimum water content in % to 0.1
    sheet = clay_book["fits"]
    names = [cell.value for cell in sheet[1]]
    unit, value = names.index("unit"), names.index("value")
    formats = {}
    for row in sheet.iter_rows(min_row=2):
        if row[value].value is not None:
            formats.setdefault(row[unit].value, set()).add(row[value].number_format)
    assert formats["m/s"] == {"0.00E+00"}
    assert formats["Mg/m3"] == {"0.000"} and formats["%"] == {"0.0"}
    assert formats["decades"] == {"General"}  # no one format for a count of decades
