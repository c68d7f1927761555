"""The memo pack's manifest: the files exported, their sizes and SHA-256 (FIPS 180-4, here
through Python's hashlib), checked back; a pack built beside its folder and swapped in
whole; a second export removes only what the first one provably wrote."""

import hashlib
import os
import shutil
from pathlib import Path

import pytest
from cli_runner import run_cli
from series_files import SAMPLES, copy_sample

from kitchen import cli
from kitchen.memo import (
    CHART_SCRIPT,
    MANIFEST,
    PackFolderError,
    export_memo_pack,
    interrupted_exports,
    read_manifest,
    verify_pack,
)
from kitchen.workspace import Workspace


@pytest.fixture
def sand_pack(tmp_path):
    out = tmp_path / "pack"
    pack = export_memo_pack(Workspace(SAMPLES / "drainage_sand"), out, images=False)
    return out, pack


def test_the_manifest_lists_every_file_with_its_digest(sand_pack):
    out, pack = sand_pack
    listed = read_manifest(out)
    assert pack.manifest == out / MANIFEST
    assert sorted(listed) == sorted(p.relative_to(out).as_posix() for p in pack)
    for relative, (size, digest) in listed.items():
        data = (out / relative).read_bytes()
        assert size == len(data) and digest == hashlib.sha256(data).hexdigest()
    assert verify_pack(out) == []


def test_a_changed_or_missing_file_is_named(sand_pack):
    out, _ = sand_pack
    with open(out / "results.csv", "a", encoding="utf-8") as handle:
        handle.write("extra,row\n")
    (out / "report.html").unlink()
    assert sorted(verify_pack(out)) == [
        "report.html: missing",
        "results.csv: not the file exported (its SHA-256 differs)",
    ]
    assert "no manifest.csv" in verify_pack(out / "charts")[0]


def _state(folder: Path) -> dict:
    """Every entry below `folder` (links not followed) with its bytes or link target."""
    state = {}
    for path in sorted(folder.rglob("*")):
        if path.is_symlink():
            state[path] = ("link", str(path.readlink()))
        elif path.is_file():
            state[path] = path.read_bytes()
    return state


def test_a_second_export_replaces_the_whole_pack_and_removes_its_stale_files(sand_pack):
    out, first = sand_pack
    second = export_memo_pack(
        Workspace(SAMPLES / "drainage_sand"), out, images=False, self_contained=True
    )
    assert second.removed == (out / CHART_SCRIPT,)  # no longer loaded by any page
    assert not (out / CHART_SCRIPT).exists()
    assert verify_pack(out) == []
    assert interrupted_exports(out) == []  # nothing left beside the pack


def test_a_folder_holding_a_file_the_tool_did_not_write_is_refused_and_left_alone(sand_pack):
    out, _ = sand_pack
    (out / "notes-from-the-reviewer.txt").write_text("mine")
    before = _state(out)
    with pytest.raises(PackFolderError, match="notes-from-the-reviewer.txt: not in manifest"):
        export_memo_pack(Workspace(SAMPLES / "drainage_sand"), out, images=False)
    assert _state(out) == before and interrupted_exports(out) == []


def test_a_pack_received_from_elsewhere_is_never_replaced(sand_pack, tmp_path):
    # a whole pack, every file as exported, copied in (as a colleague's pack is received):
    # the tool did not write it in this folder, so it deletes nothing of it
    out, _ = sand_pack
    received = Path(shutil.copytree(out, tmp_path / "received"))
    assert verify_pack(received) == []  # whole, and still checked as such
    before = _state(received)
    with pytest.raises(PackFolderError, match="did not write in this folder"):
        export_memo_pack(Workspace(SAMPLES / "drainage_sand"), received, images=False)
    assert _state(received) == before
    export_memo_pack(Workspace(SAMPLES / "drainage_sand"), out, images=False)  # its own: yes


def test_a_changed_file_of_the_previous_pack_is_not_replaced(sand_pack):
    out, _ = sand_pack
    (out / "results.csv").write_text("edited by the reviewer")
    before = _state(out)
    with pytest.raises(PackFolderError, match="results.csv: not the file exported"):
        export_memo_pack(Workspace(SAMPLES / "drainage_sand"), out, images=False)
    assert _state(out) == before


def test_a_manifest_the_tool_did_not_write_deletes_nothing_it_names(tmp_path):
    # a received folder: its manifest names a file of its own and, through a link, a file
    # outside the folder; both are listed with their true digests
    out, outside = tmp_path / "received", tmp_path / "elsewhere.txt"
    out.mkdir()
    outside.write_text("precious")
    (out / "mine.txt").write_text("mine")
    (out / "link.txt").symlink_to(outside)
    rows = [
        f"{name},{len(data)},{hashlib.sha256(data).hexdigest()}"
        for name, data in (("mine.txt", b"mine"), ("link.txt", b"precious"))
    ]
    (out / MANIFEST).write_text("path,bytes,sha256\n" + "\n".join(rows) + "\n")
    before = _state(tmp_path)
    with pytest.raises(PackFolderError, match="link.txt: a link"):
        export_memo_pack(Workspace(SAMPLES / "drainage_sand"), out, images=False)
    assert _state(tmp_path) == before
    assert outside.read_text() == "precious" and (out / "mine.txt").read_text() == "mine"


@pytest.mark.parametrize("kind", ["file", "link", "folder without a manifest"])
def test_a_folder_that_is_not_a_pack_is_refused(tmp_path, kind):
    out = tmp_path / "out"
    if kind == "file":
        out.write_text("a file")
    elif kind == "link":
        (tmp_path / "real").mkdir()
        out.symlink_to(tmp_path / "real")
    else:
        out.mkdir()
        (out / "thesis.docx").write_bytes(b"chapter one")
    before = _state(tmp_path)
    with pytest.raises(PackFolderError, match="out"):
        export_memo_pack(Workspace(SAMPLES / "drainage_sand"), out, images=False)
    assert _state(tmp_path) == before


def test_an_empty_folder_takes_the_pack(tmp_path):
    out = tmp_path / "empty"
    out.mkdir()
    export_memo_pack(Workspace(SAMPLES / "drainage_sand"), out, images=False)
    assert verify_pack(out) == [] and interrupted_exports(out) == []


@pytest.mark.parametrize("inside", ["", "packs/today"])
def test_a_pack_is_never_written_into_the_series_folder(tmp_path, inside):
    series = copy_sample(SAMPLES / "clay_liner", tmp_path / "series")
    before = _state(series)
    with pytest.raises(PackFolderError, match="an input's own folder or file, or inside it"):
        export_memo_pack(Workspace(series), series / inside, images=False)
    assert _state(series) == before
    for command in ("report", "field-check"):
        code, _, err = run_cli(command, series, "--out", series / inside, "--no-images")
        assert code == 2 and "an input's own folder" in err and _state(series) == before


def test_a_failure_part_way_leaves_the_previous_pack_whole_and_nothing_beside_it(sand_pack):
    out, _ = sand_pack
    before = _state(out)

    def progress(done, total, what):
        if "report.html" in what:
            raise OSError(28, "No space left on device")

    with pytest.raises(OSError, match="No space left"):
        export_memo_pack(Workspace(SAMPLES / "drainage_sand"), out, images=False, progress=progress)
    assert _state(out) == before and verify_pack(out) == []
    assert interrupted_exports(out) == []


def test_the_manifest_certifies_the_bytes_written_not_a_file_replaced_meanwhile(tmp_path):
    out = tmp_path / "pack"

    def progress(done, total, what):
        if "report.html" in what:  # results.csv is written by now, beside the pack
            (staging,) = interrupted_exports(out)
            (staging / "results.csv").write_text("swapped in while the export ran")

    export_memo_pack(Workspace(SAMPLES / "drainage_sand"), out, images=False, progress=progress)
    assert verify_pack(out) == ["results.csv: not the file exported (its SHA-256 differs)"]


def test_verify_names_a_file_added_a_link_and_a_manifest_emptied_to_its_header(sand_pack):
    out, _ = sand_pack
    (out / "charts" / "extra.html").write_text("<p>added</p>")
    (out / "elsewhere").symlink_to(out / "report.html")
    assert verify_pack(out) == [
        "charts/extra.html: not in manifest.csv (not written by the export)",
        "elsewhere: a link (the tool writes no links)",
    ]
    (out / MANIFEST).write_text("path,bytes,sha256\n")
    assert verify_pack(out) == [
        "manifest.csv lists no file: a pack always holds its report and tables"
    ]
    code, _, err = run_cli("verify", out)
    assert code == 2 and "lists no file" in err


def test_a_damaged_manifest_stops_the_export_before_it_writes(sand_pack):
    out, _ = sand_pack
    (out / MANIFEST).write_text("path,bytes,sha256\n../../etc/passwd,1," + "0" * 64 + "\n")
    before = {p: p.stat().st_mtime_ns for p in out.rglob("*") if p.is_file()}
    with pytest.raises(ValueError, match="row 2: '../../etc/passwd' is not a path inside"):
        export_memo_pack(Workspace(SAMPLES / "drainage_sand"), out, images=False)
    assert {p: p.stat().st_mtime_ns for p in out.rglob("*") if p.is_file()} == before


def test_command_line_verify(sand_pack, tmp_path, capsys):
    out, _ = sand_pack
    assert cli.main(["verify", str(out)]) == 0
    assert "present and as exported" in capsys.readouterr().out
    copy = Path(shutil.copytree(out, tmp_path / "received"))
    (copy / "results.xlsx").write_bytes(b"edited")
    assert cli.main(["verify", str(copy)]) == 2
    assert "results.xlsx: not the file exported" in capsys.readouterr().err


def test_a_previous_pack_left_beside_the_folder_by_a_kill_is_removed_next_time(sand_pack):
    # a kill after the swap, while the previous pack was being removed: what is left of it
    # is listed in its manifest and matches, so the next export proves it and removes it
    out, _ = sand_pack
    left = out.parent / f".{out.name}.kitchen-new-killed01"
    os.rename(out, left)  # swapped out (a rename keeps the folder, and its mark true)
    (left / "report.html").unlink()  # removed before the kill
    building = out.parent / f".{out.name}.kitchen-new-killed02"
    building.mkdir()
    (building / "results.csv").write_text("a pack killed while being built")
    with pytest.warns(UserWarning, match="kitchen-new-killed02: left by an export"):
        export_memo_pack(Workspace(SAMPLES / "drainage_sand"), out, images=False)
    assert interrupted_exports(out) == [building] and verify_pack(out) == []
