"""The memo pack's manifest: every file the export wrote, with its size and SHA-256.

``manifest.csv`` is written last, once every other file of the pack is in place, so a pack
with a manifest is a whole pack. A reviewer checks that the files received are the files
exported (:func:`verify_pack`, ``python -m kitchen verify PACK``); the report's provenance
traces those files back to the inputs. Exporting again into the same folder removes the
files the previous manifest lists and the new pack no longer holds (a chart the data no
longer allow, plotly.js after a self-contained export), and nothing else: a file the tool
did not write is never touched.
"""

from __future__ import annotations

import csv
import hashlib
import io
from pathlib import Path, PurePosixPath

from kitchen.io import atomic_write_bytes

__all__ = ["MANIFEST", "MANIFEST_COLUMNS", "write_manifest", "read_manifest", "verify_pack"]

MANIFEST = "manifest.csv"
"""The manifest's name, at the top of the pack."""

MANIFEST_COLUMNS = ("path", "bytes", "sha256")
"""Its columns: the file's path inside the pack (``/`` separated), its size, its digest."""


def _digest(path: Path) -> str:
    digest = hashlib.sha256()
    with open(path, "rb") as handle:
        for block in iter(lambda: handle.read(1 << 20), b""):
            digest.update(block)
    return digest.hexdigest()


def _relative(folder: Path, path: Path) -> str:
    return PurePosixPath(Path(path).resolve().relative_to(folder.resolve())).as_posix()


def read_manifest(folder: str | Path) -> dict[str, tuple[int, str]]:
    """The files a pack's manifest lists: ``{path: (bytes, sha256)}``; empty without one.

    Raises
    ------
    ValueError
        When the manifest cannot be read, naming its row.
    """
    manifest = Path(folder) / MANIFEST
    try:
        text = manifest.read_text(encoding="utf-8")
    except FileNotFoundError:
        return {}
    rows = list(csv.reader(io.StringIO(text, newline="")))
    if not rows or tuple(rows[0]) != MANIFEST_COLUMNS:
        raise ValueError(f"{manifest}, row 1: expected the columns {', '.join(MANIFEST_COLUMNS)}")
    listed = {}
    for number, row in enumerate(rows[1:], start=2):
        if len(row) != 3 or not row[1].isdigit() or len(row[2]) != 64:
            raise ValueError(f"{manifest}, row {number}: expected a path, a size and a SHA-256")
        path = PurePosixPath(row[0])
        if path.is_absolute() or ".." in path.parts:
            raise ValueError(f"{manifest}, row {number}: {row[0]!r} is not a path inside the pack")
        listed[row[0]] = (int(row[1]), row[2])
    return listed


def write_manifest(folder: str | Path, files, previous=None) -> tuple[Path, tuple[Path, ...]]:
    """Write the manifest of the pack in `folder`, and remove what only `previous` listed.

    Parameters
    ----------
    folder : str or pathlib.Path
        The pack.
    files : iterable of pathlib.Path
        Every file the export wrote, inside `folder`.
    previous : dict, optional
        :func:`read_manifest` of the folder before the export.

    Returns
    -------
    (pathlib.Path, tuple of pathlib.Path)
        The manifest, and the files of the previous pack removed.
    """
    folder = Path(folder)
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(MANIFEST_COLUMNS)
    kept = set()
    for path in files:
        relative = _relative(folder, path)
        kept.add(relative)
        writer.writerow([relative, Path(path).stat().st_size, _digest(Path(path))])
    manifest = atomic_write_bytes(folder / MANIFEST, buffer.getvalue().encode("utf-8"))
    removed = []
    for relative in sorted(set(previous or {}) - kept):
        stale = folder / relative
        if stale.is_file():
            stale.unlink()
            removed.append(stale)
    return manifest, tuple(removed)


def verify_pack(folder: str | Path) -> list[str]:
    """Check a pack against its manifest; each problem in words (none: the pack is whole).

    A file missing, of another size, or with another SHA-256 than when it was exported is
    named; so is a pack without a manifest.
    """
    folder = Path(folder)
    if not (folder / MANIFEST).is_file():
        return [f"{folder}: no {MANIFEST}; not a memo pack, or its export did not finish"]
    problems = []
    for relative, (size, digest) in read_manifest(folder).items():
        path = folder / relative
        if not path.is_file():
            problems.append(f"{relative}: missing")
        elif path.stat().st_size != size or _digest(path) != digest:
            problems.append(f"{relative}: not the file exported (its SHA-256 differs)")
    return problems
