"""The memo pack's manifest: the files exported, their sizes and SHA-256 (FIPS 180-4, here
through Python's hashlib), checked back; a second export removes only its own stale files."""

import hashlib
import shutil
from pathlib import Path

import pytest
from series_files import SAMPLES

from kitchen import cli
from kitchen.memo import CHART_SCRIPT, MANIFEST, export_memo_pack, read_manifest, verify_pack
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


def test_a_second_export_removes_only_its_own_stale_files(sand_pack, tmp_path):
    out, first = sand_pack
    own = out / "notes-from-the-reviewer.txt"
    own.write_text("mine")
    second = export_memo_pack(
        Workspace(SAMPLES / "drainage_sand"), out, images=False, self_contained=True
    )
    assert second.removed == (out / CHART_SCRIPT,)  # no longer loaded by any page
    assert not (out / CHART_SCRIPT).exists() and own.read_text() == "mine"
    assert verify_pack(out) == []


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
