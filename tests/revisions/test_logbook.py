"""The logs beside a series under faults: a last row cut short by a full disk is named and
left out (never blocking every command), no row is glued onto it, a log that does not read
is never appended to, and a log made by one person is appended to by a colleague sharing
the folder (the user's umask, not an owner-only mode)."""

import os
import shutil
import tempfile
from pathlib import Path

import pytest
from cli_runner import run_cli
from series_files import SAMPLES, copy_sample

from kitchen.revisions import (
    RevisionError,
    WindowLogError,
    clear_window,
    read_kept_tests,
    read_revisions,
    read_window_choices,
    readable_part,
    revise,
    revisions_path,
    windows_path,
)
from kitchen.workspace import Workspace

WHEN = "2026-03-02T09:15:00+00:00"


@pytest.fixture
def clay(tmp_path):
    return copy_sample(SAMPLES / "clay_liner", tmp_path / "clay")


def test_readable_part_cuts_only_an_unfinished_last_line():
    whole = b"id,when\nab12cd34,x\n"
    assert readable_part(whole, "log.csv") == (whole, None)
    kept, notice = readable_part(whole + b"ef56ab78,2026-03", "log.csv")
    assert kept == whole and notice.startswith("log.csv, row 3: the last row is cut short")
    assert readable_part(b"", "log.csv") == (b"", None)


def _torn(log: Path) -> bytes:
    """Cut the log's last row in half, as a write stopped by a full disk leaves it."""
    data = log.read_bytes()
    last = data[:-1].rfind(b"\n") + 1
    torn = data[: last + (len(data) - last) // 2]
    log.write_bytes(torn)
    return torn


def test_a_torn_window_row_is_named_and_left_out_and_nothing_is_appended_after_it(clay):
    clear_window(clay, "QF-01", reason="first", who="ana", when=WHEN)
    clear_window(clay, "QF-02", reason="second", who="ana", when=WHEN)
    torn = _torn(windows_path(clay))
    with pytest.warns(UserWarning, match="windows.csv, row 3: the last row is cut short"):
        (kept,) = read_window_choices(clay)
    assert kept.specimen == "QF-01"
    with pytest.raises(WindowLogError, match="row 3: the last row is cut short.*nothing was"):
        clear_window(clay, "QF-03", reason="third", who="ana", when=WHEN)
    assert windows_path(clay).read_bytes() == torn  # never rewritten, never appended to
    # every other command still works, and says why a row is left out
    code, out, err = run_cli("report", clay, "--out", clay.parent / "pack", "--no-images")
    assert code == 0 and "kitchen: warning: windows.csv, row 3: the last row is cut" in err


def test_a_torn_revision_row_is_left_out_and_revise_refuses(clay):
    revise(clay, specimen="QF-01", field="height", value="116.30 mm", reason="re-measured")
    revise(clay, specimen="QF-02", field="height", value="116.40 mm", reason="re-measured")
    torn = _torn(revisions_path(clay))
    with pytest.warns(UserWarning, match="revisions.csv, row 3: the last row is cut short"):
        assert [r.specimen for r in read_revisions(clay)] == ["QF-01"]
    code, out, err = run_cli("history", clay)
    assert code == 0 and "1 row(s)" in out and "row 3: the last row is cut short" in err
    code, _, err = run_cli(
        "revise", clay, "--specimen", "QF-03", "--field", "height", "--value", "116 mm",
        "--reason", "x",
    )  # fmt: skip
    assert code == 2 and "row 3: the last row is cut short" in err and "nothing was" in err
    assert revisions_path(clay).read_bytes() == torn


def test_revise_refuses_to_append_to_a_log_that_does_not_read(clay):
    revise(clay, specimen="QF-01", field="height", value="116.30 mm", reason="re-measured")
    log = revisions_path(clay)
    damaged = log.read_bytes().replace(b"116.30", b"116.30,extra", 1)
    log.write_bytes(damaged)
    with pytest.raises(RevisionError, match="row 2: expected 13 fields, found 14"):
        revise(clay, specimen="QF-02", field="height", value="116.4 mm", reason="x")
    assert log.read_bytes() == damaged


def _as_user(uid: int, gid: int, *arguments) -> int:
    """Run the command line as user `uid` of group `gid` (umask 002, a shared folder's
    usual one) in a forked child, and return its exit status. The child runs the code
    already loaded: the interpreter's own files may be closed to other users."""
    pid = os.fork()
    if pid == 0:  # the child: never returns into the test
        code = 70
        try:
            os.setgroups([gid])
            os.setgid(gid)
            os.setuid(uid)
            os.umask(0o002)
            code = run_cli(*arguments).returncode
        finally:
            os._exit(code)
    return os.waitstatus_to_exitcode(os.waitpid(pid, 0)[1])


def test_two_colleagues_append_to_the_logs_of_a_shared_folder():
    if not hasattr(os, "fork") or os.geteuid() != 0:
        pytest.skip("needs root and fork, to run the command as two other users (setuid)")
    group, first, second = 47011, 47021, 47022  # ids used by no one on a test machine
    shared = Path(tempfile.mkdtemp(prefix="kitchen-shared-", dir="/tmp"))
    try:
        os.chmod(shared, 0o2775)
        os.chown(shared, 0, group)
        series = copy_sample(SAMPLES / "clay_liner", shared / "clay")
        for path in (series, *series.iterdir()):
            os.chown(path, 0, group)
            os.chmod(path, 0o2775 if path.is_dir() else 0o664)
        steps = [
            ("window", "--specimen", "QF-01", "--proposed", "--reason", "first"),
            ("window", "--specimen", "QF-02", "--proposed", "--reason", "second"),
            ("keep", "--specimen", "QF-01", "--reason", "first"),
            ("keep", "--specimen", "QF-02", "--reason", "second"),
            ("revise", "--specimen", "QF-01", "--field", "height", "--value", "116.3 mm",
             "--reason", "first"),
            ("revise", "--specimen", "QF-02", "--field", "height", "--value", "116.4 mm",
             "--reason", "second"),
        ]  # fmt: skip
        rehearsal = copy_sample(SAMPLES / "clay_liner", shared / "rehearsal")
        for command, *rest in steps:  # loads every module the commands use, as root
            assert run_cli(command, rehearsal, *rest).returncode == 0
        for number, (command, *rest) in enumerate(steps):
            user = (first, second)[number % 2]
            assert _as_user(user, group, command, series, *rest) == 0, (user, command)
        for log in ("windows.csv", "kept_tests.csv", "revisions.csv"):
            status = (series / log).stat()
            assert status.st_uid == first and status.st_mode & 0o777 == 0o664
        assert [c.reason for c in read_window_choices(series)] == ["first", "second"]
        assert [k.reason for k in read_kept_tests(series)] == ["first", "second"]
        assert [r.reason for r in read_revisions(series)] == ["first", "second"]
        assert len(Workspace(series).results()) > 0
    finally:
        shutil.rmtree(shared)
