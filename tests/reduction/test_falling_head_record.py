"""The prepared falling-head record: its checks, temperatures, capillary rise and revisions."""

import dataclasses

import numpy as np
import pandas as pd
import pytest
from synthetic_records import known_k_record

from kitchen.reduction import (
    FallingHeadRecord,
    falling_head_analysis,
    jurin_capillary_rise,
    reduce_falling_head,
)
from kitchen.settings import Settings


def test_missing_temperatures():
    temps = np.full(40, 22.0)
    temps[5:9] = np.nan
    readings, specimen = known_k_record(temperature=np.full(40, 22.0))
    readings["temperature"] = temps
    result = reduce_falling_head(readings, specimen)
    assert any("interpolated" in note for note in result.notes)
    readings["temperature"] = np.nan
    result = reduce_falling_head(readings, specimen)
    assert any("temperature not recorded" in note for note in result.notes)
    assert np.isnan(result.temperature)


def _settings(**changes):
    return Settings(**changes)


def test_capillary_rise_is_off_by_default_and_corrects_when_asked():
    readings, specimen = known_k_record()
    bore = np.sqrt(4 * specimen["standpipe_area"] / np.pi)
    rise = jurin_capillary_rise(bore, 20.0)
    raised = readings.assign(head=readings["head"] + rise)  # the level stands hc too high
    plain = falling_head_analysis(raised, specimen, window=(0, 40))
    assert plain.capillary_rise == 0.0
    assert plain.k_reference < 2.0e-9 * 0.99  # heads too high fall too little, relatively
    jurin = falling_head_analysis(raised, specimen, _settings(capillary_rise="jurin"), (0, 40))
    assert jurin.k_reference == pytest.approx(2.0e-9, rel=1e-9)
    assert any("Jurin" in note for note in jurin.method_notes)
    measured = falling_head_analysis(raised, specimen, window=(0, 40), capillary_rise=rise)
    assert measured.k_reference == pytest.approx(2.0e-9, rel=1e-9)
    np.testing.assert_allclose(measured.fitted_head, raised["head"], rtol=1e-9)


def test_capillary_rise_above_a_head_is_refused_with_its_row():
    readings, specimen = known_k_record()
    readings["source_row"] = np.arange(2, 42)
    with pytest.raises(
        ValueError, match=r"specimen C1, row 41, column 'head': head .* is not above"
    ):
        falling_head_analysis(readings, specimen, capillary_rise=readings["head"].iloc[-1] + 1e-3)


def test_a_chosen_window_overrides_the_proposal():
    readings, specimen = known_k_record(noise=0.3e-3)
    analysis = falling_head_analysis(readings, specimen, window=(10, 40))
    assert not analysis.window_proposed and analysis.n == 30
    assert analysis.method_notes[0] == "readings 11 to 40 of 40 used (window chosen)"
    record = FallingHeadRecord(readings, specimen)
    assert record.analyse((10, 40)).k_reference == analysis.k_reference


# --------------------------------------------------------------------------- bad input
@pytest.mark.parametrize(
    ("change", "message"),
    [
        (
            lambda r, s: (r, s.drop("standpipe_area")),
            "specimen C1: standpipe_area must be a positive number",
        ),
        (lambda r, s: (r.drop(columns="head"), s), r"lack column\(s\) head"),
        (
            lambda r, s: (r.assign(temperature=r["temperature"].where(r.index != 7, 140.0)), s),
            "reading 8, column 'temperature': expected a water temperature between 0 and 100",
        ),
        (
            lambda r, s: (r.assign(time=r["time"].where(r.index != 5, 0.0)), s),
            "reading 6, column 'time': expected a time later than the reading before",
        ),
        (
            lambda r, s: (r.assign(head=r["head"].where(r.index != 3, -1.0)), s),
            "reading 4, column 'head': expected a positive number",
        ),
        (lambda r, s: (r.iloc[:1], s), "needs at least two readings, got 1"),
    ],
)
def test_bad_records_are_named(change, message):
    readings, specimen = change(*known_k_record())
    with pytest.raises(ValueError, match=message):
        FallingHeadRecord(readings, specimen)


def test_bad_analysis_requests_are_named():
    readings, specimen = known_k_record()
    record = FallingHeadRecord(readings, specimen)
    with pytest.raises(ValueError, match="unknown falling-head fit 'cubic'"):
        record.analyse(fit="cubic")
    with pytest.raises(ValueError, match="needs at least 4 readings; the window holds 3"):
        record.analyse((0, 3), fit="datum")
    with pytest.raises(ValueError, match=r"a reading window is \(start, stop\)"):
        record.analyse(window=5)
    flat = readings.assign(head=1.0)
    with pytest.raises(ValueError, match="the head does not fall over readings 1 to 40"):
        falling_head_analysis(flat, specimen)


def _assert_same_analysis(a, b):
    for field in dataclasses.fields(a):
        if field.name.startswith("_"):
            continue
        x, y = getattr(a, field.name), getattr(b, field.name)
        if isinstance(x, np.ndarray):
            np.testing.assert_array_equal(x, y, err_msg=field.name)
        elif x is not None and dataclasses.is_dataclass(x):
            assert dataclasses.asdict(x).keys() == dataclasses.asdict(y).keys(), field.name
            _assert_same_analysis(x, y)
        else:
            assert x == y or (x != x and y != y), field.name  # NaN stands for NaN


@pytest.mark.parametrize(
    "change, settings_changes",
    [
        ({"height": 0.121}, {}),
        ({"area": 0.0079}, {}),
        ({"standpipe_area": 2.4e-6}, {}),
        ({"standpipe_area": 2.4e-6}, {"capillary_rise": "jurin"}),
        ({"height": 0.109, "tailwater_standpipe_area": 3.0e-6}, {"capillary_rise": "jurin"}),
    ],
)
def test_a_record_for_a_revised_specimen_is_the_record_built_afresh(change, settings_changes):
    # with_specimen reuses the reading arrays: every number must be what a record built from
    # the revised row gives (the tool's own shortcut, checked against its own full path)
    readings, specimen = known_k_record(n=300, noise=0.4e-3, temperature=np.linspace(18, 22, 300))
    readings.loc[:20, "head"] += np.linspace(4e-3, 0.0, 21)  # an early transient to leave out
    settings = _settings(**settings_changes)
    record = FallingHeadRecord(readings, specimen, settings)
    record.analyse()  # the trends of every trial window are now held by the record
    revised = specimen.copy()
    for name, value in change.items():
        revised[name] = value
    reused = record.with_specimen(revised)
    assert reused.time is record.time  # the readings are shared, not prepared again
    fresh = FallingHeadRecord(readings, revised, settings)
    _assert_same_analysis(reused.analyse(), fresh.analyse())
    _assert_same_analysis(reused.analyse((5, 250)), fresh.analyse((5, 250)))
    np.testing.assert_array_equal(reused.increment_k, fresh.increment_k)
    _assert_same_analysis(
        record.analyse(), FallingHeadRecord(readings, specimen, settings).analyse()
    )


def test_a_record_takes_only_its_own_specimen():
    readings, specimen = known_k_record()
    record = FallingHeadRecord(readings, specimen)
    with pytest.raises(ValueError, match="specimen C1: a record takes the rows of its own"):
        record.with_specimen(pd.concat([specimen.drop("specimen"), pd.Series({"specimen": "C2"})]))
