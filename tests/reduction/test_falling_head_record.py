"""The prepared falling-head record: its checks, temperatures, capillary rise and revisions;
one window reduced, and the window the tool proposes: round trips and samples."""

import dataclasses
import json

import numpy as np
import pandas as pd
import pytest
from series_files import SAMPLES
from synthetic_records import known_k_record

from kitchen.io import load_series
from kitchen.reduction import (
    FallingHeadRecord,
    falling_head_analysis,
    jurin_capillary_rise,
)
from kitchen.settings import Settings
from kitchen.specimen import specimen_state
from kitchen.validity import Criteria


def test_missing_temperatures():
    temps = np.full(40, 22.0)
    temps[5:9] = np.nan
    readings, specimen = known_k_record(temperature=np.full(40, 22.0))
    readings["temperature"] = temps
    result = falling_head_analysis(readings, specimen, window=(0, 40), fit="log_linear")
    assert any("interpolated" in note for note in result.notes)
    readings["temperature"] = np.nan
    result = falling_head_analysis(readings, specimen, window=(0, 40), fit="log_linear")
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
    np.testing.assert_array_equal(reused.analyse().increment_k, fresh.analyse().increment_k)
    _assert_same_analysis(
        record.analyse(), FallingHeadRecord(readings, specimen, settings).analyse()
    )


def test_a_record_takes_only_its_own_specimen():
    readings, specimen = known_k_record()
    record = FallingHeadRecord(readings, specimen)
    with pytest.raises(ValueError, match="specimen C1: a record takes the rows of its own"):
        record.with_specimen(pd.concat([specimen.drop("specimen"), pd.Series({"specimen": "C2"})]))


# --------------------------------------------------------------------------- the analysis
def test_analysis_of_a_steady_record():
    readings, specimen = known_k_record(noise=0.3e-3, seed=3)
    analysis = falling_head_analysis(readings, specimen)
    assert analysis.window_proposed and (analysis.start, analysis.stop) == (0, 40)
    assert analysis.valid and not analysis.checks
    assert "window proposed by the tool" in analysis.method_notes[0]
    assert analysis.k_reference_low < 2.0e-9 < analysis.k_reference_high
    assert analysis.k_reference_low <= -analysis.line.slope_high * 2.0e-6 * 0.116 / 0.0081
    assert analysis.increment_k.size == 39 and analysis.value_k.size >= 4
    assert analysis.r_squared > 0.999
    np.testing.assert_allclose(analysis.head_residuals, readings["head"] - analysis.fitted_head)
    assert np.abs(analysis.head_residuals).max() < 1.5e-3
    assert {v.criterion for v in analysis.verdicts} == {
        "steady_values",
        "trend",
        "flow_ratio",
        "gradient",
        "reynolds",
    }


def test_curved_record_fails_the_trend_and_says_why():
    readings, specimen = known_k_record(n=60, noise=0.2e-3)
    readings["head"] = readings["head"] + 0.15  # a wrong tailwater datum
    analysis = falling_head_analysis(readings, specimen, window=(0, 60))
    assert not analysis.valid
    trend = next(v for v in analysis.verdicts if v.criterion == "trend")
    assert trend.passed is False and "the tool's own test" in trend.sentence
    assert "wrong tailwater datum" in analysis.diagnosis
    assert analysis.diagnosis in analysis.checks
    # the decay finds the 150 mm and recovers k; by default a datum that far off is not
    # taken as a datum error (datum_tolerance 50 mm) unless the lab says it can be
    datum = falling_head_analysis(readings, specimen, window=(0, 60), fit="datum")
    assert datum.fit_kind == "datum" and not datum.valid
    assert datum.asymptote == pytest.approx(0.15, abs=0.01)
    assert datum.k_reference == pytest.approx(2.0e-9, rel=0.01)
    assert any("fitted datum h∞ = 150 mm" in note for note in datum.notes)
    verdict = next(v for v in datum.verdicts if v.criterion == "datum")
    assert verdict.passed is False and "within ±50 mm" in verdict.sentence
    loose = Settings(criteria=Criteria(datum_tolerance=0.2))
    assert falling_head_analysis(readings, specimen, loose, window=(0, 60), fit="datum").valid


def test_the_datum_fit_does_not_absorb_a_transient_or_a_drift():
    # sample_data/clay_liner/truth.json: QF-02 and QF-07 open with an early transient,
    # QF-04 drifts; the others have a true datum of zero. A decay that absorbs the
    # transient as a datum offset gives k 20-100 % too high; the datum check refuses it,
    # so the proposal finds no valid window for the drift (QF-04). For the transients the
    # full record shows the curvature lies in the early readings, so the log-linear fit
    # over the proposed window gives k (QF-02, QF-07): the old rule's window, whose fitted
    # datum of tens of mm was the transient's tail, gave k 5.4 and 5.9 % high, its interval
    # missing the truth, and was held here only to 8 %.
    truth = json.loads((SAMPLES / "clay_liner" / "truth.json").read_text())
    series = load_series(SAMPLES / "clay_liner")
    state = specimen_state(series.specimens).set_index("specimen", drop=False)
    settings = Settings(falling_head_fit="datum")
    for specimen in state.index:
        readings = series.falling_head[series.falling_head["specimen"] == specimen]
        analysis = falling_head_analysis(readings, state.loc[specimen], settings)
        k_true = truth["specimens"][specimen]["k20_m_per_s"]
        if specimen == "QF-04":
            assert not analysis.valid, specimen
            continue
        assert analysis.valid, specimen
        assert abs(analysis.asymptote) < 0.1, specimen
        assert analysis.k_reference_low <= k_true <= analysis.k_reference_high, specimen
        if specimen in ("QF-02", "QF-07"):
            assert analysis.fit_kind == "log_linear", specimen
            assert "datum-fitted decay not used" in analysis.method_notes[-1], specimen
            assert analysis.k_reference == pytest.approx(k_true, rel=0.0025), specimen
        else:
            assert analysis.fit_kind == "datum", specimen
            assert analysis.k_reference == pytest.approx(k_true, rel=0.02), specimen


@pytest.mark.parametrize(
    ("spans", "noise", "k_tolerance", "datum_tolerance"),
    [
        # Stated tolerances for 60 readings over the record, over 20 seeds each: the
        # datum-fitted decay recovers k and h_inf within these.
        (0.5, 0.0, 1e-6, 1e-5),
        (0.5, 0.3e-3, 0.005, 0.002),
        (0.5, 1.0e-3, 0.01, 0.005),
        (1.0, 0.3e-3, 0.01, 0.005),
        (1.0, 1.0e-3, 0.02, 0.015),
        (3.0, 0.0, 1e-6, 1e-4),
        (3.0, 1.0e-3, 0.12, 0.12),
    ],
)
def test_datum_fit_round_trip(spans, noise, k_tolerance, datum_tolerance):
    area, length, standpipe = 0.0081, 0.116, 2.0e-6
    span = 8 * 3600.0
    tau = spans * span
    time = np.linspace(0.0, span, 60)
    specimen = pd.Series(
        {"specimen": "D", "area": area, "height": length, "standpipe_area": standpipe}
    )
    covered = 0
    for seed in range(20):
        head = 0.05 + 1.15 * np.exp(-time / tau)
        head = head + np.random.default_rng(seed).normal(0.0, noise, 60)
        readings = pd.DataFrame({"time": time, "head": head, "temperature": 20.0})
        analysis = falling_head_analysis(readings, specimen, window=(0, 60), fit="datum")
        assert analysis.fit_kind == "datum"
        assert analysis.k_reference == pytest.approx(
            standpipe * length / (area * tau), rel=k_tolerance
        )
        assert analysis.asymptote == pytest.approx(0.05, abs=datum_tolerance)
        covered += analysis.asymptote_low <= 0.05 <= analysis.asymptote_high
    if noise:
        assert covered >= 15  # a 95 % interval: expect about 19 of 20


# --------------------------------------------------------------------------- sample series
@pytest.fixture(scope="module")
def clay_records():
    from kitchen.io import load_series
    from kitchen.specimen import specimen_state

    series = load_series(SAMPLES / "clay_liner")
    state = specimen_state(series.specimens).set_index("specimen", drop=False)
    truth = json.loads((SAMPLES / "clay_liner" / "truth.json").read_text())["specimens"]
    records = {
        specimen: FallingHeadRecord(readings, state.loc[specimen])
        for specimen, readings in series.falling_head.groupby("specimen")
    }
    return records, truth


@pytest.mark.parametrize("specimen", ["QF-02", "QF-07"])
def test_proposal_leaves_out_the_early_transient(clay_records, specimen):
    # sample_data/README.md: k is 1 + 1.5 exp(-t/20 min) times the steady value, below 1 %
    # excess after 100 min; a fit over the second half recovers k20 within 0.25 %.
    records, truth = clay_records
    record = records[specimen]
    whole = record.analyse((0, record.n))
    proposed = record.analyse()
    k20 = truth[specimen]["k20_m_per_s"]
    assert not whole.valid and whole.k_reference > 1.015 * k20
    assert proposed.window_proposed and proposed.valid
    assert 40 * 60 <= record.time[proposed.start] <= 120 * 60
    assert proposed.k_reference == pytest.approx(k20, rel=0.0025)
    assert proposed.k_reference_low < k20 < proposed.k_reference_high


def test_drifting_specimen_fails_the_trend(clay_records):
    # sample_data/README.md: QF-04's k falls by a factor 0.55 over the record.
    records, _ = clay_records
    analysis = records["QF-04"].analyse()
    trend = next(v for v in analysis.verdicts if v.criterion == "trend")
    assert trend.passed is False and "k falls" in trend.sentence
    assert not analysis.valid and (analysis.start, analysis.stop) == (0, records["QF-04"].n)
    assert "meets every criterion" in analysis.method_notes[-1]


def test_steady_specimens_keep_every_reading(clay_records):
    records, truth = clay_records
    for specimen, facts in truth.items():
        if facts["behaviour"] in ("steady", "rising_tailwater", "missing_temperature"):
            analysis = records[specimen].analyse()
            assert analysis.valid, (specimen, analysis.checks)
            assert analysis.start == 0, specimen
