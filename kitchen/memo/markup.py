"""The markup the memo's pages share: style, escaping, numbers, tables, the page and its script.

Every page of the pack is built from these as text: :data:`STYLE` inline (no request to the
network), every value from the input escaped (:func:`escape`), numbers to a few significant
figures (:func:`number_text`), tables whose cells are already HTML (:func:`table_markup`,
which the notebook panels' tables use too), the page skeleton (:func:`page_markup`), the
cautions box (:func:`cautions_markup`), and the :class:`ChartScript` that says how a page
gets plotly.js — a file of the pack loaded by a relative path, with a notice shown when it
is missing, or inlined in every page.
"""

from __future__ import annotations

import hashlib
import html
import math
import posixpath
from dataclasses import dataclass
from functools import cached_property

import pandas as pd

from kitchen.io import printable

__all__ = [
    "STYLE",
    "ChartScript",
    "cautions_markup",
    "escape",
    "number_text",
    "page_markup",
    "table_markup",
]

STYLE = """
body { font-family: 'DejaVu Serif', 'Liberation Serif', Georgia, serif; color: #1d2731;
       margin: 0; background: #fbfbf9; line-height: 1.45; }
main { max-width: 1060px; margin: 0 auto; padding: 24px 28px 48px; background: white; }
h1 { font-size: 1.6em; margin: 0.2em 0 0.1em; }
h2 { font-size: 1.2em; border-bottom: 1px solid #1d2731; padding-bottom: 2px; margin-top: 1.8em; }
h3 { font-size: 1.0em; margin-top: 1.4em; }
.lede { color: #69737d; margin-top: 0; }
.cautions { border-left: 4px solid #a33b20; background: #fbf3f0; padding: 8px 16px; }
.cautions li { margin: 4px 0; }
table { border-collapse: collapse; font-size: 0.86em; margin: 8px 0; }
th, td { border-bottom: 1px solid #e4e7ea; padding: 3px 8px; text-align: left;
         vertical-align: top; }
th { border-bottom: 1.5px solid #1d2731; }
td.nowrap, span.nowrap { white-space: nowrap; }
td.number { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
.chart { margin: 12px 0 28px; page-break-inside: avoid; }
.note { color: #69737d; font-size: 0.86em; }
code, .hash { font-family: 'DejaVu Sans Mono', monospace; font-size: 0.85em;
              word-break: break-all; }
@media print { body { background: white; } main { padding: 0; } }
"""


def escape(value) -> str:
    """`value` as text safe inside HTML (``&``, ``<``, ``>`` and quotes escaped, control
    characters as their escapes, :func:`kitchen.io.printable`; None: "")."""
    return html.escape(printable("" if value is None else str(value)))


def number_text(value, digits: int = 3) -> str:
    """A number to `digits` significant figures; "–" when missing, "∞" when infinite."""
    if value is None or pd.isna(value):
        return "–"
    value = float(value)
    if math.isinf(value):
        return "∞" if value > 0 else "−∞"
    return f"{value:.{digits}g}"


def table_markup(header, rows, numeric=(), nowrap=(), classes=None) -> str:
    """An HTML table whose header and cells are HTML already (escape text with :func:`escape`).

    Parameters
    ----------
    header : iterable of str
        The column titles.
    rows : iterable of iterable of str
        The cells of each row.
    numeric, nowrap : iterable of int
        Positions of the columns whose cells get the class ``number`` (right-aligned, on one
        line) or ``nowrap`` (on one line) of :data:`STYLE`; ``numeric`` wins.
    classes : dict of int to str, optional
        A class of the caller's own for the cells of other columns, by position.
    """
    kinds = dict(classes or {})
    kinds.update(dict.fromkeys(nowrap, "nowrap"))
    kinds.update(dict.fromkeys(numeric, "number"))
    head = "".join(f"<th>{h}</th>" for h in header)
    body = []
    for row in rows:
        cells = "".join(
            f'<td class="{kinds[i]}">{c}</td>' if i in kinds else f"<td>{c}</td>"
            for i, c in enumerate(row)
        )
        body.append(f"<tr>{cells}</tr>")
    return f"<table><thead><tr>{head}</tr></thead><tbody>{''.join(body)}</tbody></table>"


@dataclass(frozen=True)
class ChartScript:
    """plotly.js as the pages of a pack load it, and what a reviewer can check it against.

    Attributes
    ----------
    code : str
        plotly.js itself (``plotly.offline.get_plotlyjs()``).
    version : str
        The plotly.js version (``plotly.offline.get_plotlyjs_version()``).
    path : str or None
        The file holding `code` inside the pack, ``/``-separated from the pack's folder
        (``charts/plotly.min.js``), which each page loads by a path relative to its own
        folder; None when every page inlines `code`.
    """

    code: str
    version: str
    path: str | None = None

    @cached_property
    def content(self) -> bytes:
        """The bytes of the file at `path` (the code in UTF-8)."""
        return self.code.encode("utf-8")

    @cached_property
    def sha256(self) -> str:
        """SHA-256 of :attr:`content`, in hex."""
        return hashlib.sha256(self.content).hexdigest()

    def source(self, folder: str) -> str:
        """The path of the file relative to a page in `folder` (``""``: the pack's folder)."""
        if self.path is None:
            raise ValueError("this plotly.js is inlined in each page: it has no file to load")
        return posixpath.relpath(self.path, folder or ".")

    def element(self, folder: str) -> str:
        """The ``<script>`` element that gives a page in `folder` plotly.js."""
        if self.path is None:
            return f'<script type="text/javascript">{self.code}</script>\n'
        return f'<script type="text/javascript" src="{escape(self.source(folder))}"></script>\n'

    def notice(self, folder: str) -> tuple[str, str]:
        """A hidden notice for the top of a page in `folder`, and the check that shows it.

        The check, placed at the end of the page, reveals the notice when plotly.js did not
        load; an inlined script always loads, so it needs neither (two empty strings).
        """
        if self.path is None:
            return "", ""
        text = (
            "The interactive charts of this page did not load: they need plotly.js, which "
            f"the page loads from <code>{escape(self.source(folder))}</code> (relative to the "
            "page), and it was not found. Open the page from the memo pack's folder, kept "
            "whole (unzip the pack first), or ask for a pack exported self-contained. The "
            "PNG and SVG charts of the pack need no script."
        )
        notice = f'<p class="cautions" id="chart-script-missing" hidden>{text}</p>\n'
        check = (
            '<script>if (typeof Plotly === "undefined") '
            '{ document.getElementById("chart-script-missing").hidden = false; }</script>\n'
        )
        return notice, check


def page_markup(title: str, body: str, head_script: str = "") -> str:
    """A whole page: `title` (escaped here), :data:`STYLE` inline, `head_script`, `body`."""
    return (
        '<!DOCTYPE html>\n<html lang="en">\n<head>\n<meta charset="utf-8">\n'
        f'<meta name="generator" content="kitchen">\n<title>{escape(title)}</title>\n'
        f"<style>{STYLE}</style>\n{head_script}</head>\n<body><main>\n{body}\n</main></body>\n"
        "</html>\n"
    )


def cautions_markup(cautions) -> str:
    """The cautions (plain text, escaped here) as a framed list headed "Cautions"."""
    items = "".join(f"<li>{escape(text)}</li>" for text in cautions)
    return f'<section class="cautions"><strong>Cautions</strong><ul>{items}</ul></section>'
