"""The benchmark's cases at a small size: ours and the peers compute the same numbers.

``tests/benchmarks/run.py`` (``make bench``) times these cases at 10⁶ readings; here they run
at 10⁴ and only their results are compared — with scipy.stats.linregress, with
scipy.optimize.curve_fit, with pandas.read_csv, and with a full reduction from the files.
No time is asserted: speed is the benchmark's business, not the test suite's.
"""

import importlib.util
import sys
from pathlib import Path

import numpy as np
import pytest

from kitchen.charts import PLOT_WIDTH

BENCHMARKS = Path(__file__).resolve().parent / "benchmarks"


def _load_benchmark():
    """The benchmark script as a module (it imports logger_records from beside itself)."""
    spec = importlib.util.spec_from_file_location("kitchen_benchmark", BENCHMARKS / "run.py")
    module = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = module
    spec.loader.exec_module(module)
    return module


bench = _load_benchmark()
records = bench.logger_records
N = 10_000


@pytest.fixture(scope="module")
def record():
    return records.logger_record(N, interval=60.0)


@pytest.fixture(scope="module")
def record_folder(record, tmp_path_factory):
    return records.write_record_series(tmp_path_factory.mktemp("record"), record)


def test_log_linear_fit_matches_linregress(record):
    ours, peer = bench.log_linear_case(record)
    fit, reference = ours(), peer()
    assert fit.slope == pytest.approx(reference.slope, rel=1e-9)
    assert fit.intercept == pytest.approx(reference.intercept, rel=1e-9)
    assert fit.slope_standard_error == pytest.approx(reference.stderr, rel=1e-9)
    assert fit.r_squared == pytest.approx(reference.rvalue**2, rel=1e-9)


def test_log_linear_fit_matches_the_numpy_closed_form(record):
    ours, peer = bench.closed_form_case(record)
    fit, (slope, standard_error) = ours(), peer()
    assert fit.slope == pytest.approx(slope, rel=1e-9)
    assert fit.slope_standard_error == pytest.approx(standard_error, rel=1e-9)
    # the peer itself, against scipy.stats.linregress on the same arrays
    reference = bench.stats.linregress(record.time, np.log(record.head))
    assert slope == pytest.approx(reference.slope, rel=1e-12)
    assert standard_error == pytest.approx(reference.stderr, rel=1e-9)


def test_decay_fit_matches_curve_fit_and_recovers_k(record):
    ours, peer = bench.decay_case(record)
    fit, reference = ours(), peer()
    assert fit.converged, fit.message
    assert bench.relative(bench.decay_parameters(fit), reference) <= 1e-6
    # the generator's own k, through tau = a L / (A k); noise of 0.2 mm on a 1.2 m head
    assert 1.0 / fit.time_constant == pytest.approx(record.decay_rate, rel=2e-3)
    assert fit.asymptote == pytest.approx(record.datum, abs=2e-3)


def test_windowed_fit_matches_a_refit(record):
    x, y = record.time, np.log(record.head - record.datum)
    windows = bench.window_bounds(N, 5)
    assert len(set(windows)) == 5 and all(0 <= a < b <= N for a, b in windows)
    windowed = bench.WindowedLineFit(x, y)
    _, _, fit, refit = bench.window_case(windowed, x, y, windows)
    assert fit.n == refit.n == windows[-1][1] - windows[-1][0]
    assert fit.slope == pytest.approx(refit.slope, rel=1e-9)
    assert fit.slope_high == pytest.approx(refit.slope_high, rel=1e-9)
    assert -fit.slope == pytest.approx(record.decay_rate, rel=1e-2)


def test_loader_reads_what_pandas_reads(record_folder, record):
    ours, peer = bench.loading_case(record_folder)
    series, frame = ours(), peer()
    assert len(series.falling_head) == len(frame) == N
    np.testing.assert_array_equal(series.falling_head["time"], frame["time [s]"])
    np.testing.assert_allclose(series.falling_head["head"], frame["head [mm]"] * 1e-3, rtol=1e-15)
    np.testing.assert_allclose(series.falling_head["head"], record.head, rtol=1e-12)


def test_logger_file_reads_back_the_record(record, tmp_path):
    folder = bench.logger_records.write_transducer_series(tmp_path / "logger", record)
    ours, peer = bench.logger_loading_case(folder)
    series, frame = ours(), peer()
    assert len(series.falling_head) == len(frame) == N
    np.testing.assert_allclose(series.falling_head["time"], record.time - record.time[0])
    # pressures kept to 0.0001 kPa, about 0.01 mm of head (ρw from Tanaka et al. 2001)
    np.testing.assert_allclose(series.falling_head["head"], record.head, atol=2e-5)


def test_loader_reads_the_ids_pandas_reads_as_a_category(record_folder):
    ours, peer = bench.loading_case(record_folder, category=True)
    series, frame = ours(), peer()
    assert frame["specimen"].dtype == "category"
    assert list(series.falling_head["specimen"].astype(str)) == list(frame["specimen"].astype(str))


def test_figure_keeps_traces_short(record_folder):
    series, prepared = bench.prepared_record(record_folder)
    figure = bench.figure_case(prepared, (100, N), max_points=1000)()
    assert 500 < bench.trace_points(figure) <= 1000
    assert series.falling_head["time"].iloc[-1] == pytest.approx(figure.data[1].x[-1] * 3600)


def test_slider_steps_move_the_window_and_count_what_is_sent(record_folder):
    # N readings and five steps of one reading: each step refits and sends its changes
    steps = bench.slider_steps(record_folder, 5)
    assert not steps["error"] and len(steps["times"]) == len(steps["analysis"]) == 5
    assert all(size > 1_000 for size in steps["bytes"])  # the head chart's new traces
    assert max(steps["points"][0]) <= 2 * PLOT_WIDTH  # two points a pixel column, at most


def test_window_analysis_runs_on_each_window(record_folder):
    _, prepared = bench.prepared_record(record_folder)
    windows = bench.window_bounds(N, 3)
    _, analysis = bench.analysis_case(prepared, windows)
    assert (analysis.start, analysis.stop) == windows[-1]
    assert analysis.k_reference > 0


def test_refresh_after_a_height_revision_equals_a_full_recompute(tmp_path):
    folder = records.write_series(tmp_path / "series", readings=2_000, specimens=4)
    panel = bench.open_panel(folder)
    specimen = panel.workspace.specimen_ids()[1]
    height = panel.workspace.series.specimens["height"].iloc[1] * 1e3
    moved, results, figures, stages = bench.refresh(panel, specimen, height + 0.3)
    full, full_figures = bench.full_recompute(folder, specimen)
    assert moved == (specimen,)
    assert len(figures) == 2  # the series chart and the revised specimen's chart
    assert set(stages) >= {"recording the revision", "effective data", "charts"}
    assert all(seconds >= 0 for seconds in stages.values())
    assert results.drop(columns=["verdicts"]).equals(full.drop(columns=["verdicts"]))
    assert results.loc[1, "height"] == pytest.approx((height + 0.3) * 1e-3, rel=1e-12)
    # the panel's live chart, refreshed in place, is the series chart built from the files
    shown = [(list(t.x), list(t.y)) for t in figures[0].data]
    assert shown == [(list(t.x), list(t.y)) for t in full_figures[0].data]


def test_memory_measure_sees_the_arrays(record_folder):
    memory = bench.memory_case(record_folder)
    assert memory["raw"] == 3 * 8 * N
    assert memory["table"] >= memory["raw"]  # the table holds time, head and temperature at least
    assert memory["record"] > 0 and memory["held"] == memory["table"] + memory["record"]


def test_machine_names_cpu_and_libraries():
    lines = bench.machine()
    assert any("numpy" in line and "pandas" in line and "scipy" in line for line in lines)
    assert any(line.startswith("cpu") for line in lines)
