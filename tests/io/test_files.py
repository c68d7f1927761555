"""Files the tool writes: whole or not at all; appended lines are never lost or torn."""

import hashlib
import multiprocessing
import os

import pandas as pd
import pytest

from kitchen.io import append_line, atomic_write_bytes, atomic_write_text, files, write_csv

HEADER = b"worker,index,padding\n"
# Real processes with their own descriptors; fork where the system has it (quicker to start).
START_METHOD = "fork" if "fork" in multiprocessing.get_all_start_methods() else "spawn"


def digest(path):
    return hashlib.sha256(path.read_bytes()).hexdigest()


def test_atomic_write_replaces_the_whole_file(tmp_path):
    target = tmp_path / "deep" / "memo.txt"
    atomic_write_text(target, "first version, rather long\n" * 100)
    atomic_write_text(target, "second\n")
    assert target.read_text() == "second\n"
    assert [p.name for p in target.parent.iterdir()] == ["memo.txt"]  # no temporary left


def _fail(*arguments, **keywords):
    raise OSError(28, "No space left on device")


class _HalfWriter:
    """A stream that takes half of what it is given, then reports a full disk."""

    def __init__(self, stream):
        self.stream = stream

    def __enter__(self):
        return self

    def __exit__(self, *exc):
        self.stream.close()

    def write(self, data):
        self.stream.write(data[: len(data) // 2])
        self.stream.flush()
        _fail()


@pytest.mark.parametrize("failing", ["write", "fsync", "replace"])
def test_injected_failure_leaves_the_previous_file_intact(tmp_path, monkeypatch, failing):
    target = tmp_path / "results.csv"
    atomic_write_bytes(target, b"specimen,k20 [m/s]\nQF-01,3.1e-09\n")
    before = digest(target)
    if failing == "write":
        real_fdopen = os.fdopen
        monkeypatch.setattr(files.os, "fdopen", lambda *a, **k: _HalfWriter(real_fdopen(*a, **k)))
    else:
        monkeypatch.setattr(files.os, failing, _fail)
    with pytest.raises(OSError, match="No space left"):
        atomic_write_bytes(target, b"specimen,k20 [m/s]\n" + b"QF-01,9.9e-09\n" * 10_000)
    monkeypatch.undo()
    assert digest(target) == before
    assert [p.name for p in tmp_path.iterdir()] == ["results.csv"]


def test_write_csv_is_spreadsheet_safe(tmp_path):
    path = write_csv(tmp_path / "t.csv", pd.DataFrame({"reason": ["=SUM(A1)", "re-measured"]}))
    assert pd.read_csv(path)["reason"].tolist() == ["'=SUM(A1)", "re-measured"]


def test_append_creates_the_file_with_its_header_once(tmp_path):
    log = tmp_path / "log.csv"
    append_line(log, b"0,0,a", header=HEADER)
    append_line(log, b"0,1,b\n", header=HEADER)
    assert log.read_bytes() == HEADER + b"0,0,a\n0,1,b\n"


def test_short_write_is_reported(tmp_path, monkeypatch):
    log = tmp_path / "log.csv"
    append_line(log, b"0,0,a", header=HEADER)
    real_write = os.write
    monkeypatch.setattr(files.os, "write", lambda fd, data: real_write(fd, data[:3]))
    with pytest.raises(OSError, match="last line is incomplete"):
        append_line(log, b"0,1,bbbbbbbb", header=HEADER)


def _append_rows(path, worker, count, barrier):
    barrier.wait()  # start together, so the appends really overlap
    for index in range(count):
        padding = f"{worker}" * 1500  # more than a pipe buffer's atomic size, on purpose
        append_line(path, f"{worker},{index},{padding}".encode(), header=HEADER)


@pytest.mark.slow
def test_concurrent_appends_keep_every_row(tmp_path):
    log = tmp_path / "log.csv"
    context = multiprocessing.get_context(START_METHOD)
    workers, count = 4, 50
    barrier = context.Barrier(workers)
    processes = [
        context.Process(target=_append_rows, args=(log, worker, count, barrier))
        for worker in range(workers)
    ]
    for process in processes:
        process.start()
    for process in processes:
        process.join(120)
    assert [process.exitcode for process in processes] == [0] * workers
    lines = log.read_bytes().split(b"\n")
    assert lines[0] == HEADER.strip() and lines[-1] == b""
    rows = [line.decode().split(",") for line in lines[1:-1]]
    assert len(rows) == workers * count
    assert sorted((int(w), int(i)) for w, i, _ in rows) == [
        (w, i) for w in range(workers) for i in range(count)
    ]
    assert all(padding == worker * 1500 for worker, _, padding in rows)  # none torn or mixed


def test_written_files_get_the_usual_mode(tmp_path):
    # A file written atomically is as readable as one written by open(): 0666 less the
    # umask (common practice, no source), not the owner-only mode of a temporary file.
    from kitchen.io import atomic_write_bytes

    umask = os.umask(0o022)
    try:
        path = atomic_write_bytes(tmp_path / "memo.csv", b"a,b\n")
        assert path.stat().st_mode & 0o777 == 0o644
    finally:
        os.umask(umask)


@pytest.mark.parametrize(("umask", "mode"), [(0o022, 0o644), (0o002, 0o664), (0o077, 0o600)])
def test_a_log_is_created_with_the_users_umask(tmp_path, umask, mode):
    # 0666 less the umask, what open() gives (POSIX open(2); common practice, no source):
    # a colleague in the folder's group can append when the umask lets the group write
    before = os.umask(umask)
    try:
        for path in (tmp_path / "with_header.csv", tmp_path / "plain.csv"):
            append_line(path, b"a,1", header=HEADER if "header" in path.name else b"")
            assert path.stat().st_mode & 0o777 == mode
    finally:
        os.umask(before)


def test_an_append_without_room_is_refused_before_it_writes(tmp_path, monkeypatch):
    path = append_line(tmp_path / "log.csv", b"first", header=HEADER)
    before = path.read_bytes()

    class Full:
        f_bavail, f_frsize = 3, 4096  # 12 KiB free, less than a row and APPEND_ROOM

    monkeypatch.setattr(files.os, "statvfs", lambda folder: Full)
    with pytest.raises(OSError, match="12288 bytes free.*nothing was written"):
        append_line(path, b"second")
    assert path.read_bytes() == before
