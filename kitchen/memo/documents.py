"""Documents a word processor opens: the memo and the field-check report as ``.docx``.

A report is given as a list of blocks — headings, paragraphs, bulleted lists, tables and
images — and written as an Office Open XML word-processing document (ECMA-376, the format
of ``.docx``) by python-docx. Tables are real tables (a reviewer pastes their cells), the
charts are the pack's PNG images, and every document ends with the methods and their
sources, the cautions and the provenance. The document's core properties name the tool
and point to the cautions. Building the blocks of the memo and of the field check is done
here too, from the same tables the HTML pages show.

References
----------
ECMA-376, *Office Open XML File Formats*, Part 1 (WordprocessingML), the format written;
python-docx (https://python-docx.readthedocs.io), the library that writes it.
"""

from __future__ import annotations

import io
import zipfile
from dataclasses import dataclass

import numpy as np
import pandas as pd

from kitchen import __version__
from kitchen.display_units import column_format

from .markup import number_text

__all__ = [
    "Heading",
    "Paragraph",
    "Bullets",
    "Table",
    "Image",
    "document_bytes",
    "package_bytes",
    "frame_table",
    "memo_document",
    "methods_blocks",
    "provenance_blocks",
]

IMAGE_WIDTH_CM = 16.0
"""Width of a chart on the page: an A4 or letter page less its margins. [cm]"""


@dataclass(frozen=True)
class Heading:
    text: str
    level: int = 1


@dataclass(frozen=True)
class Paragraph:
    text: str


@dataclass(frozen=True)
class Bullets:
    items: tuple[str, ...]


@dataclass(frozen=True)
class Table:
    """A table: its column titles and rows of text (already formatted)."""

    header: tuple[str, ...]
    rows: tuple[tuple[str, ...], ...]
    caption: str = ""


@dataclass(frozen=True)
class Image:
    """A PNG image and the caption under it."""

    png: bytes
    caption: str


def _cell(value, number_format=None) -> str:
    if value is None:
        return ""
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, float):
        if number_format is not None and np.isfinite(value):
            return number_format.text(value)
        return number_text(value, 4)
    if isinstance(value, pd.Timestamp):
        return f"{value:%Y-%m-%d %H:%M}"
    if pd.api.types.is_scalar(value) and pd.isna(value):
        return ""
    return str(value)


def frame_table(frame: pd.DataFrame, caption: str = "") -> Table:
    """A table block of a DataFrame: its columns as titles, each cell as text — a number in
    the one format of its column's quantity (:func:`kitchen.display_units.column_format`,
    as the report page and results.xlsx write it), else to four significant figures; a dash
    where a number is missing, empty where text is."""
    formats = [column_format(str(column)) for column in frame.columns]
    rows = tuple(
        tuple(_cell(v, f) for v, f in zip(row, formats, strict=True))
        for row in frame.itertuples(index=False)
    )
    return Table(tuple(str(c) for c in frame.columns), rows, caption)


def provenance_blocks(provenance) -> list:
    """The provenance (:class:`kitchen.memo.Provenance`) as a heading, a table of settings
    and a table of input files with their SHA-256."""
    settings = [
        ("tool", f"kitchen {provenance.tool_version}"),
        ("exported", provenance.created),
        ("series", f"{provenance.series} ({provenance.source})"),
        *((f"setting: {k}", v) for k, v in provenance.settings),
        ("revisions applied", str(provenance.revision_count)),
        ("revision log SHA-256", provenance.revision_log_sha256 or "no revision log"),
        ("environment", ", ".join(f"{n} {v}" for n, v in provenance.environment)),
    ]
    files = tuple((f.path, str(f.size), f.sha256) for f in provenance.input_files)
    return [
        Heading("Provenance"),
        Table(("item", "value"), tuple(settings)),
        Table(("input file", "bytes", "SHA-256"), files, "The input files as read."),
    ]


def document_bytes(title: str, blocks) -> bytes:
    """The ``.docx`` of a report.

    Parameters
    ----------
    title : str
        The document's title (its first line, and its core property).
    blocks : iterable of Heading, Paragraph, Bullets, Table or Image
        The body, in order.

    Returns
    -------
    bytes
        The document; write it with :func:`kitchen.io.atomic_write_bytes`.
    """
    import docx
    from docx.shared import Cm, Pt

    document = docx.Document()
    normal = document.styles["Normal"]
    normal.font.name = "DejaVu Serif"
    normal.font.size = Pt(10)
    document.add_heading(title, level=0)
    for block in blocks:
        if isinstance(block, Heading):
            document.add_heading(block.text, level=block.level)
        elif isinstance(block, Paragraph):
            document.add_paragraph(block.text)
        elif isinstance(block, Bullets):
            for item in block.items:
                document.add_paragraph(item, style="List Bullet")
        elif isinstance(block, Table):
            # every row made at once and each cell written once (a row added at a time
            # costs about 1.5 ms: a pack of 1 000 tests has tables of 1 000 rows)
            table = document.add_table(rows=1 + len(block.rows), cols=len(block.header))
            table.style = "Table Grid"
            size = Pt(8)
            for number, (row, texts) in enumerate(
                zip(table.rows, [block.header, *block.rows], strict=True)
            ):
                for cell, text in zip(row.cells, texts, strict=True):
                    cell.text = text
                    for run in cell.paragraphs[0].runs:
                        run.font.size = size
                        run.bold = True if number == 0 else None
            if block.caption:
                document.add_paragraph(block.caption, style="Caption")
        elif isinstance(block, Image):
            document.add_picture(io.BytesIO(block.png), width=Cm(IMAGE_WIDTH_CM))
            document.add_paragraph(block.caption, style="Caption")
        else:
            raise TypeError(f"not a block of a document: {type(block).__name__}")
    properties = document.core_properties
    properties.title = title
    properties.author = f"kitchen {__version__}"
    properties.comments = "Read the section Cautions before relying on any number here."
    return package_bytes(document)


_PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"
"""The first eight bytes of every PNG file (PNG specification, ISO/IEC 15948, 5.2)."""


class _StoredImagesWriter:
    """The zip archive of a package as python-docx's zip writer makes it (every part
    deflated), but with its PNG images stored as they are: a PNG is deflated already."""

    def __init__(self, file) -> None:
        self._zip = zipfile.ZipFile(file, "w", compression=zipfile.ZIP_DEFLATED)

    def write(self, pack_uri, blob: bytes) -> None:
        stored = blob[:8] == _PNG_SIGNATURE
        self._zip.writestr(
            pack_uri.membername,
            blob,
            compress_type=zipfile.ZIP_STORED if stored else zipfile.ZIP_DEFLATED,
        )

    def close(self) -> None:
        self._zip.close()


def package_bytes(document) -> bytes:
    """A python-docx document as the bytes of its ``.docx``, its PNG images stored in the
    archive rather than deflated again.

    ``Document.save`` deflates every part, and deflating a PNG, deflated already, costs
    the most of a memo's saving for little: the clay pack's 18 chart images, 0.145 s of a
    core to save the document against 0.014 s with them stored, for a file 12 % smaller
    (4.9 against 5.6 MB; zlib's level 1 costs as much as its level 6 here). A zip
    archive may hold each member stored or deflated (ECMA-376 Part 2, Open Packaging
    Conventions, allows both). The parts are written as ``OpcPackage.save`` writes them,
    by python-docx's own ``PackageWriter`` steps with this writer in place of its zip
    writer; a python-docx without those steps saves the document its own way
    (``tests/memo/test_documents.py`` checks that the images are stored, so a change there
    is noticed).
    """
    package = document.part.package
    try:
        from docx.opc.pkgwriter import PackageWriter

        steps = (
            PackageWriter._write_content_types_stream,
            PackageWriter._write_pkg_rels,
            PackageWriter._write_parts,
        )
    except (ImportError, AttributeError):
        steps = None
    buffer = io.BytesIO()
    if steps is None:
        document.save(buffer)
        return buffer.getvalue()
    parts = package.parts
    for part in parts:  # as OpcPackage.save does before it writes
        part.before_marshal()
    writer = _StoredImagesWriter(buffer)
    write_types, write_rels, write_parts = steps
    write_types(writer, parts)
    write_rels(writer, package.rels)
    write_parts(writer, parts)
    writer.close()
    return buffer.getvalue()


def methods_blocks(methods) -> list:
    """The methods and their sources, (step, method, source) rows, as a heading and a table."""
    return [
        Heading("Methods and their sources"),
        Table(("step", "method", "source"), tuple(tuple(row) for row in methods)),
    ]


def memo_document(
    analysis, tables: dict, charts, provenance, cautions, criterion_text: str, methods
) -> bytes:
    """The memo as a ``.docx``: summary, the specimens, fits and checks tables, the charts
    (PNG), the notes, the methods with their sources, the cautions and the provenance.

    Parameters
    ----------
    analysis : kitchen.analysis.SeriesAnalysis
    tables : dict of str to pandas.DataFrame
        The pack's tables (``specimens``, ``fits``, ``checks``; others are left to the
        workbook).
    charts : iterable of (str, bytes)
        Each chart's title and PNG image (none without images).
    provenance : Provenance
    cautions : iterable of str
    criterion_text : str
        The criterion in words.
    methods : iterable of (step, method, source)
    """
    counts = ", ".join(f"{verdict}: {n}" for verdict, n in analysis.counts.items())
    summary = (
        f"Series {provenance.series}, {len(analysis.specimens)} specimens. Against the "
        f"{criterion_text}: {counts}."
    )
    if analysis.geometric_mean is not None:
        mean = analysis.geometric_mean
        summary += (
            f" Geometric mean k = {mean.geometric_mean:.3g} m/s "
            f"({100 * mean.confidence:g} %: {mean.low:.3g} to {mean.high:.3g} m/s), n = {mean.n}."
        )
    blocks = [
        Heading("Cautions"),
        Bullets(tuple(cautions)),
        Heading("Summary"),
        Paragraph(summary),
        Heading("Specimens"),
        frame_table(tables["specimens"]),
        Heading("Charts"),
    ]
    images = [Image(png, title) for title, png in charts]
    blocks += images or [Paragraph("Exported without images: see the pack's HTML charts.")]
    blocks += [
        Heading("Fits"),
        frame_table(tables["fits"]),
        Heading("Checks"),
        frame_table(tables["checks"]),
        Heading("Notes"),
        Bullets(tuple(analysis.notes) or ("none",)),
        *methods_blocks(methods),
        *provenance_blocks(provenance),
    ]
    return document_bytes(f"Hydraulic conductivity memo: {provenance.series}", blocks)
