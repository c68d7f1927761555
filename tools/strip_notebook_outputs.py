"""Strip a notebook's outputs, as git stores it: a clean filter, standard input to output.

Running a notebook in JupyterLab writes its outputs, execution counts and widget state
into the file (each live plotly figure adds megabytes). The notebooks are committed
without them, so that a notebook someone ran reads as unchanged to git. Git calls this
script on every ``*.ipynb`` (``.gitattributes``: ``filter=strip-notebook-outputs``) once a
clone has the filter configured, which ``make lab`` and ``make git-filter`` do::

    git config filter.strip-notebook-outputs.clean "python3 tools/strip_notebook_outputs.py"

What goes: every code cell's outputs and execution count; the notebook's saved widget
state (``metadata.widgets``); the per-run cell metadata JupyterLab adds (``execution``,
``collapsed``, ``scrolled``); the kernel's version details in ``language_info`` (its name
stays). The rest — sources, cell ids, tags, kernel spec — is kept as it is. The notebook
is written as JupyterLab writes it (one-space indent, UTF-8, a final newline), so a
notebook already clean comes out byte for byte the same. Input that is not a notebook
(a file in the middle of a merge, with conflict markers) is passed through unchanged: a
filter must never lose a file.

Standard library only: no dependency for the contributor to install.
"""

from __future__ import annotations

import json
import sys

RUN_CELL_METADATA = ("execution", "collapsed", "scrolled", "ExecuteTime")
"""Cell metadata that records a run, not the notebook."""


def strip_outputs(notebook: dict) -> dict:
    """The notebook without outputs, execution counts, widget state or run metadata."""
    cells = []
    for cell in notebook.get("cells", []):
        cell = dict(cell)
        if cell.get("cell_type") == "code":
            cell["outputs"] = []
            cell["execution_count"] = None
        metadata = {k: v for k, v in cell.get("metadata", {}).items() if k not in RUN_CELL_METADATA}
        if "metadata" in cell:
            cell["metadata"] = metadata
        cells.append(cell)
    clean = dict(notebook, cells=cells)
    metadata = {k: v for k, v in notebook.get("metadata", {}).items() if k != "widgets"}
    language = metadata.get("language_info")
    if isinstance(language, dict) and "name" in language:
        metadata["language_info"] = {"name": language["name"]}
    clean["metadata"] = metadata
    return clean


def clean_text(text: str) -> str:
    """A notebook's text, stripped; text that is not a notebook, unchanged."""
    try:
        notebook = json.loads(text)
    except ValueError:
        return text
    if not isinstance(notebook, dict) or "cells" not in notebook:
        return text
    return json.dumps(strip_outputs(notebook), indent=1, ensure_ascii=False) + "\n"


def main() -> int:
    data = sys.stdin.buffer.read()
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError:
        sys.stdout.buffer.write(data)
        return 0
    sys.stdout.buffer.write(clean_text(text).encode("utf-8"))
    return 0


if __name__ == "__main__":
    sys.exit(main())
