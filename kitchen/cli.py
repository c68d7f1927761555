"""The command line: a thin layer over the package's functions.

``python -m kitchen report SERIES --out DIR`` reduces a series and writes its results.
Input problems are printed as a list (file, row, column, what was expected) and the
command exits with status 2; it never shows a traceback for bad input.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from .results import Settings, results_table, series_results
from .series import SeriesError, load_series
from .water import VISCOSITY_METHODS

__all__ = ["main", "build_parser"]

EXIT_INPUT = 2


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="python -m kitchen",
        description="Hydraulic conductivity of a compacted-soil series from laboratory tests.",
    )
    commands = parser.add_subparsers(dest="command", required=True)
    report = commands.add_parser("report", help="reduce a series and write its results")
    report.add_argument("series", type=Path, help="series folder or .xlsx workbook")
    report.add_argument("--out", type=Path, required=True, help="folder for the results")
    report.add_argument(
        "--reference-temperature",
        type=float,
        default=20.0,
        help="temperature k is corrected to, degC (default 20)",
    )
    report.add_argument(
        "--viscosity",
        choices=sorted(VISCOSITY_METHODS),
        default="kestin",
        help="water viscosity: kestin (Kestin et al. 1978, default), iapws (IAPWS 2008), "
        "d5084 (the ASTM D5084 equation)",
    )
    return parser


def _report(arguments) -> int:
    from .files import write_csv

    settings = Settings(arguments.reference_temperature, arguments.viscosity)
    series = load_series(arguments.series)
    results = series_results(series, settings)
    table = results_table(results, settings)
    path = write_csv(arguments.out / "results.csv", table)
    print(f"{len(table)} result row(s) for {series.name} written to {path}")
    return 0


def main(argv: list[str] | None = None) -> int:
    """Entry point; returns the exit status."""
    parser = build_parser()
    arguments = parser.parse_args(argv)
    try:
        if arguments.command == "report":
            return _report(arguments)
    except SeriesError as error:
        print(f"kitchen: {arguments.series}: {error}", file=sys.stderr)
        return EXIT_INPUT
    except (ValueError, OSError) as error:
        print(f"kitchen: {error}", file=sys.stderr)
        return EXIT_INPUT
    parser.error(f"unknown command {arguments.command!r}")
    return EXIT_INPUT
