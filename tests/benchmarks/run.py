"""Speed and memory at logger scale, measured against numpy, scipy and pandas: ``make bench``.

The targets, on synthetic records made by ``logger_records.py`` beside this file (known k,
seeded noise), in one process:

- the log-linear fit with its interval, at most the time of ``scipy.stats.linregress`` on
  the same arrays, and at most that of the plain numpy closed form (slope to 1e-9
  relative);
- the datum-fitted decay, at most 0.25 times ``scipy.optimize.curve_fit`` from a
  reasonable start (parameters to 1e-6 relative);
- a new fit when the reading window moves, under 20 ms at 10^6 readings, both the
  prefix-sum fit and the workbook's whole window analysis;
- loading a 10^6-row readings CSV, at most 1.5 times ``pandas.read_csv`` on the file, and
  at most 1.5 times it reading ``specimen`` as a category, like for like;
- loading the same record as a logger writes it (ISO 8601 date-times, the head as a
  pressure in kPa turned into head with the water density), at most 3 times
  ``pandas.read_csv`` on that file;
- the figure of a 10^6-reading record, at most 10^4 points a trace, under 100 ms;
- revising one specimen's height in a series of 12 x 10^5 readings, as the revise panel
  does it — the revision recorded in the log, the results, the before/after table and the
  charts refreshed — in under 100 ms (peer: the results and charts from the files);
- memory: the loaded table and the prepared record of 10^6 readings, at most three times
  the raw float arrays (time, head, temperature).

Each time is the least of several repeats (the machine's other work only ever adds time);
ours and the peer's are measured in turns. The script prints the machine, then one line per
target with our time, the peer's time and their ratio, and exits with status 1 when a
target is missed.

    .venv/bin/python tests/benchmarks/run.py            # the targets, at 10^6 readings
    .venv/bin/python tests/benchmarks/run.py --quick    # a smaller run, to try it out

The functions named ``*_case`` set up one target and return what each side runs, so that
``tests/test_benchmark_smoke.py`` can check at a small size that both sides agree.
"""

from __future__ import annotations

import argparse
import gc
import math
import os
import platform
import statistics
import sys
import tempfile
import time
import tracemalloc
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pandas as pd
import scipy
from scipy import optimize, stats

sys.path.insert(0, str(Path(__file__).resolve().parent))
import logger_records  # noqa: E402  (beside this file)

from kitchen.analysis import analyse_series
from kitchen.charts import MAX_TRACE_POINTS, compaction_conductivity_figure, falling_head_figure
from kitchen.fits import WindowedLineFit, fit_exponential_decay, fit_line
from kitchen.io import load_series
from kitchen.panels import falling_head_panel, revise_panel
from kitchen.reduction import FallingHeadRecord, series_results
from kitchen.revisions import load_effective_series
from kitchen.settings import Settings
from kitchen.specimen import specimen_state

CRITERION = 1e-9
"""Largest conductivity allowed in the series scenario (a liner's criterion). [m/s]"""


# --- measuring ---------------------------------------------------------------------------------
def least_time(function, repeats: int):
    """(least wall time over `repeats` calls [s], the last call's result)."""
    best, result = math.inf, None
    for _ in range(repeats):
        start = time.perf_counter()
        result = function()
        best = min(best, time.perf_counter() - start)
    return best, result


def in_turns(ours, peer, repeats: int):
    """Least times of two functions measured in alternation: (ours, peer, our result, theirs)."""
    best_ours = best_peer = math.inf
    for _ in range(repeats):
        start = time.perf_counter()
        mine = ours()
        best_ours = min(best_ours, time.perf_counter() - start)
        start = time.perf_counter()
        theirs = peer()
        best_peer = min(best_peer, time.perf_counter() - start)
    return best_ours, best_peer, mine, theirs


def least_times(functions, repeats: int):
    """Least times of several functions measured in turn: (times, last results)."""
    best = [math.inf] * len(functions)
    results = [None] * len(functions)
    for _ in range(repeats):
        for index, function in enumerate(functions):
            start = time.perf_counter()
            results[index] = function()
            best[index] = min(best[index], time.perf_counter() - start)
    return best, results


def relative(a, b) -> float:
    """Largest relative difference between two sequences of numbers."""
    a, b = np.atleast_1d(np.asarray(a, dtype=float)), np.atleast_1d(np.asarray(b, dtype=float))
    return float(np.max(np.abs(a - b) / np.maximum(np.abs(b), np.finfo(float).tiny)))


@dataclass
class Outcome:
    """One target: what was measured and whether it is met."""

    name: str
    ours: float  # [s], or a ratio of bytes for memory
    peer: float | None  # [s]; None for an absolute target
    limit: float  # largest ratio, time [s] or memory ratio allowed
    kind: str  # "ratio", "seconds" or "memory"
    agreement: str = ""
    agrees: bool = True

    @property
    def value(self) -> float:
        return self.ours / self.peer if self.kind == "ratio" else self.ours

    @property
    def met(self) -> bool:
        return self.value <= self.limit and self.agrees

    def line(self) -> str:
        if self.kind == "memory":
            ours, limit = f"{self.ours:.2f}x raw", f"<= {self.limit:g}x raw"
        else:
            ours = _ms(self.ours)
            limit = f"<= {self.limit:g}x" if self.kind == "ratio" else f"< {_ms(self.limit)}"
        peer = _ms(self.peer) if self.peer is not None else ""
        ratio = f"{self.ours / self.peer:.2f}x" if self.peer is not None else ""
        verdict = "met" if self.met else "MISSED"
        text = f"  {self.name:<44} {ours:>11} {peer:>10} {ratio:>7} {limit:>12}  {verdict}"
        return text + (f"\n  {'':<4}{self.agreement}" if self.agreement else "")


HEADER = f"  {'target':<44} {'ours':>11} {'peer':>10} {'ratio':>7} {'limit':>12}"


def _ms(seconds: float) -> str:
    return f"{seconds * 1e3:.1f} ms" if seconds < 10 else f"{seconds:.1f} s"


def machine() -> list[str]:
    """The machine and the libraries the numbers were measured with."""
    cpu = "unknown"
    try:
        for line in Path("/proc/cpuinfo").read_text().splitlines():
            if line.startswith("model name"):
                cpu = line.split(":", 1)[1].strip()
                break
    except OSError:
        pass
    blas = np.show_config(mode="dicts").get("Build Dependencies", {}).get("blas", {})
    variables = {v: os.environ.get(v) for v in ("OPENBLAS_CORETYPE", "OPENBLAS_L2_SIZE")}
    load = os.getloadavg() if hasattr(os, "getloadavg") else ("?",) * 3
    import plotly

    return [
        f"platform  {platform.platform()}; Python {platform.python_version()}",
        f"cpu       {cpu}; {os.cpu_count()} logical cores; load average "
        + ", ".join(f"{v:.2f}" for v in load),
        f"libraries numpy {np.__version__} (BLAS {blas.get('name', '?')} "
        f"{blas.get('version', '')}), scipy {scipy.__version__}, pandas {pd.__version__}, "
        f"plotly {plotly.__version__}",
        "env       "
        + ", ".join(f"{k}={v if v is not None else '(unset)'}" for k, v in variables.items()),
    ]


# --- the cases ---------------------------------------------------------------------------------
def log_linear_case(record):
    """Our log-linear fit with its interval, and scipy.stats.linregress, on (t, ln h)."""
    t, y = record.time, np.log(record.head)
    return (lambda: fit_line(t, y)), (lambda: stats.linregress(t, y))


def closed_form_line(x, y):
    """The least-squares line in closed form with plain numpy: (slope, its standard error).

    slope = Sxy/Sxx, s² = (Syy − slope·Sxy)/(n − 2), SE = s/√Sxx (Draper & Smith, *Applied
    Regression Analysis*, ch. 1; from memory).
    """
    n = x.size
    xc, yc = x - x.mean(), y - y.mean()
    sxx, sxy, syy = xc @ xc, xc @ yc, yc @ yc
    slope = sxy / sxx
    return slope, math.sqrt((syy - slope * sxy) / (n - 2) / sxx)


def closed_form_case(record):
    """Our log-linear fit with its interval, and the numpy closed form, on (t, ln h)."""
    t, y = record.time, np.log(record.head)
    return (lambda: fit_line(t, y)), (lambda: closed_form_line(t, y))


def decay_start(t, h):
    """A reasonable start for curve_fit: datum at zero, h0 the first reading, tau from the
    first and last readings as if the datum were zero."""
    return 0.0, float(h[0]), float((t[-1] - t[0]) / math.log(h[0] / h[-1]))


def decay_model(t, asymptote, initial, time_constant):
    return asymptote + (initial - asymptote) * np.exp(-(t - t[0]) / time_constant)


def decay_case(record):
    """Our datum-fitted decay, and scipy.optimize.curve_fit of the same model."""
    t, h = record.time, record.head
    start = decay_start(t, h)

    def peer():
        return optimize.curve_fit(decay_model, t, h, p0=start)[0]

    return (lambda: fit_exponential_decay(t, h)), peer


def decay_parameters(fit) -> tuple[float, float, float]:
    return fit.asymptote, fit.initial, fit.time_constant


def window_bounds(n: int, repeats: int, seed: int = 7) -> list[tuple[int, int]]:
    """Distinct reading windows, each keeping most of a record (as a person slides them)."""
    rng = np.random.default_rng(seed)
    starts = rng.integers(0, n // 5, repeats)
    stops = n - rng.integers(0, n // 10, repeats)
    return [(int(a), int(b)) for a, b in zip(starts, stops, strict=True)]


def window_case(windowed: WindowedLineFit, x, y, windows):
    """A new fit per window from the prefix sums, and a refit of each window from scratch.

    Returns (least time ours, least time refit, our fit and the refit of the last window).
    """
    ours, theirs = iter(windows), iter(windows)

    def refit():
        start, stop = next(theirs)
        return fit_line(x[start:stop], y[start:stop])

    return in_turns(lambda: windowed.fit(*next(ours)), refit, len(windows))


def analysis_case(record: FallingHeadRecord, windows):
    """The workbook's window move: FallingHeadRecord.analyse on each window in turn."""
    turns = iter(windows)
    return least_time(lambda: record.analyse(next(turns), "log_linear"), len(windows))


def prepared_record(folder: Path):
    """The series loaded from `folder`, its first specimen's record, and that specimen's state."""
    series = load_series(folder)
    state = specimen_state(series.specimens).iloc[0]
    return series, FallingHeadRecord(series.falling_head, state, Settings())


def loading_case(folder: Path, category: bool = False):
    """Our loader on a series folder, and pandas.read_csv on its readings file (with
    `category`, reading ``specimen`` as a category, as the loader holds it)."""
    readings = folder / "falling_head.csv"
    options = {"dtype": {"specimen": "category"}} if category else {}
    return (lambda: load_series(folder)), (lambda: pd.read_csv(readings, **options))


def logger_loading_case(folder: Path):
    """Our loader on a logger's file (date-times, pressures), and pandas.read_csv on it."""
    readings = folder / "falling_head.csv"
    return (lambda: load_series(folder)), (lambda: pd.read_csv(readings))


def figure_case(record: FallingHeadRecord, window, max_points: int = MAX_TRACE_POINTS):
    """Build the falling-head figure of one analysed window; returns the figure builder."""
    analysis = record.analyse(window, "log_linear")
    return lambda: falling_head_figure(None, analysis, max_points=max_points)


def trace_points(figure) -> int:
    return max(len(trace.x) for trace in figure.data if trace.x is not None)


def slider_steps(folder: Path, steps: int) -> dict:
    """Step the falling-head panel's reading window one reading at a time, as the slider
    does on release, and measure the Python side of each step: its time, the analysis's
    share of it, the bytes sent to the browser (widget messages with their binary buffers)
    and the points of each trace drawn. The browser's part is timed by the real-browser
    test (``tests/test_browser.py::test_slider_on_a_record_of_a_million_readings``)."""
    import json

    import ipywidgets

    panel = falling_head_panel(folder)
    record = panel.record()
    sent: list[int] = []
    plain_send, plain_analyse = ipywidgets.Widget._send, type(record).analyse
    analysing: list[float] = []

    def counted(widget, message, buffers=None):
        size = len(json.dumps(message, default=str))
        sent.append(size + sum(memoryview(b).nbytes for b in buffers or ()))
        return plain_send(widget, message, buffers)

    def timed(self, *args, **kwargs):
        start = time.perf_counter()
        try:
            return plain_analyse(self, *args, **kwargs)
        finally:
            analysing.append(time.perf_counter() - start)

    times, sizes = [], []
    ipywidgets.Widget._send = counted
    type(record).analyse = timed
    try:
        for _ in range(steps):
            first, last = panel.window.value
            sent.clear()
            start = time.perf_counter()
            panel.window.value = (first + 1, last)
            times.append(time.perf_counter() - start)
            sizes.append(sum(sent))
    finally:
        ipywidgets.Widget._send = plain_send
        type(record).analyse = plain_analyse
    return dict(
        times=times,
        analysis=analysing,
        bytes=sizes,
        points=[[len(t.x) for t in figure.data] for figure in (panel.figure, panel.increments)],
        error=panel.error.widget.value,
    )


def open_panel(folder: Path):
    """The workbook's revise panel on the series, with its charts drawn once."""
    return revise_panel(folder, criterion=f"{CRITERION:g} m/s")


def refresh(panel, specimen: str, height_mm: float):
    """What the workbook does when a revised height is recorded: the button of the revise
    panel, pressed. The row is appended to the log, the effective data and the moved
    specimen's reduction are brought up to date, the results, the before/after table and
    the log are shown again, and the series chart and the specimen's chart are redrawn.

    Returns (moved specimens, results, figures, seconds spent in each stage).
    """
    panel.table_choice.value = "specimens"
    panel.specimen.value = specimen
    panel.field.value = "height"
    panel.value.value = f"{height_mm:.2f} mm"
    panel.reason.value = "re-measured after the test"
    panel.who.value = "benchmark"
    panel.record.click()
    if panel.error.message:
        raise RuntimeError(f"the revise panel refused the revision: {panel.error.message}")
    figures = (panel.series_chart, panel.specimen_chart)
    return panel.workspace.last_moved, panel.results, figures, dict(panel.timings)


def full_recompute(folder: Path, revised: str):
    """The same refresh done from the files, every specimen reduced again."""
    series = load_effective_series(folder).series
    results = series_results(series, Settings())
    analysis = analyse_series(results, CRITERION)
    readings = series.falling_head[series.falling_head["specimen"] == revised]
    state = specimen_state(series.specimens).set_index("specimen", drop=False).loc[revised]
    record = FallingHeadRecord(readings, state, Settings())
    figures = [compaction_conductivity_figure(analysis)]
    figures.append(falling_head_figure(None, record.analyse(None)))
    return results, figures


def memory_case(folder: Path) -> dict[str, float]:
    """Bytes held for one record: the loaded readings table and the prepared record.

    Measured with tracemalloc (numpy reports its buffers to it); the raw float arrays are
    the record's time, head and temperature as float64.
    """
    gc.collect()
    tracemalloc.start()
    try:
        series = load_series(folder)
        gc.collect()
        table, load_peak = tracemalloc.get_traced_memory()
        tracemalloc.reset_peak()
        state = specimen_state(series.specimens).iloc[0]
        record = FallingHeadRecord(series.falling_head, state, Settings())
        gc.collect()
        held, record_peak = tracemalloc.get_traced_memory()
    finally:
        tracemalloc.stop()
    raw = 3 * 8 * len(series.falling_head)
    del record
    return {
        "raw": raw,
        "table": table,
        "record": held - table,
        "held": held,
        "load_peak": load_peak,
        "record_peak": record_peak,
    }


# --- the run -----------------------------------------------------------------------------------
def run(readings: int, series_readings: int, specimens: int, repeats: int, work: Path):
    outcomes: list[Outcome] = []
    notes: list[str] = []
    say = print
    say(f"record: {readings:,} readings; series: {specimens} specimens x {series_readings:,}")

    record = logger_records.logger_record(readings)
    ours, peer = log_linear_case(record)
    t_ours, t_peer, mine, theirs = in_turns(ours, peer, repeats)
    difference = relative(mine.slope, theirs.slope)
    outcomes.append(
        Outcome(
            "log-linear fit with its interval / linregress",
            t_ours,
            t_peer,
            1.0,
            "ratio",
            f"slope agrees to {difference:.1e} relative (target 1e-9)",
            difference <= 1e-9,
        )
    )

    ours, peer = closed_form_case(record)
    t_ours, t_peer, mine, theirs = in_turns(ours, peer, repeats)
    difference = relative((mine.slope, mine.slope_standard_error), theirs)
    outcomes.append(
        Outcome(
            "log-linear fit with its interval / numpy closed form",
            t_ours,
            t_peer,
            1.0,
            "ratio",
            f"slope and its standard error agree to {difference:.1e} relative (target 1e-9)",
            difference <= 1e-9,
        )
    )

    ours, peer = decay_case(record)
    t_ours, t_peer, mine, theirs = in_turns(ours, peer, max(2, repeats // 2))
    difference = relative(decay_parameters(mine), theirs)
    k_error = relative(1.0 / mine.time_constant, record.decay_rate)
    outcomes.append(
        Outcome(
            "datum-fitted decay / curve_fit",
            t_ours,
            t_peer,
            0.25,
            "ratio",
            f"h_inf, h0, tau agree to {difference:.1e} relative (target 1e-6); "
            f"k recovered within {k_error:.1e}",
            difference <= 1e-6,
        )
    )

    folder = logger_records.write_record_series(work / "record", record)
    ours, peer = loading_case(folder)
    _, as_category = loading_case(folder, category=True)
    # the three in turn, so that ours is compared with both peers at the same moments
    (t_ours, t_peer, t_category), (series, frame, categorised) = least_times(
        (ours, peer, as_category), 2 * repeats
    )
    loaded = series.falling_head["head"].to_numpy()
    difference = relative(loaded, frame["head [mm]"].to_numpy() * 1e-3)
    outcomes.append(
        Outcome(
            "loading the readings CSV / pandas.read_csv",
            t_ours,
            t_peer,
            1.5,
            "ratio",
            f"heads agree to {difference:.1e} relative",
            difference <= 1e-12,
        )
    )

    same_ids = bool(
        (series.falling_head["specimen"].astype(str) == categorised["specimen"].astype(str)).all()
    )
    outcomes.append(
        Outcome(
            "loading the readings CSV / read_csv, specimen as category",
            t_ours,
            t_category,
            1.5,
            "ratio",
            f"specimen ids agree: {same_ids}",
            same_ids,
        )
    )

    logger = logger_records.write_transducer_series(work / "transducer", record)
    ours, peer = logger_loading_case(logger)
    t_ours, t_peer, logged, _ = in_turns(ours, peer, repeats)
    difference = float(np.max(np.abs(logged.falling_head["head"].to_numpy() - record.head)))
    outcomes.append(
        Outcome(
            "loading a logger's CSV (date-times, kPa) / pandas.read_csv",
            t_ours,
            t_peer,
            3.0,
            "ratio",
            f"heads within {difference * 1e3:.3f} mm of the record's (the file keeps 0.0001 kPa)",
            difference <= 2e-5,
        )
    )

    state = specimen_state(series.specimens).iloc[0]
    prepared = FallingHeadRecord(series.falling_head, state, Settings())
    x, y = prepared.reference_time, prepared.log_head
    windows = window_bounds(readings, 3 * repeats)  # short cases: more tries at a quiet moment
    build, windowed = least_time(lambda: WindowedLineFit(x, y), 1)
    t_ours, t_peer, fit, refit = window_case(windowed, x, y, windows)
    difference = relative(fit.slope, refit.slope)
    outcomes.append(
        Outcome(
            "moving the window: prefix-sum fit",
            t_ours,
            None,
            0.020,
            "seconds",
            f"slope agrees with a refit of the window to {difference:.1e}; a refit takes "
            f"{_ms(t_peer)}; prefix sums built once in {_ms(build)}",
            difference <= 1e-9,
        )
    )
    t_analysis, _ = analysis_case(prepared, windows)
    outcomes.append(
        Outcome("moving the window: the workbook's analysis", t_analysis, None, 0.020, "seconds")
    )
    notes.append(
        "the workbook's analysis is FallingHeadRecord.analyse(window, 'log_linear'): fit, "
        "curvature and runs tests, k values, interval"
    )

    build_figure = figure_case(prepared, windows[0])
    t_figure, figure = least_time(build_figure, 3 * repeats)
    points = trace_points(figure)
    t_json, _ = least_time(figure.to_json, 1)
    outcomes.append(
        Outcome(
            "figure of the record (falling_head_figure)",
            t_figure,
            None,
            0.100,
            "seconds",
            f"{points:,} points in the longest trace (limit {MAX_TRACE_POINTS:,}); "
            f"to_json {_ms(t_json)}",
            points <= MAX_TRACE_POINTS,
        )
    )
    del prepared, windowed, series, frame, build_figure, figure
    gc.collect()  # the memory measured next is of a record alone

    slider = slider_steps(folder, max(5, repeats))
    notes.append(
        f"a slider step of the falling-head panel ({readings:,} readings), Python side: "
        f"median {_ms(statistics.median(slider['times']))} over {len(slider['times'])} steps "
        f"(least {_ms(min(slider['times']))}; the analysis "
        f"{_ms(statistics.median(slider['analysis']))} of it); sent to the browser "
        f"{statistics.median(slider['bytes']) / 1e3:.0f} kB a step; points a trace "
        f"{slider['points'][0]} (head), {slider['points'][1]} (incremental k). The browser's "
        "part: pytest tests/test_browser.py -k million -s"
    )
    gc.collect()

    memory = memory_case(folder)
    outcomes.append(
        Outcome(
            "memory: readings table + prepared record",
            memory["held"] / memory["raw"],
            None,
            3.0,
            "memory",
            f"raw float arrays {memory['raw'] / 1e6:.0f} MB; table "
            f"{memory['table'] / memory['raw']:.2f}x, record {memory['record'] / memory['raw']:.2f}x"
            f"; peaks: loading {memory['load_peak'] / memory['raw']:.2f}x, preparing "
            f"{memory['record_peak'] / memory['raw']:.2f}x",
        )
    )

    series_folder = logger_records.write_series(work / "series", series_readings, specimens)
    t_open, panel = least_time(lambda: open_panel(series_folder), 1)
    names = panel.workspace.specimen_ids()
    revised = names[len(names) // 2]
    height = panel.workspace.series.specimens.set_index("specimen").loc[revised, "height"] * 1e3
    t_refresh = math.inf
    for step in range(max(3, repeats)):
        start = time.perf_counter()
        moved, results, _, stages = refresh(panel, revised, height + 0.1 * (step + 1))
        elapsed = time.perf_counter() - start
        if elapsed < t_refresh:
            t_refresh, best_stages = elapsed, stages
    t_full, (full, _) = least_time(lambda: full_recompute(series_folder, revised), 2)
    same = results.drop(columns=["verdicts"]).equals(full.drop(columns=["verdicts"]))
    outcomes.append(
        Outcome(
            "revising one height: recorded, results and charts",
            t_refresh,
            t_full,
            0.100,
            "seconds",
            f"moved: {', '.join(moved)}; results equal a full recompute: {same} "
            f"(full recompute {_ms(t_full)}, without recording)",
            same and moved == (revised,),
        )
    )
    notes.append(
        "the revise panel's button, by stage: "
        + "; ".join(f"{stage} {_ms(seconds)}" for stage, seconds in best_stages.items())
    )
    notes.append(f"series opened in the revise panel (charts drawn) in {_ms(t_open)}")
    return outcomes, notes


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--readings", type=int, default=1_000_000, help="readings of the record")
    parser.add_argument("--series-readings", type=int, default=100_000, help="per specimen")
    parser.add_argument("--specimens", type=int, default=12)
    parser.add_argument("--repeats", type=int, default=7)
    parser.add_argument("--quick", action="store_true", help="10^5 readings, 3 repeats")
    arguments = parser.parse_args(argv)
    if arguments.quick:
        arguments.readings, arguments.series_readings, arguments.repeats = 100_000, 10_000, 3
    for line in machine():
        print(line)
    with tempfile.TemporaryDirectory(prefix="kitchen-bench-") as work:
        outcomes, notes = run(
            arguments.readings,
            arguments.series_readings,
            arguments.specimens,
            arguments.repeats,
            Path(work),
        )
    print("\n" + HEADER)
    for outcome in outcomes:
        print(outcome.line())
    for note in notes:
        print(f"  note: {note}")
    missed = [o.name for o in outcomes if not o.met]
    print(f"\n{len(outcomes) - len(missed)} of {len(outcomes)} targets met")
    if missed:
        print("missed: " + "; ".join(missed))
    return 1 if missed else 0


if __name__ == "__main__":
    sys.exit(main())
