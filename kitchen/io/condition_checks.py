"""The checks of a flexible-wall test's conditions, across columns and against the specimens.

``flexible_wall`` holds one row per specimen tested in a flexible-wall cell: the cell and
back pressure during permeation, the B-value at the end of saturation, and the specimen's
height and diameter (or their changes) after consolidation. ``b_value_checks`` holds the
B-value checks made during saturation, one row per check, in the order they were made.
Every problem is added to a list as an :class:`~kitchen.io.raw_tables.InputProblem`
naming the file, the row, the column and the specimen.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from .raw_tables import InputProblem, RawTable
from .table_checks import TextCodes, check_known_specimens, report_rows

__all__ = ["FLOW_DIRECTIONS", "check_flexible_wall", "check_b_value_checks", "check_record_texts"]

FLOW_DIRECTIONS = ("upward", "downward", "horizontal")
"""The words ``flow_direction`` of the specimens table takes (upward: in at the bottom)."""


def _rows_checked(table, ids, known, problems) -> bool:
    """Name the rows of unknown specimens; False when the table has no specimen column
    (named with the header), so nothing can be checked across its rows."""
    if ids is None:
        return False
    if known is not None:
        check_known_specimens(table, ids, known, problems)
    return True


def check_flexible_wall(
    table: RawTable,
    frame: pd.DataFrame,
    ids: TextCodes | None,
    specimens: pd.DataFrame,
    known: set | None,
    problems: list[InputProblem],
) -> pd.DataFrame:
    """Checks across the columns of ``flexible_wall`` and against the specimens table.

    One row per specimen; a back pressure below the cell pressure (an effective
    consolidation stress above zero); the height after consolidation given once (as
    ``consolidated_height`` or as ``height_change``) and the area once (as
    ``consolidated_diameter`` or as ``volume_change``), each leaving a specimen of
    positive size.
    """
    if not _rows_checked(table, ids, known, problems):
        return frame
    duplicated = (frame["specimen"].duplicated(keep=False) & frame["specimen"].notna()).to_numpy()
    report_rows(problems, table, duplicated, "specimen", "specimen given more than once", ids=ids)
    cell, back = frame["cell_pressure"].to_numpy(float), frame["back_pressure"].to_numpy(float)
    with np.errstate(invalid="ignore"):
        report_rows(
            problems,
            table,
            np.isfinite(cell) & np.isfinite(back) & (back >= cell),
            "back_pressure",
            "back pressure at or above the cell pressure: the effective stress would be zero "
            "or less (the membrane would lift off the specimen)",
            ids=ids,
        )
    for first, second in (
        ("consolidated_height", "height_change"),
        ("consolidated_diameter", "volume_change"),
    ):
        both = frame[first].notna().to_numpy() & frame[second].notna().to_numpy()
        report_rows(problems, table, both, second, f"give {first} or {second}, not both", ids=ids)
    by_id = specimens.set_index("specimen")
    names = frame["specimen"].astype(object)
    height = names.map(by_id["height"]).to_numpy(float)
    diameter = names.map(by_id["diameter"]).to_numpy(float)
    volume = np.pi * diameter**2 / 4 * height
    change = frame["height_change"].to_numpy(float)
    volume_change = frame["volume_change"].to_numpy(float)
    with np.errstate(invalid="ignore"):
        report_rows(
            problems,
            table,
            np.isfinite(change) & np.isfinite(height) & (change >= height),
            "height_change",
            "the height change is as large as the specimen's height: it is the shortening "
            "during consolidation (positive), not the height",
            ids=ids,
        )
        report_rows(
            problems,
            table,
            np.isfinite(volume_change) & np.isfinite(volume) & (volume_change >= volume),
            "volume_change",
            "the volume change is as large as the specimen's volume: it is the volume "
            "expelled during consolidation (positive), not the volume",
            ids=ids,
        )
    return frame


def check_b_value_checks(
    table: RawTable,
    frame: pd.DataFrame,
    ids: TextCodes | None,
    known: set | None,
    problems: list[InputProblem],
) -> None:
    """Checks of ``b_value_checks``: known specimens, and a pore-pressure increment no
    larger than about the cell-pressure increment (B = Δu/Δσ3 above 1.2 is a reading or
    unit written wrongly)."""
    if not _rows_checked(table, ids, known, problems):
        return
    cell = frame["cell_pressure_increment"].to_numpy(float)
    pore = frame["pore_pressure_increment"].to_numpy(float)
    with np.errstate(invalid="ignore", divide="ignore"):
        report_rows(
            problems,
            table,
            np.isfinite(pore) & np.isfinite(cell) & (cell > 0) & (pore / cell > 1.2),
            "pore_pressure_increment",
            "the pore pressure rose by more than 1.2 times the cell pressure's increment "
            "(B = Δu/Δσ3 is at most about 1): check the readings and their units",
            ids=ids,
        )


def check_record_texts(table: RawTable, frame: pd.DataFrame, problems: list[InputProblem]):
    """The specimens table's ``flow_direction`` is one of :data:`FLOW_DIRECTIONS`."""
    if "flow_direction" not in table.frame.columns:
        return
    words = frame["flow_direction"].astype("string").str.strip().str.lower()
    bad = (words.notna() & ~words.isin(FLOW_DIRECTIONS)).to_numpy(dtype=bool)
    report_rows(
        problems,
        table,
        bad,
        "flow_direction",
        f"expected one of {', '.join(FLOW_DIRECTIONS)} (upward: the water enters at the bottom)",
        ids=TextCodes.of(frame["specimen"]),
    )
    frame["flow_direction"] = words.astype("string")
