"""Revisions from the command line, and the names kitchen.revisions offers.

The log, the effective data, the recording of revisions and their history are tested beside
their modules: tests/test_revision_log.py, tests/test_effective_data.py,
tests/test_revision_recording.py and tests/test_revision_history.py.
"""

import shutil
import subprocess
import sys
from pathlib import Path

import pandas as pd
import pytest
from revision_series import SAMPLES, log_rows

from kitchen import cli
from kitchen.io import files
from kitchen.revisions import revise, revisions_path


@pytest.fixture
def clay(tmp_path):
    return Path(shutil.copytree(SAMPLES / "clay_liner", tmp_path / "clay_liner"))


# --- the command line -------------------------------------------------------------------------


def run(*arguments):
    return subprocess.run(
        [sys.executable, "-m", "kitchen", *map(str, arguments)], capture_output=True, text=True
    )


def test_command_line_revise_history_report(clay, tmp_path, capsys):
    def main(*arguments):
        status = cli.main([str(a) for a in arguments])
        output = capsys.readouterr()
        assert status == 0, output.err
        return output.out

    out = main("revise", clay, "--specimen", "QF-01", "--field", "height", "--value", "4.95 in",
               "--reason", "re-measured after test", "--who", "R. Okafor", "--criterion", "1e-9")  # fmt: skip
    [row] = log_rows(clay)
    assert f"recorded revision {row['id']}" in out
    # 116.27 mm -> 125.73 mm: rho_d falls by 116.27/125.73 (rho_d = Ms/(A L); Das)
    assert "QF-01 falling_head: dry density 1.7049 -> 1.5767 Mg/m3" in out
    main("revise", clay, "--specimen", "QF-01", "--field", "head", "--reading", "3",
         "--value", "184.5 cm", "--reason", "typo")  # fmt: skip
    out = main("history", clay, "--out", tmp_path / "history.csv")
    assert "2 row(s)" in out and "reading row 3 head: 184.7 cm -> 184.5 cm" in out
    assert pd.read_csv(tmp_path / "history.csv")["status"].tolist() == ["in force"] * 2
    done = run("report", clay, "--out", tmp_path / "out", "--no-images")  # as a user runs it
    assert done.returncode == 0, done.stderr
    assert "2 revision(s) applied" in done.stdout
    table = pd.read_csv(tmp_path / "out" / "results.csv")
    assert table.loc[0, "dry_density [Mg/m3]"] == pytest.approx(1.5767, abs=1e-4)
    out = main("revise", clay, "--withdraw", row["id"], "--reason", "wrong specimen")
    assert f"of revision {row['id']}" in out


@pytest.mark.parametrize(
    ("arguments", "message"),
    [
        (
            ["--specimen", "QF-99", "--field", "height", "--value", "4.95 in"],
            "unknown specimen 'QF-99'",
        ),
        (
            ["--specimen", "QF-01", "--field", "height", "--value", "4.95 g"],
            "unit 'g' is not a length",
        ),
        (["--specimen", "QF-01", "--field", "height"], "revise needs --value"),
        (["--withdraw", "abcdef12", "--specimen", "QF-01"], "--withdraw takes only --reason"),
        (["--withdraw", "abcdef12"], "no revision 'abcdef12'"),
    ],
)
def test_command_line_bad_input_exits_2_and_writes_nothing(clay, arguments, message, capsys):
    try:
        status = cli.main(["revise", str(clay), *arguments, "--reason", "r"])
    except SystemExit as stop:  # argparse's usage errors
        status = stop.code
    assert status == 2
    assert message in capsys.readouterr().err
    assert not revisions_path(clay).exists()


def test_command_line_bad_input_shows_no_traceback(clay):
    done = run("revise", clay, "--specimen", "QF-01", "--field", "height", "--value", "-1 mm",
               "--reason", "r")  # fmt: skip
    assert done.returncode == 2 and "Traceback" not in done.stderr
    assert "must be greater than zero; nothing was written" in done.stderr
    assert not revisions_path(clay).exists()


def _snapshot(folder: Path) -> dict[str, bytes]:
    return {str(p.relative_to(folder)): p.read_bytes() for p in folder.rglob("*") if p.is_file()}


def test_export_failure_leaves_the_previous_report(clay, tmp_path, monkeypatch, capsys):
    out = tmp_path / "out"
    assert cli.main(["report", str(clay), "--out", str(out), "--no-images"]) == 0
    previous = _snapshot(out)
    assert "results.csv" in previous
    revise(clay, specimen="QF-01", field="height", value="4.95 in", reason="re-measured")

    def full_disk(*arguments):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(files.os, "replace", full_disk)
    assert cli.main(["report", str(clay), "--out", str(out), "--no-images"]) == 2
    monkeypatch.undo()
    assert "No space left on device" in capsys.readouterr().err
    assert _snapshot(out) == previous  # every file as it was, and no temporary left behind
