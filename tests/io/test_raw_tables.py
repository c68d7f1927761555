"""Reading the raw tables: files, sheets and headers, every bad input named by file, row, column."""

import zipfile

import pandas as pd
import pytest
from series_files import (
    CONSTANT,
    FALLING,
    SPECIMENS,
    csv_rows,
    problems_of,
    write_series,
    write_workbook,
)

from kitchen.io import SeriesError, load_series, read_tables
from kitchen.io.raw_tables import WORKBOOK_UNPACKED_LIMIT


def test_workbook_problems_name_the_sheet(tmp_path):
    book = tmp_path / "book.xlsx"
    with pd.ExcelWriter(book) as writer:
        pd.DataFrame({"specimen": ["A1"], "diameter": [101.6]}).to_excel(
            writer, sheet_name="specimens", index=False
        )
        pd.DataFrame({"specimen": ["A1"], "time [s]": [0], "head [m]": [1]}).to_excel(
            writer, sheet_name="falling_head", index=False
        )
    problems = problems_of(book)
    assert any(p.startswith("book.xlsx [specimens], row 1, column 'diameter'") for p in problems)


@pytest.mark.parametrize(
    ("tables", "expected"),
    [
        (
            {"specimens": None},
            "specimens.csv: missing: every series needs it",
        ),
        (
            {"falling_head": None},
            "has no test data",
        ),
        (
            {"specimens": SPECIMENS.replace("height [mm]", "length_of_it [mm]")},
            "specimens.csv, row 1, column 'height': required column missing",
        ),
        (
            {"specimens": SPECIMENS.replace("height [mm]", "height")},
            "specimens.csv, row 1, column 'height': 'height' has a dimension (length) but no unit",
        ),
        (
            {"specimens": SPECIMENS.replace("height [mm]", "height [parsec-ish]")},
            "specimens.csv, row 1, column 'height [parsec-ish]': unknown unit",
        ),
        (
            {"specimens": SPECIMENS.replace("height [mm]", "height [g]")},
            "column 'height [g]': unit 'g' is not a length",
        ),
        (
            {"specimens": SPECIMENS.replace(",", ";")},
            "the header has semicolons",
        ),
        (
            {"specimens": SPECIMENS.replace("height [mm]", "height [10**10**10]")},
            "specimens.csv, row 1, column 'height [10**10**10]': unit '10**10**10': a power "
            "cannot be raised again",
        ),
    ],
)
def test_bad_input_is_named(tmp_path, tables, expected):
    problems = problems_of(write_series(tmp_path / "s", **tables))
    assert any(expected in problem for problem in problems), problems


def test_not_utf8_is_named(tmp_path):
    folder = write_series(tmp_path / "s")
    (folder / "specimens.csv").write_bytes(SPECIMENS.replace("A1", "Ä1").encode("latin-1"))
    assert any("not UTF-8" in p for p in problems_of(folder))


def test_missing_folder_is_named(tmp_path):
    with pytest.raises(SeriesError, match="not found"):
        load_series(tmp_path / "nowhere")


def test_reading_never_writes_the_raw_files(tmp_path):
    folder = write_series(tmp_path / "s", constant_head=CONSTANT)
    before = {p.name: p.read_bytes() for p in folder.iterdir()}
    read_tables(folder)
    load_series(folder)
    assert {p.name: p.read_bytes() for p in folder.iterdir()} == before


FALLING_HEADER = FALLING.split("\n")[0]


@pytest.mark.parametrize(
    ("falling", "hint"),
    [
        (FALLING.replace(",", ";"), "(the header has semicolons: save the file comma-separated)"),
        # a semicolon export with decimal commas: rows have more commas than the header
        (
            FALLING.replace(",", ";").replace("90.3", "90,3"),
            "(the header has semicolons: save the file comma-separated)",
        ),
        (FALLING.replace(",", "\t"), "(the header has tabs: save the file comma-separated)"),
        (FALLING.replace("specimen,", "sample,"), "; columns found: sample, time [min]"),
    ],
)
def test_a_readings_header_without_a_specimen_column_is_named(tmp_path, falling, hint):
    problems = problems_of(write_series(tmp_path / "s", falling_head=falling))
    expected = "falling_head.csv, row 1, column 'specimen': required column missing"
    assert any(p.startswith(expected) and hint in p for p in problems), problems
    assert all(p.startswith("falling_head.csv, row 1, column '") for p in problems), problems


@pytest.mark.parametrize(
    ("encoding", "expected"),
    [
        ("utf-16-le", "it looks like UTF-16 text without a byte-order mark; save it as UTF-8"),
        ("utf-16-be", "it looks like UTF-16 text without a byte-order mark; save it as UTF-8"),
        ("utf-16", "is UTF-16 text; save it as UTF-8 CSV"),
    ],
)
def test_utf16_readings_are_named(tmp_path, encoding, expected):
    folder = write_series(tmp_path / "s")
    (folder / "falling_head.csv").write_bytes(FALLING.encode(encoding))
    problems = problems_of(folder)
    assert len(problems) == 1 and problems[0].startswith("falling_head.csv: "), problems
    assert expected in problems[0]


def test_a_header_only_readings_file_is_named_in_words(tmp_path):
    problems = problems_of(write_series(tmp_path / "s", falling_head=FALLING_HEADER + "\n"))
    assert problems == [
        "falling_head.csv, row 2: no readings below the header: one row per reading or "
        "collection expected"
    ]


def test_a_header_only_specimens_file_is_named_in_words(tmp_path):
    problems = problems_of(write_series(tmp_path / "s", specimens=SPECIMENS.split("\n")[0]))
    assert "specimens.csv, row 2: no specimens below the header: one row per specimen expected" in (
        problems
    )


def test_an_empty_readings_table_beside_a_full_one_is_a_method_not_used(tmp_path):
    folder = write_series(
        tmp_path / "s", falling_head=FALLING_HEADER + "\n", constant_head=CONSTANT
    )
    series = load_series(folder)
    assert len(series.falling_head) == 0 and len(series.constant_head) == 2


MISSING_MARKERS = ["NA", "N/A", "nan", "NaN", "NULL", "null", "None", "#N/A", "<NA>"]


@pytest.mark.parametrize("name", MISSING_MARKERS)
def test_an_id_that_spells_a_missing_value_is_an_id(tmp_path, name):
    specimens = SPECIMENS.replace("A1,", f"{name},")
    falling = FALLING.replace("A1,", f"{name},")
    series = load_series(write_series(tmp_path / "s", specimens=specimens, falling_head=falling))
    assert series.specimen_ids() == [name, "A2"]
    assert series.falling_head["specimen"].tolist() == [name] * 3 + ["A2"] * 3
    book = write_workbook(
        tmp_path / "book.xlsx",
        {"specimens": csv_rows(specimens), "falling_head": csv_rows(falling)},
    )
    assert load_series(book).specimen_ids() == [name, "A2"]


def test_a_missing_marker_in_a_column_of_numbers_is_an_empty_cell(tmp_path):
    series = load_series(
        write_series(tmp_path / "s", specimens=SPECIMENS.replace(",18.0,", ",NA,"))
    )
    assert series.specimens["water_content"].isna().tolist() == [True, False]


@pytest.mark.parametrize(
    ("specimens", "expected"),
    [
        (
            SPECIMENS.replace("height [mm],", "height [mm],height [mm],").replace(
                "116.4,", "116.4,116.4,"
            ),
            "specimens.csv, row 1, column 'height [mm]': column 'height' given twice "
            "(columns C and D); keep one",
        ),
        (
            SPECIMENS.replace("height [mm],", "height [mm],Height [in],").replace(
                "116.4,", "116.4,4.58,"
            ),
            "specimens.csv, row 1, column 'Height [in]': column 'height' given twice "
            "(columns C and D); keep one",
        ),
        (
            "specimen," + SPECIMENS.replace("\nA1,", "\nA1,A1,").replace("\nA2,", "\nA2,A2,"),
            "specimens.csv, row 1, column 'specimen': column 'specimen' given twice "
            "(columns A and B); keep one",
        ),
    ],
)
def test_a_column_given_twice_is_named(tmp_path, specimens, expected):
    problems = problems_of(write_series(tmp_path / "s", specimens=specimens))
    assert expected in problems, problems
    book = write_workbook(
        tmp_path / "book.xlsx",
        {"specimens": csv_rows(specimens), "falling_head": csv_rows(FALLING)},
    )
    expected_in_book = expected.replace("specimens.csv", "book.xlsx [specimens]")
    assert expected_in_book in problems_of(book)


def test_an_extra_column_given_twice_is_carried(tmp_path):
    specimens = SPECIMENS.replace("\n", ",notes,notes\n", 1).replace(",5\n", ",5,a,b\n")
    assert load_series(write_series(tmp_path / "s", specimens=specimens)).specimen_ids() == [
        "A1",
        "A2",
    ]


def test_a_row_with_more_cells_than_the_header_is_named(tmp_path):
    problems = problems_of(
        write_series(tmp_path / "s", falling_head=FALLING.replace("A1,10,95,", "A1,10,95,5,"))
    )
    assert problems == [
        "falling_head.csv, row 3: 5 cells where the header has 4: is there a comma in a value "
        "(a decimal comma, or text to put in quotes)?"
    ]


def _book(tmp_path, specimens=SPECIMENS, falling=FALLING, hidden=()):
    rows = {"specimens": csv_rows(specimens), "falling_head": csv_rows(falling)}
    return rows, lambda: write_workbook(tmp_path / "book.xlsx", rows, hidden)


@pytest.mark.parametrize("truth", [True, False])
def test_a_true_false_cell_is_not_a_number(tmp_path, truth):
    rows, write = _book(tmp_path)
    rows["specimens"][1][1] = truth  # diameter of A1
    rows["falling_head"][2][2] = truth  # head of A1's second reading
    problems = problems_of(write())
    expected = "expected a number, found a true/false value (TRUE or FALSE is not a number)"
    assert f"book.xlsx [specimens], row 2, column 'diameter [mm]', specimen A1: {expected}" in (
        problems
    )
    assert f"book.xlsx [falling_head], row 3, column 'head [cm]', specimen A1: {expected}" in (
        problems
    )


def test_a_true_false_column_in_a_csv_file_is_not_a_number(tmp_path):
    specimens = SPECIMENS.replace(",18.0,", ",TRUE,").replace(",16.0,", ",FALSE,")
    problems = problems_of(write_series(tmp_path / "s", specimens=specimens))
    assert problems == [
        f"specimens.csv, row {row}, column 'water_content [%]', specimen {name}: expected a "
        "number, found a true/false value (TRUE or FALSE is not a number)"
        for row, name in ((2, "A1"), (3, "A2"))
    ]


@pytest.mark.parametrize("sheet", ["specimens", "falling_head"])
def test_a_hidden_table_sheet_is_refused(tmp_path, sheet):
    _, write = _book(tmp_path, hidden=(sheet,))
    problems = problems_of(write())
    assert problems == [
        f"book.xlsx [{sheet}]: the sheet is hidden: unhide it and check what it holds, or "
        "remove it; a hidden sheet is not read"
    ]


def test_a_hidden_sheet_the_tool_does_not_read_is_left_alone(tmp_path):
    rows, _ = _book(tmp_path)
    rows["scratch"] = [["anything"]]
    book = write_workbook(tmp_path / "book.xlsx", rows, hidden=("scratch",))
    assert load_series(book).specimen_ids() == ["A1", "A2"]


def test_a_formula_without_a_saved_value_is_named(tmp_path):
    rows, write = _book(tmp_path)
    rows["specimens"][2][3] = "=1600*1"  # dry mass of A2: written without a calculated value
    problems = problems_of(write())
    assert problems == [
        "book.xlsx [specimens], row 3, column 'dry_mass [g]': cell D3 holds a formula with no "
        "saved value (the program that wrote the workbook did not calculate it): open and "
        "save it in a spreadsheet, or type the value"
    ]


def test_a_workbook_that_unpacks_too_large_is_refused_unread(tmp_path):
    book = tmp_path / "bomb.xlsx"
    chunk = b"\0" * 2**20
    with zipfile.ZipFile(book, "w", zipfile.ZIP_DEFLATED) as archive:
        with archive.open("xl/worksheets/sheet1.xml", "w") as member:
            for _ in range(WORKBOOK_UNPACKED_LIMIT // len(chunk) + 1):
                member.write(chunk)
    assert book.stat().st_size < WORKBOOK_UNPACKED_LIMIT / 100  # highly compressed
    with pytest.raises(SeriesError) as caught:
        load_series(book)
    (problem,) = caught.value.problems
    assert str(problem).startswith("bomb.xlsx: unpacks to 65 MB, more than the 64 MB")


def test_a_file_that_is_not_a_workbook_is_named(tmp_path):
    book = tmp_path / "book.xlsx"
    book.write_text("specimen,height [mm]\n", encoding="utf-8")
    with pytest.raises(SeriesError, match="book.xlsx: cannot be read: not an .xlsx workbook"):
        load_series(book)


def test_a_first_row_with_a_cell_too_many_is_named_not_shifted(tmp_path):
    # a parser takes a first row one cell longer than the header for an index, and every
    # value of the table moves one column: diameters read as heights
    specimens = SPECIMENS.replace(",5\nA2", ",5,7\nA2")
    problems = problems_of(write_series(tmp_path / "s", specimens=specimens))
    assert problems == [
        "specimens.csv, row 2: 9 cells where the header has 8: is there a comma in a value "
        "(a decimal comma, or text to put in quotes)?"
    ]


def test_a_trailing_comma_on_every_row_is_an_empty_cell(tmp_path):
    specimens = SPECIMENS.replace("\n", ",\n")
    series = load_series(write_series(tmp_path / "s", specimens=specimens))
    assert series.specimens["diameter"].tolist() == pytest.approx([0.1016, 0.1016])
    assert series.specimens["height"].tolist() == pytest.approx([0.1164, 0.1164])


def test_a_specimens_header_without_a_specimen_column_is_named_once(tmp_path):
    # the readings' ids cannot be looked up in a table without ids: not one problem per reading
    problems = problems_of(
        write_series(tmp_path / "s", specimens=SPECIMENS.replace("specimen,", "sample,"))
    )
    assert problems == [
        "specimens.csv, row 1, column 'specimen': required column missing; columns found: "
        "sample, diameter [mm], height [mm], dry_mass [g], specific_gravity, "
        "water_content [%], effort, standpipe_diameter [mm]"
    ]


def test_a_workbook_whose_archive_understates_a_part_is_read_no_further(tmp_path):
    # A zip archive records each part's unpacked size twice (local header and central
    # directory; PKWARE APPNOTE.TXT, sections 4.3.7 and 4.3.12): a bomb may state a small
    # size there for a part that unpacks to far more. The reader stops at the stated size,
    # so the work is bounded by the sizes checked before reading.
    import openpyxl

    book = tmp_path / "lying.xlsx"
    workbook = openpyxl.Workbook()
    workbook.active.title = "specimens"
    workbook.active.append(["specimen", "height [mm]"])
    workbook.save(book)
    with zipfile.ZipFile(book) as archive:
        parts = {info.filename: archive.read(info) for info in archive.infolist()}
    sheet = "xl/worksheets/sheet1.xml"
    padding = b"<!--" + b" " * (WORKBOOK_UNPACKED_LIMIT + 2**20) + b"-->"
    parts[sheet] = parts[sheet].replace(b"<sheetData>", b"<sheetData>" + padding, 1)
    with zipfile.ZipFile(book, "w", zipfile.ZIP_DEFLATED) as archive:
        for name, data in parts.items():
            archive.writestr(name, data)
    data = bytearray(book.read_bytes())
    stated = len(parts[sheet]).to_bytes(4, "little")
    for signature, offset in ((b"PK\x03\x04", 22), (b"PK\x01\x02", 24)):  # unpacked size
        start = 0
        while (start := data.find(signature, start)) >= 0:
            if data[start + offset : start + offset + 4] == stated:
                data[start + offset : start + offset + 4] = (4096).to_bytes(4, "little")
            start += 4
    book.write_bytes(bytes(data))
    with zipfile.ZipFile(book) as archive:
        assert archive.getinfo(sheet).file_size == 4096  # the archive now understates it
    with pytest.raises(SeriesError) as caught:
        load_series(book)
    (problem,) = caught.value.problems
    # read up to the stated size, its checksum then fails: refused as a damaged archive
    assert str(problem) == "lying.xlsx: cannot be read: not an .xlsx workbook"


# --- parsed ahead, on a thread (the command line's report) ------------------------------------


@pytest.mark.parametrize("where", ["first row", "later row"])
def test_a_row_with_a_cell_too_many_is_named_whatever_the_warnings_filters(tmp_path, where):
    # pandas sets and restores the warnings filters around its calls, which another thread
    # can leave changed while a series is parsed ahead (kitchen.io.read_ahead): the rows
    # with a cell too many are found without the parser's warnings, even when every
    # warning is ignored
    import warnings

    falling = FALLING.replace("A1,0,100,", "A1,0,100,5,") if where == "first row" else None
    falling = falling or FALLING.replace("A1,10,95,", "A1,10,95,5,")
    folder = write_series(tmp_path / "s", falling_head=falling)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        problems = problems_of(folder)
    row = 2 if where == "first row" else 3
    assert problems == [
        f"falling_head.csv, row {row}: 5 cells where the header has 4: is there a comma in a "
        "value (a decimal comma, or text to put in quotes)?"
    ]


_THREAD_IMPORTS = """
import codecs
import sys
import kitchen.cli  # as python -m kitchen has, when report parses its series ahead
from kitchen.io import read_ahead

# what read_ahead loads on the calling thread, before its thread starts
import scipy.special
codecs.lookup("utf-8-sig")
imported = set()
for folder in sys.argv[1:]:
    before = set(sys.modules)
    read_ahead(folder).join()
    imported |= set(sys.modules) - before
print(sorted(imported))
"""


def test_parsing_ahead_imports_nothing_on_its_thread():
    # the caller imports other modules meanwhile: two threads importing at once can each
    # wait on a module the other holds (a fresh interpreter, as python -m kitchen starts)
    import subprocess
    import sys

    from series_files import SAMPLES

    folders = [SAMPLES / name for name in ("clay_liner", "drainage_sand", "flexible_wall_clay")]
    folders.append(SAMPLES / "transducer_log")
    done = subprocess.run(
        [sys.executable, "-c", _THREAD_IMPORTS, *map(str, folders)],
        capture_output=True,
        text=True,
        check=True,
    )
    assert done.stdout.strip() == "[]", done.stdout


def test_a_table_parsed_ahead_is_taken_once_and_only_while_unchanged(tmp_path):
    from kitchen.io import read_ahead
    from kitchen.io.raw_tables import _AHEAD

    folder = write_series(tmp_path / "s")
    plain, files = read_tables(folder)
    read_ahead(folder).join()
    assert set(_AHEAD) == set(files)
    ahead, _ = read_tables(folder)
    assert not _AHEAD  # taken, and not held
    for name, table in plain.items():
        pd.testing.assert_frame_equal(ahead[name].frame, table.frame)
    # a readings file written again after it was parsed ahead is parsed again
    read_ahead(folder).join()
    (folder / "falling_head.csv").write_text(FALLING.replace("A1,10,95,", "A1,10,94.5,"))
    again, _ = read_tables(folder)
    assert not _AHEAD
    changed = again["falling_head"].frame
    assert not changed.equals(plain["falling_head"].frame)
    # and a problem found ahead is named as a plain reading names it
    (folder / "specimens.csv").write_text(SPECIMENS.replace(",5\nA2", ",5,7\nA2"))
    read_ahead(folder).join()
    with pytest.raises(SeriesError, match="row 2: 9 cells where the header has 8"):
        read_tables(folder)
    assert read_ahead(tmp_path / "book.xlsx") is None  # a workbook is read as it comes


def test_a_later_row_filling_the_empty_cell_of_a_first_row_too_wide_is_named(tmp_path):
    # a first row with an empty cell beyond the header makes the parser take rows that
    # wide: the later row with a value there is found by scanning the file, which the
    # reader now does whenever the first row is that wide, not when the parser warns
    import warnings

    falling = FALLING.replace("A1,0,100,20", "A1,0,100,20,").replace("A1,10,95,", "A1,10,95,5,")
    folder = write_series(tmp_path / "s", falling_head=falling)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        problems = problems_of(folder)
    assert problems == [
        "falling_head.csv, row 3: 5 cells where the header has 4: is there a comma in a "
        "value (a decimal comma, or text to put in quotes)?"
    ]
