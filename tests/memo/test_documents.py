"""The .docx documents: built from blocks, read back (headings, table cells, images), and
rendered by a word processor where Debian's LibreOffice is installed."""

import shutil
import struct
import subprocess
import zlib
from io import BytesIO

import docx
import pandas as pd
import pytest
from series_files import SAMPLES

from kitchen.cautions import CAUTIONS
from kitchen.memo import document_bytes, export_memo_pack
from kitchen.memo.documents import Bullets, Heading, Image, Paragraph, Table
from kitchen.workspace import Workspace


def tiny_png(width=3, height=2) -> bytes:
    """A PNG of grey pixels, written by hand (PNG specification, ISO/IEC 15948: signature,
    IHDR, one IDAT of filtered rows, IEND)."""

    def chunk(kind, data):
        body = kind + data
        return struct.pack(">I", len(data)) + body + struct.pack(">I", zlib.crc32(body))

    rows = b"".join(b"\x00" + b"\x80" * width for _ in range(height))
    header = struct.pack(">IIBBBBB", width, height, 8, 0, 0, 0, 0)
    return (
        b"\x89PNG\r\n\x1a\n"
        + chunk(b"IHDR", header)
        + chunk(b"IDAT", zlib.compress(rows))
        + chunk(b"IEND", b"")
    )


def table_cells(table) -> list[list[str]]:
    return [[cell.text for cell in row.cells] for row in table.rows]


def test_a_document_reads_back_with_its_headings_tables_and_images():
    data = document_bytes(
        "A report",
        [
            Heading("Summary"),
            Paragraph("Two tests, one inside."),
            Bullets(("first", "second")),
            Table(("test", "verdict"), (("T1", "inside the zone"), ("T2", "outside the zone"))),
            Image(tiny_png(), "a chart"),
        ],
    )
    read = docx.Document(BytesIO(data))
    texts = [p.text for p in read.paragraphs]
    assert texts[0] == "A report" and "Summary" in texts and "Two tests, one inside." in texts
    assert "first" in texts and "a chart" in texts
    (table,) = read.tables
    assert table_cells(table) == [
        ["test", "verdict"],
        ["T1", "inside the zone"],
        ["T2", "outside the zone"],
    ]
    assert len(read.inline_shapes) == 1
    assert read.core_properties.author.startswith("kitchen")


def test_a_document_stores_its_images_and_holds_what_python_docx_saves():
    # a zip member may be stored or deflated (ECMA-376 Part 2, Open Packaging Conventions;
    # the zip format's "stored" method 0 and "deflated" method 8); the images are stored,
    # every other part deflated, and the members are those Document.save writes, byte for
    # byte (python-docx as the reference)
    import zipfile

    from kitchen.memo.documents import package_bytes

    def built():
        document = docx.Document()
        document.add_paragraph("Two charts.")
        for width in (3, 5):
            document.add_picture(BytesIO(tiny_png(width)))
        return document

    ours = zipfile.ZipFile(BytesIO(package_bytes(built())))
    saved = BytesIO()
    built().save(saved)
    theirs = zipfile.ZipFile(saved)
    assert ours.namelist() == theirs.namelist()
    for name in ours.namelist():
        if name != "docProps/core.xml":  # holds the time it was made
            assert ours.read(name) == theirs.read(name), name
    methods = {info.filename: info.compress_type for info in ours.infolist()}
    images = [name for name in methods if name.startswith("word/media/")]
    assert len(images) == 2 and all(methods[name] == zipfile.ZIP_STORED for name in images)
    others = [method for name, method in methods.items() if name not in images]
    assert others and all(method == zipfile.ZIP_DEFLATED for method in others)
    assert len(docx.Document(BytesIO(package_bytes(built()))).inline_shapes) == 2


def test_an_unknown_block_is_refused():
    with pytest.raises(TypeError, match="not a block of a document: str"):
        document_bytes("A report", ["loose text"])


@pytest.fixture(scope="module")
def memo_document(tmp_path_factory):
    out = tmp_path_factory.mktemp("memo_docx")
    workspace = Workspace(SAMPLES / "clay_liner")
    pack = export_memo_pack(workspace, out, images=False)
    return pack, docx.Document(str(out / "report.docx"))


def test_the_memo_document_carries_the_tables_cautions_methods_and_provenance(memo_document):
    pack, read = memo_document
    texts = [p.text for p in read.paragraphs]
    for caution in CAUTIONS:
        assert caution in texts
    tables = [table_cells(t) for t in read.tables]
    specimens = next(t for t in tables if t[0][0] == "specimen")
    assert [row[0] for row in specimens[1:]] == list(pack.analysis.specimens["specimen"])
    methods = next(t for t in tables if t[0] == ["step", "method", "source"])
    assert any("Daniel & Benson" in row[2] for row in methods)
    files = next(t for t in tables if t[0] == ["input file", "bytes", "SHA-256"])
    assert [row[2] for row in files[1:]] == [f.sha256 for f in pack.provenance.input_files]
    assert "report.docx" in {p.name for p in pack}


@pytest.mark.skipif(
    shutil.which("soffice") is None,
    reason="LibreOffice is not installed (Debian: apt-get install libreoffice-writer-nogui)",
)
def test_a_word_processor_renders_the_memo_document(memo_document, tmp_path):
    pack, _ = memo_document
    done = subprocess.run(
        ["soffice", "--headless", "--convert-to", "pdf", "--outdir", str(tmp_path),
         str(pack.folder / "report.docx")],
        capture_output=True, text=True, timeout=240, env={"HOME": str(tmp_path), "PATH": "/usr/bin:/bin"},
    )  # fmt: skip
    pdf = tmp_path / "report.pdf"
    assert done.returncode == 0, done.stderr
    assert pdf.read_bytes().startswith(b"%PDF") and pdf.stat().st_size > 10_000


def test_document_tables_write_each_number_in_its_columns_one_format():
    # the same format as the report page and results.xlsx (kitchen.display_units): k to
    # three significant figures, a density to 0.001 Mg/m3 (common practice, no source)
    from kitchen.memo.documents import frame_table

    frame = pd.DataFrame(
        {
            "specimen": ["QF-01", "QF-02"],
            "k20 [m/s]": [1.2837e-9, float("nan")],
            "dry_density [Mg/m3]": [1.70493, 1.6],
            "count": [3.0, 4.5],
        }
    )
    table = frame_table(frame)
    assert table.rows[0] == ("QF-01", "1.28×10⁻⁹", "1.705", "3")
    assert table.rows[1] == ("QF-02", "–", "1.600", "4.5")  # a number missing: a dash
