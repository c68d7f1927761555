"""The memo pack's manifest, and how a pack is written, checked and replaced.

``manifest.csv`` lists every file of a pack with its size and SHA-256 (FIPS 180-4, through
Python's :mod:`hashlib`). The digests are those of the bytes the export wrote, taken as it
wrote them, not of what is on disk later: a file replaced while the export ran fails
:func:`verify_pack`. A reviewer checks that the files received are the files exported
(``python -m kitchen verify PACK``); a file missing, changed or added, and a manifest
that lists nothing, are each named.

A pack is never written file by file into the folder asked for. :class:`StagedPack`
builds it in a sibling folder (``.NAME.kitchen-new-XXXXXXXX``, on the same file system)
and, once every file and the manifest are in place and flushed to disk together, swaps it
in whole: the folder holds
the previous pack or the new one, never a mixture, whatever stops the export (an error,
a full disk, the process killed). The previous pack, swapped out, is then removed file by
file, and only what the tool can prove it wrote: a regular file (not a link) inside that
folder, listed in its manifest, whose SHA-256 matches, the manifest last; and only from a
folder whose :data:`PACK_MARK` shows the pack was built there, so a pack received from a
colleague (copied or unzipped into the folder) is never replaced. A previous pack
a killed export left beside the folder is removed the same way by the next export; a
pack killed while being built (no manifest yet) cannot be proven and is named instead.
A folder holding anything else (a file no manifest lists, a file changed since its export,
a link, a manifest the tool did not write that names files) is refused before anything is
written, and nothing in it is touched.
"""

from __future__ import annotations

import csv
import ctypes
import errno
import hashlib
import io
import os
import stat
import tempfile
import warnings
from pathlib import Path, PurePosixPath

from kitchen.io import libc_function, sync_folder

__all__ = [
    "MANIFEST",
    "MANIFEST_COLUMNS",
    "PACK_MARK",
    "PackFolderError",
    "StagedPack",
    "read_manifest",
    "manifest_bytes",
    "verify_pack",
    "interrupted_exports",
]

MANIFEST = "manifest.csv"
"""The manifest's name, at the top of the pack."""

MANIFEST_COLUMNS = ("path", "bytes", "sha256")
"""Its columns: the file's path inside the pack (``/`` separated), its size, its digest."""

PACK_MARK = ".kitchen-pack"
"""The pack's mark, written beside the manifest: the device and inode of the folder the
pack was built in (kept through the rename that puts it in place) and the manifest's
SHA-256. A pack copied, unzipped or received into a folder carries a mark that names
another folder: it is not a pack the tool wrote there, and is never replaced."""

_SHOWN = 5
"""How many of a folder's problems a refusal names before it counts the rest."""


class PackFolderError(ValueError):
    """The folder asked for cannot take a pack: nothing was written, nothing removed."""


def _digest(path: Path) -> str:
    digest = hashlib.sha256()
    with open(path, "rb") as handle:
        for block in iter(lambda: handle.read(1 << 20), b""):
            digest.update(block)
    return digest.hexdigest()


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
    except (UnicodeDecodeError, IsADirectoryError):
        raise ValueError(f"{manifest}: cannot be read as UTF-8 text") from None
    rows = list(csv.reader(io.StringIO(text, newline="")))
    if not rows or tuple(rows[0]) != MANIFEST_COLUMNS:
        raise ValueError(f"{manifest}, row 1: expected the columns {', '.join(MANIFEST_COLUMNS)}")
    listed = {}
    for number, row in enumerate(rows[1:], start=2):
        if len(row) != 3 or not row[1].isdigit() or len(row[2]) != 64:
            raise ValueError(f"{manifest}, row {number}: expected a path, a size and a SHA-256")
        path = PurePosixPath(row[0])
        if path.is_absolute() or ".." in path.parts or row[0] in ("", ".", MANIFEST):
            raise ValueError(f"{manifest}, row {number}: {row[0]!r} is not a path inside the pack")
        listed[row[0]] = (int(row[1]), row[2])
    return listed


def manifest_bytes(entries: dict[str, tuple[int, str]]) -> bytes:
    """The manifest listing `entries` (``{path: (bytes, sha256)}``), in path order."""
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(MANIFEST_COLUMNS)
    for relative in sorted(entries):
        writer.writerow([relative, *entries[relative]])
    return buffer.getvalue().encode("utf-8")


def _walk(folder: Path):
    """Every entry below `folder` as ``(relative path, lstat)``, links not followed."""
    for root, folders, files in os.walk(folder, followlinks=False):
        for name in folders + files:
            path = Path(root) / name
            yield PurePosixPath(path.relative_to(folder)).as_posix(), path.lstat()


def _unproven(folder: Path, listed: dict[str, tuple[int, str]]) -> list[str]:
    """What in `folder` the tool cannot prove it wrote, in words (none: a whole pack)."""
    problems = []
    holds = set()
    for relative, status in _walk(folder):
        if stat.S_ISLNK(status.st_mode):
            problems.append(f"{relative}: a link (the tool writes no links)")
        elif stat.S_ISDIR(status.st_mode):
            continue
        elif relative in (MANIFEST, PACK_MARK):
            continue
        elif relative not in listed:
            problems.append(f"{relative}: not in {MANIFEST} (not written by the export)")
        elif not stat.S_ISREG(status.st_mode):
            problems.append(f"{relative}: not a regular file")
        else:
            holds.add(relative)
            size, digest = listed[relative]
            if status.st_size != size or _digest(folder / relative) != digest:
                problems.append(f"{relative}: not the file exported (its SHA-256 differs)")
    problems += [f"{relative}: missing" for relative in sorted(set(listed) - holds)]
    return problems


def verify_pack(folder: str | Path) -> list[str]:
    """Check a pack against its manifest; each problem in words (none: the pack is whole).

    A file missing, of another size or with another SHA-256 than when it was exported, a
    file the manifest does not list (added after the export), a link, and a manifest
    that lists no file are named; so is a pack without a manifest.
    """
    folder = Path(folder)
    if not (folder / MANIFEST).is_file():
        return [f"{folder}: no {MANIFEST}; not a memo pack, or its export did not finish"]
    listed = read_manifest(folder)
    if not listed:
        return [f"{MANIFEST} lists no file: a pack always holds its report and tables"]
    return sorted(_unproven(folder, listed))


def _refusal(out: Path, problems: list[str]) -> PackFolderError:
    shown = problems[:_SHOWN]
    more = f"; and {len(problems) - _SHOWN} more" if len(problems) > _SHOWN else ""
    return PackFolderError(
        f"{out}: will not write a pack here: the folder holds what the tool cannot prove it "
        f"wrote ({'; '.join(shown)}{more}). Nothing was written or removed. Choose a new or "
        "empty folder, or move those files away"
    )


def _previous_pack(out: Path) -> dict[str, tuple[int, str]] | None:
    """The manifest of the pack `out` holds (``{}`` for an empty folder, None for no
    folder); refuses a folder that holds anything but a whole pack the tool wrote."""
    if out.is_symlink():
        raise PackFolderError(f"{out}: is a link; give the pack a folder of its own")
    if not out.exists():
        return None
    if not out.is_dir():
        raise PackFolderError(f"{out}: is a file, not a folder; give the pack a folder")
    if not any(out.iterdir()):
        return {}
    if not (out / MANIFEST).is_file():
        raise _refusal(out, sorted(_unproven(out, {})))
    listed = read_manifest(out)  # an unreadable manifest stops the export here
    problems = _unproven(out, listed)
    if not listed:
        problems.insert(0, f"{MANIFEST}: lists no file")
    if problems:
        raise _refusal(out, problems)
    if not _marked_here(out):
        raise PackFolderError(
            f"{out}: holds a pack the tool did not write in this folder (copied, unzipped or "
            f"received here: its {PACK_MARK} names another folder, or it has none). Nothing "
            "was written or removed. Export into a new folder, or move that pack away"
        )
    return listed


def _mark(folder: Path, manifest: bytes) -> bytes:
    status = folder.stat()
    return f"{status.st_dev} {status.st_ino} {hashlib.sha256(manifest).hexdigest()}\n".encode()


def _marked_here(folder: Path) -> bool:
    """Whether `folder` holds the pack the tool built in it (:data:`PACK_MARK`)."""
    try:
        mark, manifest = (folder / PACK_MARK).read_bytes(), (folder / MANIFEST).read_bytes()
    except OSError:
        return False
    return not (folder / PACK_MARK).is_symlink() and mark == _mark(folder, manifest)


def _write_new(path: Path, data: bytes) -> None:
    """Write a new file of a pack being built (its folder the tool's own, not yet swapped
    in): written whole, no temporary file, not flushed one by one (:func:`_flush_folder`
    flushes them all before the swap); a file cut short by an error is removed."""
    path.parent.mkdir(parents=True, exist_ok=True)
    try:
        with open(path, "xb") as stream:  # never over a file: each is written once
            stream.write(data)
    except BaseException:
        path.unlink(missing_ok=True)
        raise


def _flush_folder(folder: Path, relatives) -> None:
    """Put every file of a pack being built, and its folders, on disk before the swap.

    One ``syncfs`` of the folder's file system where Linux has it (a pack of a thousand
    tests writes thousands of files; a flush each costs about 5 ms here), else an
    ``fsync`` of each file; then each folder's entries (:func:`kitchen.io.sync_folder`).
    """
    if not _sync_file_system(folder):
        for relative in relatives:
            handle = os.open(folder / relative, os.O_RDONLY)
            try:
                os.fsync(handle)
            finally:
                os.close(handle)
    folders = {(folder / relative).parent for relative in relatives}
    for each in sorted(folders, key=lambda path: len(path.parts), reverse=True):
        sync_folder(each)


def _sync_file_system(folder: Path) -> bool:
    """``syncfs`` (Linux, ``man 2 syncfs``) of the file system holding `folder`; False
    where the system has none or it fails (the caller then flushes file by file)."""
    syncfs = libc_function("syncfs")
    if syncfs is None:
        return False
    handle = os.open(folder, os.O_RDONLY)
    try:
        return syncfs(handle) == 0
    finally:
        os.close(handle)


def _exchange(first: Path, second: Path) -> bool:
    """Swap two folders in one step (Linux ``renameat2`` with ``RENAME_EXCHANGE``); False
    where the system cannot."""
    renameat2 = libc_function("renameat2")
    if renameat2 is None:
        return False
    at_cwd, exchange = -100, 2  # AT_FDCWD, RENAME_EXCHANGE (linux/fcntl.h, linux/fs.h)
    renameat2.argtypes = [ctypes.c_int, ctypes.c_char_p, ctypes.c_int, ctypes.c_char_p]
    renameat2.argtypes += [ctypes.c_uint]
    result = renameat2(at_cwd, os.fsencode(first), at_cwd, os.fsencode(second), exchange)
    if result == 0:
        return True
    code = ctypes.get_errno()
    if code in (errno.ENOSYS, errno.EINVAL, errno.ENOTSUP):
        return False
    raise OSError(code, os.strerror(code), str(second))


def _refuse_inputs_as_output(out: Path, inputs) -> None:
    """Refuse a pack folder that is an input (a series' folder or workbook), or inside one."""
    target = out.resolve()
    for given in inputs:
        source = Path(given).resolve()
        if target == source or (source.is_dir() and source in target.parents):
            raise PackFolderError(
                f"{out}: is an input's own folder or file, or inside it ({given}); a pack "
                "never goes beside the raw data: give another folder"
            )


def _folder_mode() -> int:
    umask = os.umask(0)
    os.umask(umask)
    return 0o777 & ~umask


class StagedPack:
    """A pack being built beside the folder `out`, swapped in whole by :meth:`finish`.

    Checks `out` at once (:class:`PackFolderError` when it holds anything but a whole pack
    the tool wrote), and makes the sibling folder the files are written to. Used as a
    context manager: leaving the block by an exception removes what was written (the
    files this object wrote, and nothing else) and leaves `out` as it was.

    Parameters
    ----------
    out : str or pathlib.Path
        The pack's folder: new, empty, or holding a whole pack the tool wrote.
    inputs : tuple of str or pathlib.Path, optional
        What the pack is made from (the series' folder or workbook, a file of field
        tests): `out` may be none of them, nor inside one.
    """

    def __init__(self, out: str | Path, inputs: tuple[str | Path, ...] = ()):
        self.out = Path(out)
        _refuse_inputs_as_output(self.out, inputs)
        self.previous = _previous_pack(self.out)
        self.out.parent.mkdir(parents=True, exist_ok=True)
        for left in interrupted_exports(self.out):
            if not self._clear_previous_pack(left):
                warnings.warn(
                    f"{left}: left by an export of {self.out.name} that was stopped before "
                    "it finished; it is not the pack and the tool does not remove what it "
                    "cannot prove it wrote: look at it and remove it by hand",
                    stacklevel=2,
                )
        self.staging = Path(
            tempfile.mkdtemp(prefix=f".{self.out.name}.kitchen-new-", dir=self.out.parent)
        )
        mode = self.out.stat().st_mode & 0o7777 if self.previous is not None else _folder_mode()
        os.chmod(self.staging, mode)
        self.entries: dict[str, tuple[int, str]] = {}

    def __enter__(self) -> StagedPack:
        return self

    def __exit__(self, kind, error, trace) -> None:
        if kind is not None and self.staging.exists():
            self._remove_own(self.staging, {**self.entries, PACK_MARK: None, MANIFEST: None})

    def write(self, relative: str, data: bytes) -> Path:
        """Write one file of the pack (``/``-separated path inside it); its final path."""
        if relative in self.entries or relative in (MANIFEST, PACK_MARK):
            raise ValueError(f"{relative}: written twice in one pack")
        try:
            _write_new(self.staging / relative, data)
        except OSError as error:
            if error.errno not in (errno.ENOSPC, errno.EDQUOT):
                raise
            raise OSError(
                error.errno,
                f"{self.out}: no room on the disk for the pack ({relative} could not be "
                "written); what was written of it is removed and the folder is left as it was",
            ) from None
        self.entries[relative] = (len(data), hashlib.sha256(data).hexdigest())
        return self.out / relative

    def finish(self) -> tuple[Path, tuple[Path, ...]]:
        """Write the manifest, swap the pack in, and remove the previous one.

        Returns
        -------
        (pathlib.Path, tuple of pathlib.Path)
            The manifest, and the files of the previous pack this one no longer has.
        """
        manifest = manifest_bytes(self.entries)
        _write_new(self.staging / MANIFEST, manifest)
        _write_new(self.staging / PACK_MARK, _mark(self.staging, manifest))
        _flush_folder(self.staging, [*self.entries, MANIFEST, PACK_MARK])
        previous = self.previous
        if not previous:  # no folder, or an empty one, which a rename replaces (POSIX)
            os.rename(self.staging, self.out)
            aside = None
        elif _exchange(self.staging, self.out):
            aside = self.staging
        else:  # no one-step swap: the previous pack is put aside first, whole
            aside = Path(
                tempfile.mkdtemp(prefix=f".{self.out.name}.kitchen-old-", dir=self.out.parent)
            )
            aside.rmdir()
            os.rename(self.out, aside)
            os.rename(self.staging, self.out)
        sync_folder(self.out.parent)
        if aside is not None:
            own = {**(previous or {}), PACK_MARK: None, MANIFEST: None}
            self._remove_own(aside, own, proven=True)
        removed = sorted(set(previous or {}) - set(self.entries))
        return self.out / MANIFEST, tuple(self.out / relative for relative in removed)

    def _clear_previous_pack(self, folder: Path) -> bool:
        """Remove a previous pack that a stopped export had swapped out but not yet removed
        (every file left in it listed in its manifest and matching); False where `folder`
        is anything else (a pack stopped while being built has no manifest)."""
        try:
            listed = read_manifest(folder)
        except ValueError:
            return False
        problems = [p for p in _unproven(folder, listed) if not p.endswith(": missing")]
        if not listed or problems or not _marked_here(folder):
            return False
        self._remove_own(folder, {**listed, PACK_MARK: None, MANIFEST: None}, proven=True)
        return not folder.exists()

    def _remove_own(self, folder: Path, listed: dict, proven: bool = False) -> None:
        """Remove from `folder` the files named in `listed` (checked against their SHA-256
        when `proven`), then its emptied folders; warn, naming it, where anything stays."""
        for relative, entry in listed.items():  # the manifest last: the folder stays
            path = folder / relative  # provable until its last listed file is gone
            try:
                status = path.lstat()
            except FileNotFoundError:
                continue
            if not stat.S_ISREG(status.st_mode):
                continue
            if (
                proven
                and entry is not None
                and (status.st_size != entry[0] or _digest(path) != entry[1])
            ):
                continue
            path.unlink()
        for root, _, _ in sorted(os.walk(folder), key=lambda item: -len(item[0])):
            try:
                Path(root).rmdir()
            except OSError:
                pass
        if folder.exists():
            warnings.warn(
                f"{folder}: left in place, holding files the tool did not write there "
                "(added while the export ran); look at them and remove the folder by hand",
                stacklevel=3,
            )


def interrupted_exports(out: str | Path) -> list[Path]:
    """Folders left beside `out` by exports that were stopped before they finished."""
    out = Path(out)
    if not out.parent.is_dir():
        return []
    pattern = (f".{out.name}.kitchen-new-", f".{out.name}.kitchen-old-")
    return sorted(p for p in out.parent.iterdir() if p.name.startswith(pattern))
