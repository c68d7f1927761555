"""The markup the memo's pages share: the script of a page, and tables as HTML."""

import hashlib

import pytest
from html_cells import TableCells

from kitchen.memo.markup import ChartScript, table_markup

INLINED = ChartScript("/*PLOTLY-JS*/", "4.1.1")


@pytest.mark.parametrize(
    "path, folder, expected",  # POSIX relative paths, common practice, no source
    [
        ("charts/plotly.min.js", "", "charts/plotly.min.js"),
        ("charts/plotly.min.js", "charts", "plotly.min.js"),
        ("charts/plotly.min.js", "pages/specimens", "../../charts/plotly.min.js"),
        ("plotly.min.js", "charts", "../plotly.min.js"),
    ],
)
def test_script_path_relative_to_a_page(path, folder, expected):
    assert ChartScript("x", "1", path).source(folder) == expected


def test_inlined_script_has_no_file_to_load():
    with pytest.raises(ValueError, match="inlined in each page"):
        INLINED.source("charts")
    assert INLINED.element("charts") == '<script type="text/javascript">/*PLOTLY-JS*/</script>\n'
    assert INLINED.notice("charts") == ("", "")


def test_script_hash_is_that_of_its_bytes():
    text = "/* ρ */ var a = 1;"  # not ASCII: hashed as UTF-8, counted in bytes
    script = ChartScript(text, "1", "charts/plotly.min.js")
    assert script.sha256 == hashlib.sha256(text.encode("utf-8")).hexdigest()
    assert len(script.content) == len(text) + 1  # ρ takes two bytes in UTF-8 (RFC 3629)


def test_table_cells_read_back_by_an_html_parser():
    # read back by Python's own html.parser (a reference parser): header cells, then one
    # cell per value, numbers right-aligned and kept on one line by their class
    parser = TableCells()
    parser.feed(
        table_markup(["specimen", "k"], [("A &amp; B", "1.2e-9")], numeric=(1,), nowrap=(0,))
    )
    assert parser.cells == [
        ("th", None, "specimen"),
        ("th", None, "k"),
        ("td", "nowrap", "A & B"),
        ("td", "number", "1.2e-9"),
    ]
