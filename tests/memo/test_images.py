"""Static chart images: without Chromium the export is refused, naming what to install."""

from cli_runner import run_cli
from series_files import SAMPLES

from kitchen.memo import images


def test_command_line_without_chromium_names_what_to_install(tmp_path, monkeypatch):
    # as in a fresh process on a machine without Chromium: BROWSER_PATH names none, and no
    # image server runs yet (one started earlier in this process would be used instead)
    monkeypatch.setenv("BROWSER_PATH", str(tmp_path / "no-such-chromium"))
    monkeypatch.setitem(images._image_server, "started", False)
    done = run_cli("report", SAMPLES / "drainage_sand", "--out", tmp_path / "out")
    assert done.returncode == 3
    assert "apt-get install chromium" in done.stderr and "--no-images" in done.stderr
    assert "Traceback" not in done.stderr
    assert not (tmp_path / "out").exists()  # refused before writing anything
