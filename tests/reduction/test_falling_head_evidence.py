"""The evidence of a falling-head window: its interval by hand and by Monte Carlo, outflow/inflow."""

import numpy as np
import pytest
from synthetic_records import known_k_record

from kitchen.reduction import falling_head_analysis
from kitchen.settings import Settings
from kitchen.uncertainty import Resolutions


def test_two_readings_interval_from_resolutions_by_hand():
    readings, specimen = known_k_record()
    resolutions = Resolutions(caliper=0.0, thermometer=0.0, head_scale=1e-3, timer=1.0)
    analysis = falling_head_analysis(readings, specimen, Settings(resolutions=resolutions), (0, 2))
    h1, h2 = readings["head"].iloc[:2]
    elapsed = readings["time"].iloc[1] - readings["time"].iloc[0]
    u_h, u_t = 1e-3 / np.sqrt(12), 1.0 / np.sqrt(12)
    fall = np.log(h1 / h2)
    expected = np.sqrt((u_h / h1 / fall) ** 2 + (u_h / h2 / fall) ** 2 + 2 * (u_t / elapsed) ** 2)
    assert analysis.interval.relative_standard_uncertainty == pytest.approx(expected, rel=1e-4)
    assert analysis.line is None and not analysis.valid  # four k values are needed


def test_monte_carlo_setting_reaches_the_interval():
    readings, specimen = known_k_record(noise=0.3e-3)
    first = falling_head_analysis(readings, specimen, window=(0, 40))
    carlo = falling_head_analysis(
        readings, specimen, Settings(uncertainty_method="monte_carlo"), (0, 40)
    )
    assert carlo.interval.trials == 200_000
    assert carlo.k_reference_low == pytest.approx(first.k_reference_low, rel=2e-3)
    assert carlo.k_reference_high == pytest.approx(first.k_reference_high, rel=2e-3)


def test_outflow_over_inflow_from_the_readings():
    readings, specimen = known_k_record()
    readings["inflow_volume"] = np.arange(40) * 1e-6
    readings["outflow_volume"] = np.arange(40) * 0.95e-6
    verdict = next(
        v for v in falling_head_analysis(readings, specimen).verdicts if v.criterion == "flow_ratio"
    )
    assert verdict.passed and "0.95 over the readings used" in verdict.sentence
    readings["outflow_volume"] = np.arange(40) * 0.5e-6
    analysis = falling_head_analysis(readings, specimen, window=(0, 40))
    assert not analysis.valid and any("outflow/inflow" in c for c in analysis.checks)
    readings["outflow_volume"] = np.r_[np.arange(20), np.arange(20)] * 1e-6
    analysis = falling_head_analysis(readings, specimen, window=(0, 40))
    assert any("outflow_volume decreases at reading 21" in c for c in analysis.checks)
