"""The command line under faults: killed (SIGKILL, no chance to tidy up) at random points of
`report`, `revise` and `window`, and run out of disk space. Whatever stops a command, the
previous state is whole: the pack folder verifies against its manifest (the previous pack
or the new one, never a mixture), every log reads without a torn row, the raw files are
unchanged. The kill points are drawn from a seeded generator over the span of an
uninterrupted run of the same command."""

import hashlib
import os
import signal
import subprocess
import sys
import time
import warnings
from pathlib import Path

import numpy as np
import pytest
from cli_runner import run_cli
from series_files import SAMPLES, copy_sample

from kitchen.io import APPEND_ROOM
from kitchen.memo import (
    MANIFEST,
    PACK_MARK,
    interrupted_exports,
    read_manifest,
    verify_pack,
)
from kitchen.revisions import read_kept_tests, read_revisions, read_window_choices

SEED = 17_009
KILLS = {"report": 6, "revise": 3, "window": 3}


def _digests(folder: Path) -> dict[str, str]:
    return {
        str(p.relative_to(folder)): hashlib.sha256(p.read_bytes()).hexdigest()
        for p in sorted(folder.rglob("*"))
        if p.is_file()
    }


def _raw(series: Path) -> dict[str, str]:
    logs = ("revisions.csv", "windows.csv", "kept_tests.csv")
    return {name: d for name, d in _digests(series).items() if name not in logs}


def _logs(series: Path) -> tuple:
    """Every log's rows; a torn row (a warning) fails the test."""
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        return read_revisions(series), read_window_choices(series), read_kept_tests(series)


def _command(name: str, series: Path, out: Path, trial: int) -> list[str]:
    if name == "report":
        unit = ("m/s", "cm/s")[trial % 2]  # each run writes a pack other than the last
        return ["report", str(series), "--out", str(out), "--no-images", "--k-unit", unit]
    if name == "revise":
        height = f"{116.2 + 0.01 * trial:.2f} mm"
        return ["revise", str(series), "--specimen", "QF-01", "--field", "height",
                "--value", height, "--reason", f"trial {trial}"]  # fmt: skip
    return ["window", str(series), "--specimen", f"QF-0{1 + trial % 5}", "--proposed",
            "--reason", f"trial {trial}"]  # fmt: skip


def _run(arguments: list[str], kill_after: float | None) -> int | None:
    process = subprocess.Popen(
        [sys.executable, "-m", "kitchen", *arguments],
        stdout=subprocess.DEVNULL,
        stderr=subprocess.DEVNULL,
    )
    if kill_after is None:
        return process.wait(timeout=300)
    try:
        return process.wait(timeout=kill_after)
    except subprocess.TimeoutExpired:
        os.kill(process.pid, signal.SIGKILL)
        process.wait(timeout=60)
        return None


@pytest.mark.parametrize("command", list(KILLS))
def test_a_command_killed_at_any_point_leaves_the_previous_state_whole(tmp_path, command):
    series = copy_sample(SAMPLES / "clay_liner", tmp_path / "clay")
    out = tmp_path / "pack"
    raw = _raw(series)
    started = time.perf_counter()
    assert _run(_command(command, series, out, 0), None) == 0
    span = time.perf_counter() - started
    rng = np.random.default_rng([SEED, len(command)])
    killed = 0
    for trial in range(1, KILLS[command] + 1):
        logs = _logs(series)
        code = _run(_command(command, series, out, trial), float(rng.uniform(0.2, span)))
        killed += code is None
        assert code in (None, 0)
        assert _raw(series) == raw  # the raw files are never written
        after = _logs(series)
        for old, new in zip(logs, after, strict=True):  # whole rows: the same, or one more
            assert new[: len(old)] == old and len(new) - len(old) in (0, 1)
        if command == "report":
            assert verify_pack(out) == []  # the previous pack or the new one, whole
            for left in interrupted_exports(out):  # what a kill left beside the pack:
                listed = read_manifest(left)  # a pack being built (no manifest), or the
                for relative in {p.relative_to(left).as_posix() for p in left.rglob("*")}:
                    assert relative in (*listed, MANIFEST, PACK_MARK) or not listed
    assert killed >= 1, "no run was killed: the kill points missed every run"
    assert _runs_to_its_end(series, out, command)
    if command == "report":  # the previous packs a kill left beside it are gone now; a
        for left in interrupted_exports(out):  # pack killed while built is only named
            assert not (left / "manifest.csv").exists()


def _runs_to_its_end(series: Path, out: Path, command: str) -> bool:
    """After the kills, the command runs to its end once more on what they left."""
    code = _run(_command(command, series, out, 99), None)
    return code == 0 and (command != "report" or verify_pack(out) == [])


def _mount_tmpfs(folder: Path, size: int) -> None:
    if os.name != "posix" or os.geteuid() != 0:
        pytest.skip("a small tmpfs needs root to mount; the full disk is not simulated here")
    folder.mkdir()
    done = subprocess.run(
        ["mount", "-t", "tmpfs", "-o", f"size={size}", "tmpfs", str(folder)],
        capture_output=True,
        text=True,
    )
    if done.returncode != 0:
        pytest.skip(f"cannot mount a tmpfs here: {done.stderr.strip()}")


@pytest.fixture
def small_disk(tmp_path):
    """A tmpfs of 8 MB: room for one pack (about 5 MB, plotly.js most of it), not two."""
    folder = tmp_path / "disk"
    _mount_tmpfs(folder, 8 * 2**20)
    yield folder
    subprocess.run(["umount", str(folder)], check=True)


def test_a_full_disk_leaves_the_previous_pack_and_the_logs_whole(small_disk):
    series = copy_sample(SAMPLES / "clay_liner", small_disk / "clay")
    out = small_disk / "pack"
    assert run_cli("report", series, "--out", out, "--no-images").returncode == 0
    before = _digests(out)
    code, _, err = run_cli("report", series, "--out", out, "--no-images", "--k-unit", "cm/s")
    assert code == 2 and "no room on the disk for the pack" in err and "Traceback" not in err
    assert _digests(out) == before and verify_pack(out) == []
    assert interrupted_exports(out) == []  # what it wrote beside the pack is removed
    # the logs: an append that does not fit is refused before it writes
    assert run_cli("window", series, "--specimen", "QF-01", "--proposed", "--reason", "a")[0] == 0
    log = (series / "windows.csv").read_bytes()
    free = os.statvfs(small_disk)
    filler = small_disk / "filler"
    filler.write_bytes(b"\0" * (free.f_bavail * free.f_frsize - APPEND_ROOM // 2))
    code, _, err = run_cli("window", series, "--specimen", "QF-02", "--proposed", "--reason", "b")
    assert code == 2 and "nothing was written" in err
    assert (series / "windows.csv").read_bytes() == log
    filler.unlink()
    assert run_cli("window", series, "--specimen", "QF-02", "--proposed", "--reason", "b")[0] == 0
    assert [c.reason for c in read_window_choices(series)] == ["a", "b"]


def _long_record(folder: Path, readings: int) -> Path:
    """One specimen with `readings` falling-head readings, one a second, written without the
    package (the file is some 200 MB at 10⁷ readings)."""
    folder.mkdir()
    (folder / "specimens.csv").write_text(
        "specimen,effort,water_content [%],diameter [mm],height [mm],dry_mass [g],"
        "specific_gravity,standpipe_diameter [mm]\nA1,standard,16.0,101.6,116.4,1620.0,2.70,5.0\n",
        encoding="utf-8",
    )
    block = 10**6
    tails = [f"{number:06d},{150.0 - number * 1e-5:.5f},20.0\n" for number in range(block)]
    with open(folder / "falling_head.csv", "w", encoding="utf-8") as handle:
        handle.write("specimen,time [s],head [cm],temperature [degC]\n")
        for first in range(readings // block):
            handle.write("".join(f"A1,{first}" + tail for tail in tails))
    return folder


def test_ten_million_readings_under_a_memory_cap_end_in_words_not_a_traceback(tmp_path):
    resource = pytest.importorskip("resource", reason="no resource limits on this system")
    series = _long_record(tmp_path / "long", 10**7)
    cap = 2**30  # 1 GiB of address space: the record needs more

    def capped() -> None:
        resource.setrlimit(resource.RLIMIT_AS, (cap, cap))

    done = subprocess.run(
        [sys.executable, "-m", "kitchen", "report", str(series), "--out",
         str(tmp_path / "pack"), "--no-images"],
        preexec_fn=capped, capture_output=True, text=True, timeout=600,
    )  # fmt: skip
    assert done.returncode == 3, done.stderr[-2000:]
    assert "kitchen: out of memory working on" in done.stderr
    assert "Traceback" not in done.stderr and "MemoryError" not in done.stderr
    assert not (tmp_path / "pack").exists() and interrupted_exports(tmp_path / "pack") == []
