"""The cautions: one wording, quoted as it is by the README and every notebook.

The exported items (the report page, each chart page, the static images, the workbook) are
checked to carry the same sentences in tests/memo/test_pack.py and
tests/memo/test_workbook.py, and the chart caption in tests/charts/test_style.py.
"""

import json
import re
from pathlib import Path

import pytest

from kitchen.cautions import CAUTIONS, FIELD_CAUTIONS

ROOT = Path(__file__).resolve().parents[1]
NOTEBOOKS = sorted((ROOT / "notebooks").glob("*.ipynb"))


def _words(markdown: str) -> str:
    """Markdown as the reader sees its words: quote marks dropped, line breaks as spaces."""
    lines = [re.sub(r"^\s*>\s?", "", line) for line in markdown.splitlines()]
    return " ".join(" ".join(lines).split())


def _readme_section(heading: str) -> str:
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    start = text.index(f"\n## {heading}\n")
    end = text.find("\n## ", start + 1)
    return text[start : end if end > 0 else None]


def test_the_field_value_is_the_higher():
    # Daniel (1984), J. Geotech. Eng. 110(2):285, and Benson, Daniel & Boutwell (1999),
    # J. Geotech. Geoenviron. Eng. 125(5): field k of compacted clay liners is often 10 to
    # 1000 times the laboratory k (from memory)
    assert "the field value is often 10 to 1000 times higher" in CAUTIONS[0]
    assert "lower" not in CAUTIONS[0]


def test_readme_cautions_section_quotes_every_caution():
    section = _words(_readme_section("Cautions"))
    for caution in CAUTIONS:
        assert caution in section


def test_readme_opening_note_quotes_the_cautions_and_nothing_else():
    lines = (ROOT / "README.md").read_text(encoding="utf-8").splitlines()
    first = next(i for i, line in enumerate(lines) if line.startswith("> **Cautions.**"))
    last = next(i for i in range(first, len(lines)) if not lines[i].startswith(">"))
    note = _words("\n".join(lines[first:last]))
    assert note.startswith("**Cautions.**")
    rest = note
    for caution in CAUTIONS:
        rest = rest.replace(caution, "")
    assert CAUTIONS[0] in note
    assert " ".join(rest.split()) == "**Cautions.** See [Cautions](#cautions) below."


@pytest.mark.parametrize("path", NOTEBOOKS, ids=lambda p: p.stem)
def test_each_notebook_quotes_every_caution(path):
    notebook = json.loads(path.read_text(encoding="utf-8"))
    sections = [
        _words("".join(cell["source"]))
        for cell in notebook["cells"]
        if cell["cell_type"] == "markdown" and "".join(cell["source"]).startswith("## Cautions")
    ]
    assert len(sections) == 1
    for caution in CAUTIONS:
        assert caution in sections[0]


def test_every_notebook_is_checked():
    assert [p.stem[:2] for p in NOTEBOOKS] == ["01", "02", "03", "04", "05", "06", "07"]


def test_the_field_cautions_are_quoted_by_the_field_notebook_and_the_readme():
    notebook = json.loads((ROOT / "notebooks" / "07_field_checks.ipynb").read_text("utf-8"))
    section = next(
        _words("".join(cell["source"]))
        for cell in notebook["cells"]
        if "".join(cell["source"]).startswith("## Cautions")
    )
    readme = _words(_readme_section("Field checks"))
    for caution in FIELD_CAUTIONS:
        assert caution in section and caution in readme
