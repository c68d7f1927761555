"""The rates of both acceptable zones over larger seeded populations than the tests use.

Run from the repository root (beside ``make bench``)::

    .venv/bin/python tests/benchmarks/zone_rates.py [number of series, default 2000]

Prints, over the simulated series of tests/compaction_populations.py: how many drawn zones
hold a specimen that does not meet (or is not judged) — it must be none — and in how many
series the hull of all the specimens that meet would have held one; how often the fitted
zone's 95 % prediction interval holds a new specimen of the same series; and how many new
specimens inside their effort's fitted zone fail the criterion.
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from compaction_populations import compaction_series, new_specimen_tally  # noqa: E402

from kitchen.analysis import acceptable_zone, fit_zone  # noqa: E402


def main(count: int) -> None:
    started = time.perf_counter()
    holding = crowded = refused = 0
    tallies = []
    for seed in range(count):
        series = compaction_series(seed)
        meets = series.meets
        zone = acceptable_zone(series.water_content, series.dry_density, meets)
        holding += bool(
            np.any(zone.contains(series.water_content[~meets], series.dry_density[~meets]))
        )
        crowded += bool(zone.blocking)
        w, rho, k, effort = series.judged_specimens
        try:
            fitted = fit_zone(w, rho, k, series.criterion, effort)
        except ValueError:
            refused += 1
            continue
        tallies.append(new_specimen_tally(fitted, series, 1_000_000 + seed))
    covered, total, in_zone, failing = np.sum(tallies, axis=0)
    print(f"series: {count}")
    print(f"drawn zones holding a specimen that does not meet: {holding}")
    print(f"series where the hull of all that meet held one that does not: {crowded}")
    print(f"fitted zones refused (too few judged specimens): {refused}")
    print(
        f"95 % prediction interval holding a new specimen: {covered}/{total} = {covered / total:.4f}"
    )
    print(
        f"new specimens in the fitted zone failing the criterion: {failing}/{in_zone} = "
        f"{failing / max(in_zone, 1):.4f} (at most 0.025 expected)"
    )
    print(f"seconds: {time.perf_counter() - started:.1f}")


if __name__ == "__main__":
    main(int(sys.argv[1]) if len(sys.argv) > 1 else 2000)
