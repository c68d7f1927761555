"""Files the tool writes: written whole or not at all, and safe to open in a spreadsheet.

Every file the tool writes goes to a temporary file in the same folder, is flushed to
disk, and is renamed over the target, so a crash or a full disk part-way leaves the
previous file whole. Raw data files are never written.
"""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

import pandas as pd

__all__ = ["atomic_write_bytes", "atomic_write_text", "spreadsheet_safe", "write_csv"]

_FORMULA_START = ("=", "+", "-", "@", "\t", "\r")


def atomic_write_bytes(path: str | Path, data: bytes) -> Path:
    """Write ``data`` to ``path`` through a temporary file and an atomic rename."""
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    handle, temporary = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".part", dir=path.parent)
    try:
        with os.fdopen(handle, "wb") as stream:
            stream.write(data)
            stream.flush()
            os.fsync(stream.fileno())
        os.replace(temporary, path)
    except BaseException:
        Path(temporary).unlink(missing_ok=True)
        raise
    return path


def atomic_write_text(path: str | Path, text: str) -> Path:
    """Write UTF-8 text to ``path`` atomically (see :func:`atomic_write_bytes`)."""
    return atomic_write_bytes(path, text.encode("utf-8"))


def spreadsheet_safe(frame: pd.DataFrame) -> pd.DataFrame:
    """A copy whose text cells cannot be read as formulas by a spreadsheet.

    Text that starts with ``=``, ``+``, ``-``, ``@``, a tab or a carriage return gets a
    leading apostrophe (the OWASP advice on CSV injection); numbers are left alone.
    """
    out = frame.copy()
    for column in out.columns:
        if out[column].dtype == object or pd.api.types.is_string_dtype(out[column]):
            out[column] = out[column].map(
                lambda v: "'" + v if isinstance(v, str) and v.startswith(_FORMULA_START) else v
            )
    return out


def write_csv(path: str | Path, frame: pd.DataFrame) -> Path:
    """Write a frame as UTF-8 CSV, spreadsheet-safe and atomically."""
    return atomic_write_text(path, spreadsheet_safe(frame).to_csv(index=False))
