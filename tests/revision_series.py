"""A small series written as CSV text, and the digests of its files and log, for the revision tests."""

import csv
import hashlib
import io
from pathlib import Path

from series_files import SPECIMENS

from kitchen.revisions import revisions_path

WHEN = "2025-05-02T14:30:00+02:00"

FALLING = """specimen,time [min],head [cm],temperature [degC]
A1,0,100,20
A1,10,95,20.5
A1,20,90.3,21
A1,30,85.9,21
A2,0,100,19
A2,10,97,19
A2,20,94.1,19
A2,30,91.3,19
"""


def small_series(folder: Path, specimens: str = SPECIMENS) -> Path:
    folder.mkdir(parents=True, exist_ok=True)
    (folder / "specimens.csv").write_text(specimens, encoding="utf-8")
    (folder / "falling_head.csv").write_text(FALLING, encoding="utf-8")
    return folder


def raw_digests(folder: Path) -> dict[str, str]:
    """SHA-256 of every file of a series except its revision log."""
    return {
        p.name: hashlib.sha256(p.read_bytes()).hexdigest()
        for p in sorted(folder.iterdir())
        if p.name != "revisions.csv"
    }


def log_bytes(series: Path) -> bytes | None:
    log = revisions_path(series)
    return log.read_bytes() if log.exists() else None


def log_rows(series: Path) -> list[dict]:
    return list(csv.DictReader(io.StringIO(revisions_path(series).read_text(encoding="utf-8"))))
