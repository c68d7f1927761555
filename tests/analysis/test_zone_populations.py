"""Both zones on seeded populations of simulated series (tests/compaction_populations.py).

The drawn zone must never hold a specimen that does not meet, or is not judged; the fitted
zone's 95 % prediction interval must hold new specimens of the same series at about its
stated rate, and a new specimen in the fitted zone must seldom fail the criterion.
"""

import numpy as np
from compaction_populations import compaction_series, new_specimen_tally

from kitchen.analysis import acceptable_zone, fit_zone

SERIES = 240


def test_the_drawn_zone_never_holds_a_specimen_that_does_not_meet():
    holding, crowded = 0, 0
    for seed in range(SERIES):
        series = compaction_series(seed)
        meets = series.meets
        zone = acceptable_zone(series.water_content, series.dry_density, meets)
        others = zone.contains(series.water_content[~meets], series.dry_density[~meets])
        holding += bool(np.any(others))
        crowded += bool(zone.blocking)
        assert len(zone.left_out) + int(
            np.sum(zone.contains(series.water_content[meets], series.dry_density[meets]))
        ) == int(meets.sum())
    assert holding == 0
    # the hull of all the specimens that meet (the old zone) held one that does not in a
    # good share of these series: the population tests the hard case
    assert crowded >= SERIES // 5


def test_the_fitted_zone_interval_covers_new_specimens_at_its_rate():
    refused, tallies = 0, []
    for seed in range(SERIES):
        series = compaction_series(seed)
        w, rho, k, effort = series.judged_specimens
        try:
            zone = fit_zone(w, rho, k, series.criterion, effort)
        except ValueError as error:
            assert "needs at least" in str(error)
            refused += 1
            continue
        # a new specimen in its effort's zone (in the one zone, without an effort factor)
        tallies.append(new_specimen_tally(zone, series, 100_000 + seed))
    covered, total, in_zone, failing_in_zone = np.sum(tallies, axis=0)
    assert refused < SERIES // 10 and total > 3000
    assert 0.93 <= covered / total <= 0.97
    # the upper end of a two-sided 95 % interval: at most 2.5 % of new specimens above it
    assert in_zone > 200 and failing_in_zone / in_zone <= 0.025
