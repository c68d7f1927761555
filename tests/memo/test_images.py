"""Static chart images: without Chromium the export is refused, naming what to install."""

import os
import subprocess
import sys
from pathlib import Path

SAMPLES = Path(__file__).resolve().parents[2] / "sample_data"


def run(*arguments, env=None):
    return subprocess.run(
        [sys.executable, "-m", "kitchen", *map(str, arguments)],
        capture_output=True,
        text=True,
        env={**os.environ, **(env or {})},
    )


def test_command_line_without_chromium_names_what_to_install(tmp_path):
    done = run(
        "report",
        SAMPLES / "drainage_sand",
        "--out",
        tmp_path / "out",
        env={"BROWSER_PATH": str(tmp_path / "no-such-chromium")},
    )
    assert done.returncode == 3
    assert "apt-get install chromium" in done.stderr and "--no-images" in done.stderr
    assert "Traceback" not in done.stderr
    assert not (tmp_path / "out").exists()  # refused before writing anything
