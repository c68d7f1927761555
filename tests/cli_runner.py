"""The command line run inside the test process: ``kitchen.cli.main`` with its output caught.

``run_cli("report", folder, "--out", out)`` does what ``python -m kitchen report FOLDER --out
OUT`` does, without starting a new interpreter, and returns the exit status with what was
printed on stdout and stderr, under the names ``subprocess.CompletedProcess`` gives them.
argparse's usage errors leave through ``SystemExit``: its code is taken as the status, as the
interpreter would take it. Any other exception is not caught: it fails the test with its
traceback, as it would show one to the user. That the entry point itself runs is checked once,
in a real subprocess, in tests/test_cli.py.

The output is caught by redirecting ``sys.stdout`` and ``sys.stderr`` (not with ``capsys``), so
that module-scoped fixtures can run the command line too.
"""

import contextlib
import io
from typing import NamedTuple

from kitchen import cli


class CliRun(NamedTuple):
    """What one run of the command line gave back: ``code, out, err = run_cli(...)``."""

    returncode: int
    stdout: str
    stderr: str


def _status(code) -> int:
    """The exit status the interpreter gives for ``SystemExit(code)``."""
    if code is None:
        return 0
    return code if isinstance(code, int) else 1


def run_cli(*arguments) -> CliRun:
    """Run ``python -m kitchen ARGUMENTS`` in this process; paths may be given as Path."""
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        try:
            code = cli.main([str(argument) for argument in arguments])
        except SystemExit as stop:
            code = _status(stop.code)
    return CliRun(code, out.getvalue(), err.getvalue())
