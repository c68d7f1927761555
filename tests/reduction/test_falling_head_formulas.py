"""The falling-head equations against a textbook worked example, Jurin's law and round trips."""

import numpy as np
import pytest
from synthetic_records import known_k_record

from kitchen.reduction import (
    effective_standpipe_area,
    falling_head_conductivity,
    incremental_conductivity,
    jurin_capillary_rise,
    reading_window,
    rising_tailwater_conductivity,
)
from kitchen.reduction.falling_head_formulas import span_conductivity


def test_das_falling_head_example():
    # Das, Principles of Geotechnical Engineering, falling-head example (inputs confirmed,
    # answer from memory): L = 200 mm, A = 1000 mm^2, a = 40 mm^2, h 500 -> 300 mm in
    # 180 s -> k = 2.27e-3 cm/s.
    k = falling_head_conductivity(40e-6, 0.200, 1000e-6, 0.500, 0.300, 180.0)
    assert k * 100 == pytest.approx(2.27e-3, abs=0.005e-3)
    # The head at 100 s follows from the same k (computed): 376.5 mm.
    rate = k * 1000e-6 / (40e-6 * 0.200)
    assert 0.500 * np.exp(-rate * 100.0) == pytest.approx(0.3765, abs=5e-5)


def test_rising_tailwater_equal_burettes_halve_the_area():
    # ASTM D5084 Method C (from memory): with a_in = a_out the effective area is a/2.
    assert effective_standpipe_area(40e-6, 40e-6) == pytest.approx(20e-6)
    assert effective_standpipe_area(40e-6) == pytest.approx(40e-6)
    single = falling_head_conductivity(20e-6, 0.2, 1e-3, 0.5, 0.3, 180.0)
    assert rising_tailwater_conductivity(40e-6, 40e-6, 0.2, 1e-3, 0.5, 0.3, 180.0) == (
        pytest.approx(single)
    )


def test_jurin_capillary_rise():
    # Head, Manual of Soil Laboratory Testing, Vol. 2 (from memory):
    # about 3 mm in a 10 mm tube and 15 mm in a 2 mm tube.
    assert jurin_capillary_rise(10e-3) * 1e3 == pytest.approx(3.0, abs=0.1)
    assert jurin_capillary_rise(2e-3) * 1e3 == pytest.approx(15.0, abs=0.3)
    assert jurin_capillary_rise(np.array([2e-3, 4e-3])) == pytest.approx(
        [jurin_capillary_rise(2e-3), jurin_capillary_rise(2e-3) / 2]
    )


# --------------------------------------------------------------------------- incremental k
def test_incremental_k_each_corrected_with_its_own_temperatures():
    temperature = np.linspace(17.0, 24.0, 40)
    readings, specimen = known_k_record(temperature=temperature)
    a, length, area = specimen["standpipe_area"], specimen["height"], specimen["area"]
    time, k = incremental_conductivity(
        readings["time"], readings["head"], a, length, area, temperature
    )
    assert time.size == 39 and k == pytest.approx(np.full(39, 2.0e-9), rel=1e-9)
    _, uncorrected = incremental_conductivity(readings["time"], readings["head"], a, length, area)
    assert uncorrected[0] < 2.0e-9 < uncorrected[-1]  # colder water first, warmer last
    time3, k3 = incremental_conductivity(
        readings["time"], readings["head"], a, length, area, temperature, step=3
    )
    # readings 39, 36, 33 ... counted back from the last: the last value spans 36 to 39
    assert k3.size == 13 and k3 == pytest.approx(np.full(13, 2.0e-9), rel=1e-9)
    assert time3[-1] == pytest.approx(readings["time"].iloc[[36, 39]].mean())
    with pytest.raises(ValueError, match="step must be a whole number from 1 to 39"):
        incremental_conductivity(readings["time"], readings["head"], a, length, area, step=40)


def test_reading_window_by_time():
    readings, _ = known_k_record()
    time = readings["time"].to_numpy()
    assert reading_window(time, 3600.0, 7 * 3600.0) == (5, 35)
    assert reading_window(time) == (0, 40)
    with pytest.raises(ValueError, match="fewer than two readings between"):
        reading_window(time, 100.0, 200.0)


def test_span_k_is_the_least_squares_slope_of_each_span():
    # By hand: ln h = 0, -0.1, -0.2, -0.35, -0.4 at t = 0..4 s, scale 1 m; spans of 2
    # intervals back from the last reading: readings 2-4 and 0-2. Over readings 2-4 the
    # mean of ln h is -0.31667 and the slope (-1·0.11667 + 1·(-0.08333))/2 = -0.1; over
    # readings 0-2 it is -0.1: k = 0.1 m/s for both.
    t = np.arange(5.0)
    y = np.array([0.0, -0.1, -0.2, -0.35, -0.4])
    middle, k = span_conductivity(t, t, y, 1.0, 2, 4)
    np.testing.assert_allclose(k, [0.1, 0.1])
    np.testing.assert_allclose(middle, [1.0, 3.0])
    # one interval per span: the two-reading k of falling_head_conductivity (Das)
    _, k = span_conductivity(t, t, y, 1.0, 1, 4)
    np.testing.assert_allclose(k, [0.1, 0.1, 0.15, 0.05])
    two = falling_head_conductivity(1.0, 1.0, 1.0, np.exp(y[:-1]), np.exp(y[1:]), 1.0)
    np.testing.assert_allclose(k, two)


def test_span_k_of_an_exact_record_is_k():
    readings, specimen = known_k_record(k20=3.0e-9, n=101)
    scale = specimen["standpipe_area"] * specimen["height"] / specimen["area"]
    time = readings["time"].to_numpy()
    _, k = span_conductivity(time, time, np.log(readings["head"].to_numpy()), scale, 7, 4)
    np.testing.assert_allclose(k, 3.0e-9, rtol=1e-9)


def test_a_function_of_repeated_values_is_the_same_evaluated_once_a_value():
    # a logger's temperatures, read to 0.01 degC, repeat: evaluated once per distinct value
    # and taken back to every reading, the viscosity ratio is the same number to the last bit
    from kitchen.reduction.falling_head_formulas import per_distinct_value
    from kitchen.water import viscosity_ratio

    rng = np.random.default_rng(8)
    repeated = np.round(20 + rng.normal(0, 0.3, 50_000), 2)
    distinct = 20 + rng.normal(0, 0.3, 50_000)
    for values in (repeated, distinct):
        calls = []

        def ratio(v, calls=calls):
            calls.append(v.size)
            return np.asarray(viscosity_ratio(v, 20.0, "kestin"))

        np.testing.assert_array_equal(
            per_distinct_value(values, ratio), viscosity_ratio(values, 20.0, "kestin")
        )
        assert calls[0] == (np.unique(values).size if values is repeated else values.size)


@pytest.mark.parametrize("every", [1, 3, 4096, 1 << 16])
def test_trapezoid_area_at_any_reading_is_the_cumulative_integral_to_the_last_bit(every):
    # the reference is scipy's cumulative trapezoid (scipy.integrate, a general-purpose
    # library), to rounding, and the whole-array form the record used to keep, to the bit
    from scipy.integrate import cumulative_trapezoid as scipy_cumulative

    from kitchen.reduction.falling_head_formulas import TrapezoidArea, cumulative_trapezoid

    rng = np.random.default_rng(every)
    n = 150_001
    time = np.cumsum(rng.uniform(0.5, 1.5, n)) * 60.0
    temperature = (20.0 + rng.normal(0.0, 0.4, n)).round(2)  # a logger's 0.01 degC steps
    whole = cumulative_trapezoid(np.diff(time), temperature)
    area = TrapezoidArea(time, temperature, every)
    picked = np.unique(np.r_[0, 1, n - 1, rng.integers(0, n, 200), every - 1, every, every + 1])
    picked = picked[picked < n]
    got = np.array([area.area(int(i)) for i in picked])
    assert np.array_equal(got, whole[picked])
    assert area.area(-1) == whole[-1]
    reference = np.r_[0.0, scipy_cumulative(temperature, time)]
    np.testing.assert_allclose(got, reference[picked], rtol=1e-12, atol=1e-9)
