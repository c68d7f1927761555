"""Provenance of an exported memo: which tool, when, with what settings, from which bytes.

A reviewer who holds the input files can check them against the SHA-256 printed in the
memo, and see the settings and the revisions applied, to tell exactly what produced it.
"""

from __future__ import annotations

import hashlib
import mmap
import os
import sys
import threading
from concurrent.futures import Future
from dataclasses import dataclass
from datetime import UTC, datetime
from importlib.metadata import PackageNotFoundError, version
from pathlib import Path

from kitchen import __version__

__all__ = ["InputFile", "Provenance", "file_sha256", "memo_provenance", "start_hashing"]

ENVIRONMENT_PACKAGES = ("numpy", "pandas", "scipy", "plotly", "kaleido", "openpyxl")
"""Packages whose versions a memo records."""


@dataclass(frozen=True)
class InputFile:
    """One file a series was read from: its path, size [bytes] and SHA-256 (hex)."""

    path: str
    size: int
    sha256: str


@dataclass(frozen=True)
class Provenance:
    """What produced a memo pack.

    Attributes
    ----------
    tool_version : str
        ``kitchen.__version__``.
    created : str
        Time of the export, ISO 8601 in UTC.
    series, source : str
        The series' name and the folder or workbook it was read from.
    settings : tuple of (name, value)
        Every choice that changes the results or the charts.
    input_files : tuple of InputFile
    revision_count : int
        Revisions applied to the raw data.
    revision_log, revision_log_sha256 : str or None
        The revision log's path and SHA-256; None when there is no log.
    environment : tuple of (name, version)
        Python and the main packages.
    """

    tool_version: str
    created: str
    series: str
    source: str
    settings: tuple[tuple[str, str], ...]
    input_files: tuple[InputFile, ...]
    revision_count: int
    revision_log: str | None
    revision_log_sha256: str | None
    environment: tuple[tuple[str, str], ...]

    def lines(self) -> list[str]:
        """The provenance as short lines of text (for captions and sheets)."""
        lines = [
            f"kitchen {self.tool_version}, exported {self.created}",
            f"series {self.series} ({self.source})",
            "settings: " + ", ".join(f"{key} = {value}" for key, value in self.settings),
        ]
        lines += [f"input {f.path}: SHA-256 {f.sha256} ({f.size} bytes)" for f in self.input_files]
        log = self.revision_log_sha256 or "none"
        lines.append(f"revisions applied: {self.revision_count} (revision log SHA-256: {log})")
        lines.append("environment: " + ", ".join(f"{n} {v}" for n, v in self.environment))
        return lines


def file_sha256(path: str | Path) -> str:
    """SHA-256 of a file's bytes, in hex.

    The file is mapped 64 MiB at a time and each window handed to the hash in one call,
    which lets other threads run throughout: read in small blocks, each block would wait
    for the interpreter lock while another thread holds it (up to 5 ms a block), and a
    logger record's hash on a thread of its own would take several times its 25 ms. A
    window is unmapped before the next, so a 340 MB record adds no more than 64 MiB to
    the process's resident memory.
    """
    digest = hashlib.sha256()
    with open(path, "rb") as stream:
        size = os.fstat(stream.fileno()).st_size
        for offset in range(0, size, HASH_WINDOW):
            length = min(HASH_WINDOW, size - offset)
            with mmap.mmap(
                stream.fileno(), length, access=mmap.ACCESS_READ, offset=offset
            ) as window:
                digest.update(window)
    return digest.hexdigest()


HASH_WINDOW = 1 << 26
"""Bytes of a file mapped at a time by :func:`file_sha256` (a multiple of the system's
allocation granularity, as a mapping's offset must be). [bytes]"""


def _file_hashes(paths) -> dict[str, tuple[int, str]]:
    """``{path: (size [bytes], SHA-256)}`` of each file."""
    return {str(path): (Path(path).stat().st_size, file_sha256(path)) for path in paths}


def start_hashing(paths) -> Future:
    """Begin the SHA-256 of each file on a thread of its own; a future of ``{path: (size,
    sha256)}``.

    hashlib lets other threads run while it hashes a block, so on a machine of two cores
    the input files are hashed while the series is reduced (a logger record of 10^6
    readings is about 33 MB: some 25 ms of hashing taken off the export).
    """
    paths = tuple(paths)
    future: Future = Future()

    def run() -> None:
        try:
            future.set_result(_file_hashes(paths))
        except BaseException as error:  # handed to the caller by Future.result()
            future.set_exception(error)

    threading.Thread(target=run, name="kitchen-hashes", daemon=True).start()
    return future


def _package_version(name: str) -> str:
    try:
        return version(name)
    except PackageNotFoundError:
        return "not installed"


def memo_provenance(
    input_files,
    series: str,
    source: str | Path,
    settings: dict,
    revision_count: int = 0,
    revision_log: str | Path | None = None,
    revision_log_sha256: str | None = None,
    created: datetime | None = None,
    hashes: Future | None = None,
) -> Provenance:
    """Collect the provenance of a memo, hashing the input files as they are now.

    Parameters
    ----------
    input_files : iterable of str or pathlib.Path
        The files the series was read from (:attr:`kitchen.io.Series.input_files`).
    series : str
        The series' name.
    source : str or pathlib.Path
        The series folder or workbook.
    settings : dict
        Every choice that changes the results or the charts, by name.
    revision_count : int, default 0
        Revisions applied to the raw data.
    revision_log, revision_log_sha256 : optional
        The revision log's path and SHA-256 (None when there is no log).
    created : datetime, optional
        The time to record; now, in UTC, by default.
    hashes : concurrent.futures.Future, optional
        The files' sizes and hashes from :func:`start_hashing`, begun when the export
        began; hashed here without it.

    Returns
    -------
    Provenance

    Raises
    ------
    OSError
        When an input file cannot be read.
    """
    created = created or datetime.now(UTC)
    input_files = tuple(input_files)
    hashed = _file_hashes(input_files) if hashes is None else hashes.result()
    files = tuple(InputFile(str(path), *hashed[str(path)]) for path in input_files)
    environment = (("python", sys.version.split()[0]),) + tuple(
        (name, _package_version(name)) for name in ENVIRONMENT_PACKAGES
    )
    return Provenance(
        tool_version=__version__,
        created=created.astimezone(UTC).isoformat(timespec="seconds"),
        series=str(series),
        source=str(source),
        settings=tuple((str(key), str(value)) for key, value in settings.items()),
        input_files=files,
        revision_count=int(revision_count),
        revision_log=None if revision_log is None else str(revision_log),
        revision_log_sha256=revision_log_sha256,
        environment=environment,
    )
