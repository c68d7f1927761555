"""Provenance of a memo: hashes against hashlib, the time in UTC, the lines printed."""

import hashlib
from datetime import UTC, datetime, timedelta, timezone

import pytest

from kitchen import __version__
from kitchen.memo import file_sha256, memo_provenance


def test_file_hash_equals_hashlib(tmp_path):
    path = tmp_path / "readings.csv"
    data = b"specimen,time [s],head [m]\n" + b"A,1,0.5\n" * 300_000  # several 1 MiB blocks
    path.write_bytes(data)
    assert file_sha256(path) == hashlib.sha256(data).hexdigest()


def test_provenance_records_inputs_settings_and_revisions(tmp_path):
    files = []
    for name, text in (("specimens.csv", "specimen\nA\n"), ("falling_head.csv", "x\n1\n")):
        files.append(tmp_path / name)
        files[-1].write_text(text)
    when = datetime(2026, 3, 4, 5, 6, 7, tzinfo=timezone(timedelta(hours=2)))
    provenance = memo_provenance(
        files,
        "demo",
        tmp_path,
        {"reference_temperature": 20.0, "criterion [m/s]": "1e-09"},
        revision_count=2,
        revision_log=tmp_path / "revisions.csv",
        revision_log_sha256="ab" * 32,
        created=when,
    )
    assert provenance.tool_version == __version__
    assert provenance.created == "2026-03-04T03:06:07+00:00"  # recorded in UTC
    assert [f.sha256 for f in provenance.input_files] == [
        hashlib.sha256(f.read_bytes()).hexdigest() for f in files
    ]
    assert [f.size for f in provenance.input_files] == [len(f.read_bytes()) for f in files]
    assert provenance.settings == (("reference_temperature", "20.0"), ("criterion [m/s]", "1e-09"))
    lines = "\n".join(provenance.lines())
    assert "revisions applied: 2 (revision log SHA-256: " + "ab" * 32 + ")" in lines
    assert f"kitchen {__version__}" in lines and "numpy" in lines


def test_provenance_defaults_to_now_without_a_log(tmp_path):
    before = datetime.now(UTC).replace(microsecond=0)
    provenance = memo_provenance([], "demo", tmp_path, {})
    assert datetime.fromisoformat(provenance.created) >= before
    assert provenance.revision_count == 0 and provenance.revision_log_sha256 is None
    assert "revision log SHA-256: none" in provenance.lines()[-2]


def test_missing_input_file_is_an_error(tmp_path):
    with pytest.raises(FileNotFoundError):
        memo_provenance([tmp_path / "gone.csv"], "demo", tmp_path, {})
