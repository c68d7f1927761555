"""Which result of each specimen is analysed, which k are usable, and the series' Gs."""

import numpy as np
import pandas as pd
from analysis_results import results_frame

from kitchen.analysis import MEETS, NOT_JUDGED, analyse_series
from kitchen.analysis.result_selection import median_specific_gravity


def test_one_result_per_specimen_prefers_a_valid_one():
    rows = [
        dict(
            specimen="S1",
            method="constant_head",
            valid=False,
            water_content=0.2,
            dry_density=1700,
            k_reference=1e-8,
        ),
        dict(
            specimen="S1",
            method="falling_head",
            valid=True,
            water_content=0.2,
            dry_density=1700,
            k_reference=1e-10,
        ),
        dict(
            specimen="S2",
            method="falling_head",
            valid=True,
            water_content=0.21,
            dry_density=1690,
            k_reference=2e-10,
        ),
    ]
    frame = results_frame(rows)
    frame["valid"] = [False, True, True]
    analysis = analyse_series(frame, 1e-9)
    assert list(analysis.specimens["specimen"]) == ["S1", "S2"]
    assert analysis.specimens.loc[0, "method"] == "falling_head"
    assert "specimen S1 has more than one result: the falling_head result is used" in analysis.notes


def test_unusable_conductivity_is_left_out_with_a_note():
    rows = [
        dict(specimen=s, water_content=0.2, dry_density=1700, k_reference=k)
        for s, k in (("ok", 1e-9), ("gone", np.nan), ("ok2", 2e-9))
    ]
    analysis = analyse_series(results_frame(rows), 1e-9)
    assert list(analysis.specimens["specimen"]) == ["ok", "ok2"]
    assert "specimen gone: no usable conductivity, left out of the analysis" in analysis.notes


def test_specific_gravity_is_the_median_and_a_spread_is_noted():
    # the median of the values given, against numpy.median (a reference library)
    values = [2.65, 2.70, 2.72, np.nan]
    notes = []
    gs = median_specific_gravity(pd.DataFrame({"specific_gravity": values}), notes)
    assert gs == np.nanmedian(values)
    assert notes == [
        "specimens carry 3 values of Gs (2.65 to 2.72): the saturation lines use their median, 2.7"
    ]
    none = []
    assert median_specific_gravity(pd.DataFrame({"specific_gravity": [np.nan]}), none) is None
    assert none == []


def test_a_test_kept_on_record_comes_before_one_that_is_not():
    # the rule: the first valid result; else the first kept on record; else the first
    rows = [
        dict(specimen="S1", method=m, water_content=0.2, dry_density=1700, k_reference=k)
        for m, k in (("constant_head", 1e-8), ("falling_head", 1e-10))
    ]
    frame = results_frame(rows)
    frame["valid"] = [False, False]
    first = analyse_series(frame, 1e-9)
    assert first.specimens.loc[0, "method"] == "constant_head"
    assert first.specimens.loc[0, "verdict"] == NOT_JUDGED
    kept = analyse_series(frame, 1e-9, kept={("S1", "falling_head"): "kept by A. B.: reason"})
    assert kept.specimens.loc[0, "method"] == "falling_head"
    assert kept.specimens.loc[0, "kept_on_record"] == "kept by A. B.: reason"
    assert kept.specimens.loc[0, "verdict"] == MEETS
    frame["valid"] = [True, False]
    valid = analyse_series(frame, 1e-9, kept={("S1", "falling_head"): "kept: reason"})
    assert valid.specimens.loc[0, "method"] == "constant_head"
    assert valid.specimens.loc[0, "kept_on_record"] == ""  # valid: nothing to keep
