"""Digests of a specimen's inputs, and where each specimen's rows lie in a table.

A reduction is kept under a digest of what it was computed from: :func:`frame_digest` for
a table's values (its index left out), a digest of the representations of the other parts
(a specimen's row, the settings, a window). Each specimen's rows are found once per table:
as one contiguous span in a falling-head table, as row positions in any other.
"""

from __future__ import annotations

import hashlib

import numpy as np
import pandas as pd

__all__ = ["frame_digest"]


def frame_digest(frame: pd.DataFrame, skip: tuple[str, ...] = ()) -> str:
    """A digest of a table's values, column by column (names, dtypes and contents).

    Parameters
    ----------
    frame : pandas.DataFrame
        The table; its index is not part of the digest.
    skip : tuple of str
        Columns left out (the specimen id of one specimen's readings, say).

    Returns
    -------
    str
        BLAKE2b, 16 bytes, as hex. Numeric columns are hashed from their bytes; other
        columns from the text of their values.
    """
    digest = hashlib.blake2b(digest_size=16)
    for name in frame.columns:
        if name in skip:
            continue
        values = frame[name].to_numpy()
        digest.update(f"{name}\x1f{values.dtype}\x1e".encode())
        if values.dtype.kind in "biuf":
            digest.update(np.ascontiguousarray(values).view(np.uint8))
        else:
            digest.update("\x1f".join(map(repr, values)).encode())
    return digest.hexdigest()


def parts_digest(*parts) -> str:
    """A digest of the representations of `parts` (a specimen's row, the settings, a window).

    BLAKE2b, 16 bytes, as hex, of the ``repr`` of each part joined by a separator.
    """
    return hashlib.blake2b("\x1e".join(map(repr, parts)).encode(), digest_size=16).hexdigest()


def specimen_spans(frame: pd.DataFrame) -> dict[str, tuple[int, int]]:
    """Each specimen's rows as positions ``(start, stop)``; they are contiguous in
    a falling-head table (the loader refuses split readings)."""
    codes, ids = _codes(frame["specimen"])
    if not codes.size:
        return {}
    starts = np.flatnonzero(np.r_[True, codes[1:] != codes[:-1]])
    stops = np.r_[starts[1:], codes.size]
    return {ids[codes[a]]: (int(a), int(b)) for a, b in zip(starts, stops, strict=True)}


def _codes(column: pd.Series) -> tuple[np.ndarray, np.ndarray]:
    """A specimen column as codes into the ids present, in order of first appearance, -1
    where empty (as :func:`pandas.factorize` gives them). A loaded readings table's
    categories are factorised by their one-byte codes, no text compared row by row."""
    if not isinstance(column.dtype, pd.CategoricalDtype):
        return pd.factorize(column.to_numpy(dtype=object))
    raw = column.cat.codes.to_numpy()
    codes, present = pd.factorize(raw)
    names = column.cat.categories.to_numpy(dtype=object)
    if (present < 0).any():  # empty cells: code -1, as factorize gives a missing value
        empty = int(np.flatnonzero(present < 0)[0])
        codes = np.where(codes == empty, -1, codes - (codes > empty))
        present = present[present >= 0]
    return codes, names[present]


def specimen_positions(frame: pd.DataFrame) -> dict[str, np.ndarray]:
    """Each specimen's row positions, in order of first appearance (any arrangement)."""
    codes, ids = _codes(frame["specimen"])
    order = np.argsort(codes, kind="stable")
    bounds = np.searchsorted(codes[order], np.arange(len(ids) + 1))
    return {ids[i]: order[bounds[i] : bounds[i + 1]] for i in range(len(ids))}
