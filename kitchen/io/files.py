"""Files the tool writes: written whole or not at all, and safe to open in a spreadsheet.

Every file the tool writes goes to a temporary file in the same folder, is flushed to
disk, and is renamed over the target, so a crash or a full disk part-way leaves the
previous file whole. The one file that grows instead, a series' revision log, is
appended one whole line per write (:func:`append_line`). Raw data files are never
written.
"""

from __future__ import annotations

import contextlib
import errno
import os
import re
import sys
import tempfile
from pathlib import Path
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    import pandas as pd


__all__ = [
    "atomic_write_bytes",
    "atomic_write_text",
    "append_line",
    "cache_folder",
    "folder_lock",
    "printable",
    "sync_folder",
    "APPEND_ROOM",
    "spreadsheet_safe",
    "write_csv",
]

_FORMULA_START = ("=", "+", "-", "@", "\t", "\r")
_BINARY = getattr(os, "O_BINARY", 0)  # Windows: no newline translation


def cache_folder(*parts: str) -> Path:
    """The tool's cache folder, ``$XDG_CACHE_HOME/kitchen`` (``~/.cache/kitchen`` without
    XDG_CACHE_HOME; XDG Base Directory Specification 0.8), or the folder `parts` inside it.
    Nothing is made here."""
    root = os.environ.get("XDG_CACHE_HOME") or str(Path.home() / ".cache")
    return Path(root, "kitchen", *parts)


def sync_folder(folder: Path) -> None:
    """Flush a folder's entries (a rename, a new file) to disk where the system allows it."""
    if os.name != "posix":
        return
    try:
        handle = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(handle)
    except OSError:
        pass  # some file systems refuse fsync on a folder; the rename is still atomic
    finally:
        os.close(handle)


def libc_function(name: str):
    """The C library's function `name` on Linux (errors kept for ``ctypes.get_errno``), or
    None elsewhere or where the library has none (``syncfs``, ``renameat2``, ``mallopt``)."""
    import ctypes
    import ctypes.util

    if not sys.platform.startswith("linux"):
        return None
    try:
        libc = ctypes.CDLL(ctypes.util.find_library("c") or "libc.so.6", use_errno=True)
        return getattr(libc, name)
    except (OSError, AttributeError):
        return None


def atomic_write_bytes(path: str | Path, data: bytes) -> Path:
    """Write ``data`` to ``path`` through a temporary file and an atomic rename.

    Parameters
    ----------
    path : str or pathlib.Path
        The file to write; its folder is created when missing.
    data : bytes
        The whole content.

    Returns
    -------
    pathlib.Path
        ``path``.

    Notes
    -----
    The temporary file sits in the target's folder (a rename is atomic only within one
    file system), is flushed with ``fsync`` before the rename, and is removed if anything
    fails; the previous file, if any, is then left as it was.
    """
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    handle, temporary = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".part", dir=path.parent)
    try:
        # mkstemp makes the file readable by its owner only; give it the mode a plain
        # open() would (the previous file's mode, or 0666 less the umask).
        os.chmod(temporary, _mode_for(path))
        with os.fdopen(handle, "wb") as stream:
            stream.write(data)
            stream.flush()
            os.fsync(stream.fileno())
        os.replace(temporary, path)
    except BaseException:
        Path(temporary).unlink(missing_ok=True)
        raise
    sync_folder(path.parent)
    return path


def _mode_for(path: Path) -> int:
    try:
        return path.stat().st_mode & 0o777
    except FileNotFoundError:
        umask = os.umask(0)
        os.umask(umask)
        return 0o666 & ~umask


def atomic_write_text(path: str | Path, text: str) -> Path:
    """Write UTF-8 text to ``path`` atomically (see :func:`atomic_write_bytes`)."""
    return atomic_write_bytes(path, text.encode("utf-8"))


def _create_with(path: Path, header: bytes) -> None:
    """Create ``path`` holding ``header``, unless it exists; never a moment without it."""
    handle, temporary = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".part", dir=path.parent)
    try:
        # mkstemp makes the file its owner's alone; a log on a shared folder is written by
        # colleagues too: give it the mode a plain open() would (0666 less the umask)
        os.chmod(temporary, _mode_for(path))
        with os.fdopen(handle, "wb") as stream:
            stream.write(header)
            stream.flush()
            os.fsync(stream.fileno())
        try:
            os.link(temporary, path)  # fails if another process created it first
        except FileExistsError:
            pass
        except OSError:  # a file system without hard links: exclusive create instead
            try:
                target = os.open(path, os.O_WRONLY | os.O_CREAT | os.O_EXCL | _BINARY, 0o666)
            except FileExistsError:
                return
            try:
                _write_all_at_once(target, header, path)
                os.fsync(target)
            finally:
                os.close(target)
    finally:
        Path(temporary).unlink(missing_ok=True)
    sync_folder(path.parent)


def _write_all_at_once(handle: int, data: bytes, path: Path) -> None:
    written = os.write(handle, data)
    if written != len(data):
        raise OSError(
            errno.ENOSPC,
            f"{path}: only {written} of {len(data)} bytes were written (is the disk full?); "
            "the file's last line is incomplete",
        )


def append_line(path: str | Path, line: bytes, header: bytes = b"") -> Path:
    """Append one line to a file in a single write, then flush it to disk.

    Parameters
    ----------
    path : str or pathlib.Path
        The file to append to.
    line : bytes
        The encoded line; a final ``b"\\n"`` is added when missing.
    header : bytes, optional
        What a new file starts with (a CSV header line). When the file does not exist it
        is created holding the header, written to a temporary file and linked into place,
        so no reader or appender ever sees the file without it.

    Returns
    -------
    pathlib.Path
        ``path``.

    Raises
    ------
    OSError
        When the system takes only part of the line (a full disk): the message says the
        file's last line is incomplete.

    Notes
    -----
    The file is opened with ``O_APPEND`` and the whole line goes in one ``os.write``: on
    POSIX systems each write then lands whole at the end of the file, so several
    processes appending at once never lose or interleave a line. A new file gets the
    mode any file the user makes gets (0666 less the umask), so colleagues sharing the
    folder can append to it too. Where the disk has less free space than the line and
    :data:`APPEND_ROOM` more, nothing is written and ``OSError`` (``ENOSPC``) is raised. A
    write the system still cuts short raises; the torn line it leaves is for a person to
    mend, and readers of the file name it and leave it out
    (:func:`kitchen.revisions.readable_part`).
    """
    path = Path(path)
    data = line if line.endswith(b"\n") else line + b"\n"
    flags = os.O_WRONLY | os.O_APPEND | _BINARY
    if header and not path.exists():
        _create_with(path, header)
    elif not header:
        flags |= os.O_CREAT
    _check_room(path, len(data))
    handle = os.open(path, flags, 0o666)  # less the umask, as any file the user makes
    try:
        _write_all_at_once(handle, data, path)
        os.fsync(handle)
    finally:
        os.close(handle)
    return path


APPEND_ROOM = 64 * 2**10
"""The free space an append asks for beyond its own line, so that a disk filling up is
met by a refusal before the write rather than a row cut short. [bytes]"""


def _check_room(path: Path, size: int) -> None:
    """Refuse an append of `size` bytes where the disk has not room for it and more."""
    try:
        status = os.statvfs(path.parent)
    except (AttributeError, OSError):  # no statvfs (Windows): the short write is still named
        return
    free = status.f_bavail * status.f_frsize
    if free < size + APPEND_ROOM:
        raise OSError(
            errno.ENOSPC,
            f"{path}: the disk has {free} bytes free, less than the {size + APPEND_ROOM} an "
            "appended row is given (is it full?); nothing was written",
        )


@contextlib.contextmanager
def folder_lock(folder: str | Path):
    """Hold an exclusive advisory lock on a folder while the block runs.

    Used to make read–check–append on a series' revision log one step, so two people
    revising the same value at once are taken in turn. Where the system has no
    ``fcntl.flock`` (Windows) the block runs unlocked; appends stay whole either way.
    """
    try:
        import fcntl
    except ImportError:  # not POSIX
        yield
        return
    handle = os.open(folder, os.O_RDONLY)
    try:
        fcntl.flock(handle, fcntl.LOCK_EX)
        yield
    finally:
        os.close(handle)  # closing the descriptor releases the lock


_CONTROL = re.compile(r"[\x00-\x08\x0b-\x1f\x7f-\x9f\u200b-\u200f\u202a-\u202e\u2066-\u2069\ufeff]")
"""What a terminal acts on rather than shows, what a workbook cannot hold (XML 1.0, section
2.2), and what hides or reorders text: the C0 and C1 controls but tab and line feed, the
zero-width and bidirectional marks (Unicode Standard Annex #9)."""


def printable(text: str) -> str:
    """`text` with each control character and invisible mark written as its escape
    (``\\x1b``, ``\\u202e``), so that text stored in a log shows as what it is wherever it
    is shown: a terminal, a page, a workbook."""
    if not _CONTROL.search(text):
        return text
    return _CONTROL.sub(lambda m: m.group().encode("unicode_escape").decode("ascii"), text)


def _safe_text(value):
    if not isinstance(value, str):
        return value
    value = printable(value)
    return "'" + value if value.startswith(_FORMULA_START) else value


def spreadsheet_safe(frame: pd.DataFrame) -> pd.DataFrame:
    """A copy whose text cells cannot be read as formulas by a spreadsheet.

    Text that starts with ``=``, ``+``, ``-``, ``@``, a tab or a carriage return gets a
    leading apostrophe (the OWASP advice on CSV injection); a control character (an
    escape code stored in a log edited by hand) is written as its escape, ``\\x1b``, which
    a workbook can hold (XML 1.0 allows no C0 control but tab, line feed and carriage
    return) and a terminal shows as text; numbers are left alone.
    """
    from pandas.api.types import is_string_dtype

    out = frame.copy()
    for column in out.columns:
        if out[column].dtype == object or is_string_dtype(out[column]):
            out[column] = out[column].map(_safe_text)
    return out


def write_csv(path: str | Path, frame: pd.DataFrame) -> Path:
    """Write a frame as UTF-8 CSV, spreadsheet-safe and atomically."""
    return atomic_write_text(path, spreadsheet_safe(frame).to_csv(index=False))
