"""How long each notebook's cells take in a fresh kernel, as an engineer opening it feels.

    .venv/bin/python tests/benchmarks/notebook_cells.py            # notebooks 01 to 05
    .venv/bin/python tests/benchmarks/notebook_cells.py --rounds 3

Each notebook is run whole in a kernel of its own (nbclient, the way ``nbval`` and
JupyterLab's Run All run it), on a scratch copy of the notebooks folder so that no output
or working copy is left behind; the time of every code cell comes from the kernel's own
start and end stamps. The panel cell is the first that builds a panel (``…_panel(``); its
target is under 1.5 s (printed, median of the rounds), the first cell (the import) and the
slowest beside it. Exits with status 1
when a panel cell misses it.
"""

from __future__ import annotations

import argparse
import shutil
import statistics
import sys
import tempfile
from datetime import datetime
from pathlib import Path

import nbformat
from nbclient import NotebookClient

ROOT = Path(__file__).resolve().parents[2]
TARGET = 1.5
"""The panel cell's target in a fresh kernel. [s]"""


def _seconds(cell) -> float:
    stamps = cell.metadata.get("execution", {})
    start = stamps.get("iopub.execute_input") or stamps.get("shell.execute_reply.started")
    end = stamps.get("shell.execute_reply")
    return (datetime.fromisoformat(end) - datetime.fromisoformat(start)).total_seconds()


def cell_times(path: Path) -> list[tuple[str, float]]:
    """(first line of source, seconds) of every code cell of a notebook run in a new kernel."""
    notebook = nbformat.read(path, as_version=4)
    NotebookClient(
        notebook, timeout=600, kernel_name="python3", record_timing=True,
        resources={"metadata": {"path": str(path.parent)}},
    ).execute()  # fmt: skip
    return [
        (cell.source.splitlines()[0] if cell.source else "", _seconds(cell))
        for cell in notebook.cells
        if cell.cell_type == "code"
    ]


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--rounds", type=int, default=3)
    parser.add_argument("notebooks", nargs="*", help="names in notebooks/ (default: all)")
    arguments = parser.parse_args(argv)
    missed = []
    with tempfile.TemporaryDirectory(prefix="kitchen-cells-") as folder:
        work = Path(folder)
        shutil.copytree(ROOT / "notebooks", work / "notebooks")
        shutil.copytree(ROOT / "sample_data", work / "sample_data")
        names = arguments.notebooks or sorted(
            path.name for path in (work / "notebooks").glob("0*.ipynb")
        )
        for name in names:
            rounds = [cell_times(work / "notebooks" / name) for _ in range(arguments.rounds)]
            panel = next(i for i, (source, _) in enumerate(rounds[0]) if "_panel(" in source)
            panel_time = statistics.median(r[panel][1] for r in rounds)
            first = statistics.median(r[0][1] for r in rounds)
            slowest = max(range(len(rounds[0])), key=lambda i: rounds[0][i][1])
            met = panel_time < TARGET
            if not met:
                missed.append(name)
            print(
                f"{name:<26} panel cell {panel_time:5.2f} s (limit {TARGET:g} s) "
                f"{'met' if met else 'MISSED'}; first cell {first:4.2f} s; slowest cell "
                f"{rounds[0][slowest][0][:40]!r} {rounds[0][slowest][1]:.2f} s; "
                f"panel cell: {rounds[0][panel][0][:60]!r}; rounds: "
                + ", ".join(f"{r[panel][1]:.2f}" for r in rounds)
            )
    return 1 if missed else 0


if __name__ == "__main__":
    sys.exit(main())
