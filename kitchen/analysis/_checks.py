"""The input checks the series analyses share: numbers, tables, and results in the input's kind.

The functions of :mod:`~kitchen.analysis.compaction`, :mod:`~kitchen.analysis.saturation_lines`,
:mod:`~kitchen.analysis.compaction_zone`, :mod:`~kitchen.analysis.trends`,
:mod:`~kitchen.analysis.criterion` and :mod:`~kitchen.analysis.grading` take scalars, arrays or
Series, or a table with named columns.
These helpers turn them into float arrays, refuse what is not a finite number with a
message naming the element (its index or position) or the table row (its file line and
specimen), and give a result back in the kind of the inputs.
"""

from __future__ import annotations

import numpy as np
import pandas as pd


def finite_numbers(value, name: str) -> np.ndarray:
    """`value` as a float array; every element finite, or a ValueError naming where."""
    try:
        if isinstance(value, pd.Series):
            array = value.to_numpy(dtype=float, na_value=np.nan)
        else:
            array = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise ValueError(f"{name}: expected numbers, got {value!r:.80}") from None
    require_elements(
        value, array, np.isfinite(array), name, "a finite number (not NaN or infinite)"
    )
    return array


def shown_value(value) -> str:
    """repr of a value, numpy scalars as plain Python ones (1.5, not np.float64(1.5))."""
    return repr(value.item() if isinstance(value, np.generic) else value)


def element_place(value, position: int) -> str:
    if isinstance(value, pd.Series):
        return f"index {shown_value(value.index[position])}"
    return f"position {position}"


def require_elements(value, array: np.ndarray, ok, name: str, expected: str) -> None:
    """Raise a ValueError naming the elements of `value` where `ok` is False."""
    ok = np.broadcast_to(ok, np.shape(array))
    if ok.all():
        return
    flat = np.ravel(array)
    if np.ndim(array) == 0:
        raise ValueError(f"{name}: expected {expected}; got {shown_value(flat[0])}")
    bad = np.flatnonzero(~np.ravel(ok))
    shown = ", ".join(f"{shown_value(flat[i])} at {element_place(value, int(i))}" for i in bad[:5])
    more = f" and {bad.size - 5} more" if bad.size > 5 else ""
    raise ValueError(f"{name}: expected {expected}; got {shown}{more}")


def require_same_length(**arrays: np.ndarray) -> None:
    lengths = {name: np.size(a) for name, a in arrays.items() if np.ndim(a) > 0}
    if len(set(lengths.values())) > 1:
        listed = ", ".join(f"{name} has {n}" for name, n in lengths.items())
        raise ValueError(f"inputs must have one value per specimen; {listed}")


def like_inputs(result, *inputs):
    """`result` in the kind of the inputs: a Series (first Series' index), an array, a scalar."""
    for item in inputs:
        if isinstance(item, pd.Series):
            return pd.Series(np.broadcast_to(result, (len(item),)).copy(), index=item.index)
    if all(np.ndim(item) == 0 for item in inputs):
        return np.asarray(result).item()
    return np.asarray(result)


def table_row_name(table: pd.DataFrame, label) -> str:
    """Name a table row for a message: its file line and specimen when known."""
    where = f"index {shown_value(label)}"
    if "source_row" in table.columns and pd.notna(table.at[label, "source_row"]):
        where = f"row {int(table.at[label, 'source_row'])}"
    if "specimen" in table.columns:
        where += f" (specimen {shown_value(table.at[label, 'specimen'])})"
    return where


def require_columns(table, required: tuple[str, ...], what: str) -> None:
    if not isinstance(table, pd.DataFrame):
        raise ValueError(f"{what}: expected a pandas DataFrame, got {type(table).__name__}")
    missing = [c for c in required if c not in table.columns]
    if missing:
        raise ValueError(
            f"{what}: missing column(s) {', '.join(missing)}; "
            f"required: {', '.join(required)}; found: {', '.join(map(str, table.columns))}"
        )


def column_numbers(table: pd.DataFrame, column: str, allow_missing: bool) -> np.ndarray:
    """A float column as an array; non-numbers (and NaN unless `allow_missing`) raise
    naming the row."""
    given = table[column]
    if given.dtype.kind == "f":
        values = given.to_numpy(dtype=float)
        bad = np.isinf(values)
    else:
        values = pd.to_numeric(given, errors="coerce").to_numpy(dtype=float)
        bad = np.isnan(values) & given.notna().to_numpy() | np.isinf(values)
    if not allow_missing:
        bad |= np.isnan(values)
    if bad.any():
        rows = "; ".join(
            f"{table_row_name(table, i)}: {shown_value(table.at[i, column])}"
            for i in table.index[bad][:5]
        )
        raise ValueError(f"column {column!r}: expected a finite number; {rows}")
    return values


_POSITIVE_K = "a positive hydraulic conductivity in m/s"


def checked_confidence(confidence) -> float:
    if not isinstance(confidence, int | float) or not 0.0 < confidence < 1.0:
        raise ValueError(
            f"confidence: expected a fraction between 0 and 1 (0.95); got {confidence!r}"
        )
    return float(confidence)


def conductivity_values(k, name="k") -> np.ndarray:
    values = finite_numbers(k, name)
    require_elements(k, values, values > 0, name, _POSITIVE_K)
    return values
