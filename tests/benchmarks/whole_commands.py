"""Speed as the engineer feels it: whole commands, each against its floor, in one run.

    .venv/bin/python tests/benchmarks/whole_commands.py             # the targets
    .venv/bin/python tests/benchmarks/whole_commands.py --scaling   # and the README's table
    .venv/bin/python tests/benchmarks/whole_commands.py --quick     # fewer repeats, to try it

Targets (ratios measured in one run, commands in turn, medians of several rounds: the
machine is shared, so no absolute time is judged):

- start-up: ``python -m kitchen --help`` at most 1.5 times ``python -c "import pandas"``;
- ``report`` end to end (results and the memo pack without images): the marginal cost of
  10^6 readings — one specimen of 10^6 readings against one of 10^2 — at most 1.5 times
  that of the plain script (``peer_report.py``: ``pandas.read_csv`` and
  ``scipy.stats.linregress`` of ln h on t, written to a CSV);
- the clay sample's memo pack with images at most 2 times without; the ratio to the image
  floor is printed beside it (the pack without images plus every image the pack writes,
  PNG and SVG of each chart and test page with the pack's caption, drawn in a warm page as
  the export asks for them, measured in this process); the browser keeps its profile in
  the cache folder as an engineer's commands do, and the first run on a machine, with an
  empty cache folder, is printed beside it; so is the work each command gives the machine
  (its busy core-seconds while the command runs, Chromium's processes with the rest:
  :func:`machine_busy`) and the time that work takes at the least on this machine's cores
  were each kept busy throughout, the floor no ordering of the work can go below;
- memory: the peak while a record of 10^6 readings is opened and reduced, stage by stage
  (loading, preparing, the trend of every trial window, the analysis), at most 3 times its
  raw float arrays (time, head, temperature), measured with tracemalloc;
- ``report`` on 10^7 readings under 1 GB of resident memory (``--large``; the record's CSV
  is about 340 MB).

``--scaling`` adds the time and peak resident memory of ``report`` (with and without
images) from 10^4 to 10^7 readings and from 10 to 1000 specimens, with the exponent of a
least-squares line of log time on log size. Prints one line per target and exits with
status 1 when one is missed.
"""

from __future__ import annotations

import argparse
import gc
import math
import os
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
import tracemalloc
from pathlib import Path

import numpy as np

HERE = Path(__file__).resolve().parent
ROOT = HERE.parents[1]
sys.path.insert(0, str(HERE))
import logger_records  # noqa: E402  (beside this file)

PYTHON = sys.executable
CLAY = ROOT / "sample_data" / "clay_liner"


# --- measuring whole commands ------------------------------------------------------------------
GNU_TIME = Path("/usr/bin/time")
"""GNU time, which reports a command's peak resident memory (``-f %M``, in KiB)."""


def run_command(arguments: list[str], env: dict | None = None) -> tuple[float, int]:
    """(wall time [s], peak resident memory [bytes]) of one run of a command to its end.

    The peak comes from GNU time where it is installed: a child forked from this process
    would otherwise report this process's own size at the fork (Linux counts it in the
    child's high-water mark); without it, from the child's resource usage.
    """
    measured = GNU_TIME.exists()
    command = [str(GNU_TIME), "-f", "%M", *arguments] if measured else arguments
    # stderr to a file, not a pipe: a pack of a thousand tests prints thousands of progress
    # lines, and a pipe read only after the command ends would stop it once full (64 KiB)
    with tempfile.TemporaryFile() as said:
        start = time.perf_counter()
        process = subprocess.Popen(
            command, stdout=subprocess.DEVNULL, stderr=said, cwd=ROOT, env=env
        )
        _, status, usage = os.wait4(process.pid, 0)
        elapsed = time.perf_counter() - start
        said.seek(0)
        error = said.read().decode(errors="replace")
    process.returncode = os.waitstatus_to_exitcode(status)
    if process.returncode != 0:
        raise RuntimeError(f"{' '.join(map(str, arguments))} failed:\n{error[-3000:]}")
    if measured:
        return elapsed, int(error.strip().splitlines()[-1]) * 1024
    return elapsed, usage.ru_maxrss * 1024


def machine_busy() -> float | None:
    """Core-seconds the machine has spent busy since it started (``/proc/stat``: user, nice,
    system, irq and softirq time, in USER_HZ ticks, leaving out idle, waiting on I/O and
    the time a virtual machine's host ran something else; Linux's proc(5)), or None
    elsewhere. A command's difference counts every process it starts, Chromium's among
    them, which its own resource usage misses (the browser's helpers are not its
    children to wait for), and whatever else the machine did meanwhile."""
    try:
        with open("/proc/stat") as stat:
            ticks = [int(value) for value in stat.readline().split()[1:]]
    except (OSError, ValueError):
        return None
    user, nice, system, _, _, irq, softirq = ticks[:7]
    return (user + nice + system + irq + softirq) / os.sysconf("SC_CLK_TCK")


def report(series: Path, out: Path, images: bool = False) -> list[str]:
    command = [PYTHON, "-m", "kitchen", "report", str(series), "--out", str(out)]
    return command if images else [*command, "--no-images"]


def peer(series: Path, out: Path) -> list[str]:
    return [PYTHON, str(HERE / "peer_report.py"), str(series), str(out)]


def in_rounds(
    commands: dict[str, list[str]], rounds: int, work: dict[str, list[float]] | None = None
) -> dict[str, list[float]]:
    """Wall times of each command, run in turn round after round (one warm-up first); with
    `work`, each run's busy core-seconds (:func:`machine_busy`) are put there by name, where
    the machine tells them."""
    for command in commands.values():
        run_command(command)
    times: dict[str, list[float]] = {name: [] for name in commands}
    for _ in range(rounds):
        for name, command in commands.items():
            before = machine_busy() if work is not None else None
            times[name].append(run_command(command)[0])
            after = machine_busy() if before is not None else None
            if after is not None:
                work.setdefault(name, []).append(after - before)
    return times


MARGINAL_ROUNDS = 15
"""Fewest rounds of the marginal case: with 7, its median ratio on the same code and the
same quiet machine ranged from 1.27 to 1.86 in four runs; with 15, one run gave 1.55."""


# --- the cases ---------------------------------------------------------------------------------
def record_series(folder: Path, readings: int, specimens: int = 1) -> Path:
    """A series of `specimens` logger records of `readings` readings each, spanning the
    same time whatever their number (so the standpipe and the decay are alike)."""
    if specimens == 1:
        interval = max(1.0, 1e6 / readings)
        record = logger_records.logger_record(readings, interval=interval)
        return logger_records.write_record_series(folder, record)
    return logger_records.write_series(folder, readings, specimens)


def marginal_case(work: Path, rounds: int, readings: int = 1_000_000):
    """Marginal cost of `readings` readings: ours (report, no images) and the peer's."""
    small = record_series(work / "small", 100)
    large = record_series(work / "large", readings)
    commands = {
        "ours small": report(small, work / "out-small"),
        "ours large": report(large, work / "out-large"),
        "peer small": peer(small, work / "peer-small.csv"),
        "peer large": peer(large, work / "peer-large.csv"),
    }
    times = in_rounds(commands, rounds)
    ours = [b - a for a, b in zip(times["ours small"], times["ours large"], strict=True)]
    theirs = [b - a for a, b in zip(times["peer small"], times["peer large"], strict=True)]
    return times, ours, theirs


def pack_images(work: Path) -> tuple[list, list[str]]:
    """Every image the clay sample's memo pack writes, as the export asks for it: the
    figure of each chart (``charts/``) and of each test's record (``specimens/``), whose PNG
    and SVG the pack writes, and the pack's own caption printed under each.

    The figures and the caption are those of an export without images made here; their
    number is checked against the pages it wrote (one PNG and one SVG beside each chart and
    test page), so the floor draws every image the pack draws, no fewer.
    """
    from kitchen import display_units
    from kitchen.memo import export_memo_pack, memo_charts
    from kitchen.memo.pack import _caption, _criterion_text
    from kitchen.memo.specimen_pages import report_pages
    from kitchen.settings import reference_label
    from kitchen.workspace import Workspace

    workspace = Workspace(CLAY)
    pack = export_memo_pack(workspace, work / "clay-floor", images=False)
    ku, label = display_units.k_unit("m/s"), reference_label(workspace.settings)
    caption = _caption(pack.provenance, _criterion_text(pack.analysis, ku, label))
    du = display_units.density_unit("Mg/m3")
    charts, _ = memo_charts(workspace, pack.analysis, ku.unit, du.unit)
    figures = [(f"charts/{name}", figure) for name, _, figure in charts]
    pages = report_pages(workspace, workspace.results(), ku, label)
    figures += [(f"specimens/{page.name}", page.figure) for page in pages]
    drawn = [
        path
        for path in pack.files
        if path.suffix == ".html" and path.parent.name in ("charts", "specimens")
    ]
    if len(figures) != len(drawn):
        raise RuntimeError(
            f"the floor would draw {2 * len(figures)} images; the pack draws {2 * len(drawn)}"
        )
    return figures, caption


def image_floor(work: Path, repeats: int) -> dict[str, float]:
    """Chromium's start and the clay pack's images drawn in a warm page, in this process.

    Returns the seconds to the first image (Chromium's start and one drawing, the PNG and SVG
    of the first chart), the least time over `repeats` to draw every image of the pack
    (:func:`pack_images`, asked for at once as the export asks:
    :func:`kitchen.memo._export.request_images`), and the number of images.
    """
    from kitchen.memo import start_image_export
    from kitchen.memo._export import request_images
    from kitchen.memo.images import image_result

    figures, caption = pack_images(work)
    start = time.perf_counter()
    start_image_export()
    for request in request_images(figures[:1], caption).values():
        image_result(request)
    first = time.perf_counter() - start
    best, count = math.inf, 0
    for _ in range(repeats):
        start = time.perf_counter()
        requests = request_images(figures, caption)
        for request in requests.values():
            image_result(request)
        best, count = min(best, time.perf_counter() - start), len(requests)
    return {"first": first, "images": best, "count": count}


def images_case(work: Path, rounds: int):
    """The clay pack with and without images, in turn (:func:`in_rounds`), and once with
    images on a machine where it never ran (``"first run"``: an empty cache folder).

    Returns the wall times by name, and each round's busy core-seconds by command
    (:func:`in_rounds`; empty where the machine does not tell them).

    The rounds run with the browser profiles kept in the user's cache folder
    (``kitchen.memo._page_host``), as an engineer's commands do: Chromium keeps plotly.js
    compiled there from a profile's second load on, so the command with images runs once
    more before the rounds.
    """
    commands = {
        "with images": report(CLAY, work / "clay-images", images=True),
        "without images": report(CLAY, work / "clay-plain"),
    }
    run_command(commands["with images"])
    spent: dict[str, list[float]] = {}
    times = in_rounds(commands, rounds, spent)
    empty = {**os.environ, "XDG_CACHE_HOME": str(work / "empty-cache")}
    times["first run"] = [run_command(commands["with images"], env=empty)[0]]
    shutil.rmtree(work / "empty-cache", ignore_errors=True)
    return times, spent


def memory_stages(folder: Path) -> dict[str, float]:
    """Peak traced memory at each stage of opening and reducing a record, over its raw
    arrays (time, head, temperature as float64). Imports are warmed first."""
    from kitchen.io import load_series
    from kitchen.reduction import FallingHeadRecord
    from kitchen.settings import Settings
    from kitchen.specimen import specimen_state
    from kitchen.validity import window_trends

    warm = folder.parent / "warm"
    record_series(warm, 100)
    FallingHeadRecord(
        load_series(warm).falling_head,
        specimen_state(load_series(warm).specimens).iloc[0],
        Settings(),
    ).analyse(None)
    peaks = {}
    gc.collect()
    tracemalloc.start()
    try:
        series = load_series(folder)
        raw = 3 * 8 * len(series.falling_head)
        peaks["loading"] = tracemalloc.get_traced_memory()[1]
        tracemalloc.reset_peak()
        state = specimen_state(series.specimens).iloc[0]
        record = FallingHeadRecord(series.falling_head, state, Settings())
        peaks["preparing the record"] = tracemalloc.get_traced_memory()[1]
        tracemalloc.reset_peak()
        trends = window_trends(record.reference_time, record.log_head, Settings().criteria)
        peaks["trend of every trial window"] = tracemalloc.get_traced_memory()[1]
        del trends  # the analysis forms its own
        tracemalloc.reset_peak()
        record.analyse(None)
        peaks["analysis (window proposed)"] = tracemalloc.get_traced_memory()[1]
        held = tracemalloc.get_traced_memory()[0]
    finally:
        tracemalloc.stop()
    return {"raw": raw, "held": held, **peaks}


def exponent(sizes, times) -> float:
    """Slope of the least-squares line of log time on log size."""
    return float(np.polyfit(np.log(sizes), np.log(times), 1)[0])


def scaling(work: Path, rounds: int, largest: int, most: int, with_images: bool):
    """Rows of (what, size, seconds without images, bytes, seconds with images, bytes).

    Readings: one specimen of `size` readings; specimens: `size` specimens of 1000
    readings each. Peak resident memory is of the Python process (Chromium apart).
    """
    rows = []
    sizes = [n for n in (10_000, 100_000, 1_000_000, 10_000_000) if n <= largest]
    counts = [n for n in (10, 100, 1000) if n <= most]
    cases = [("readings", n, record_series(work / f"r{n}", n)) for n in sizes]
    cases += [("specimens", n, record_series(work / f"s{n}", 1000, n)) for n in counts]
    for what, size, folder in cases:
        plain = [run_command(report(folder, work / "scaling-out")) for _ in range(rounds)]
        row = [what, size, statistics.median(t for t, _ in plain), max(m for _, m in plain)]
        if with_images:
            shown = [
                run_command(report(folder, work / "scaling-images", images=True))
                for _ in range(rounds)
            ]
            row += [statistics.median(t for t, _ in shown), max(m for _, m in shown)]
        rows.append(row)
        print(f"    {what} {size:>10,}: " + ", ".join(f"{v:.3g}" for v in row[2:]), flush=True)
    return rows


def startup_case(rounds: int) -> dict[str, list[float]]:
    """``python -m kitchen --help`` against ``python -c "import pandas"``, in turns."""
    commands = {
        "kitchen --help": [PYTHON, "-m", "kitchen", "--help"],
        "import pandas": [PYTHON, "-c", "import pandas"],
    }
    return in_rounds(commands, max(rounds, 5))


def targets(work: Path, rounds: int, large: bool, target) -> None:
    """Measure every target and hand each to `target(name, value, limit, detail[, unit])`."""
    started = startup_case(rounds)
    pairs = [
        a / b for a, b in zip(started["kitchen --help"], started["import pandas"], strict=True)
    ]
    target(
        "start-up: python -m kitchen --help / import pandas",
        statistics.median(pairs),
        1.5,
        f"--help {statistics.median(started['kitchen --help']):.2f} s, import pandas "
        f"{statistics.median(started['import pandas']):.2f} s (medians of "
        f"{len(pairs)} rounds)",
    )
    # the extra time is the difference of two commands of 1-2 s each, and on a shared
    # machine a round can stall by a tenth of a second or more: at least MARGINAL_ROUNDS
    marginal_rounds = max(rounds, MARGINAL_ROUNDS)
    times, ours, theirs = marginal_case(work, marginal_rounds)
    median = {name: statistics.median(values) for name, values in times.items()}
    ratio = statistics.median(ours) / statistics.median(theirs)
    low, _, high = statistics.quantiles(ours, n=4)
    target(
        "report: marginal cost of 10^6 readings / peer",
        ratio,
        1.5,
        f"ours {statistics.median(ours):.2f} s more (quartiles {low:.2f}-{high:.2f} s; "
        f"10^2: {median['ours small']:.2f} s, 10^6: {median['ours large']:.2f} s); peer "
        f"{statistics.median(theirs):.2f} s more (10^2: {median['peer small']:.2f} s, "
        f"10^6: {median['peer large']:.2f} s); medians of {marginal_rounds} rounds",
    )

    shown, spent = images_case(work, rounds)
    pairs = [a / b for a, b in zip(shown["with images"], shown["without images"], strict=True)]
    floor = image_floor(work, rounds)
    plain = statistics.median(shown["without images"])
    with_images = statistics.median(shown["with images"])
    floor_time = plain + floor["images"]
    cores = os.cpu_count() or 1
    if spent:
        work_with = statistics.median(spent["with images"])
        work_without = statistics.median(spent["without images"])
        cpu_floor = (
            f"; the work: {work_with:.2f} core-s with images, {work_without:.2f} without "
            f"(the machine's busy time, medians), so on {cores} cores the pack with images "
            f"takes at least {work_with / cores:.2f} s, {work_with / cores / plain:.2f}x "
            "without, were every core kept busy throughout"
        )
    else:
        cpu_floor = ""
    target(
        "clay memo pack: with images / without",
        statistics.median(pairs),
        2.0,
        f"with {with_images:.2f} s, without {plain:.2f} s (medians of {rounds} rounds, "
        f"ratio per round {', '.join(f'{p:.2f}' for p in pairs)}); image floor "
        f"{floor_time:.2f} s = without + {floor['count']} images in a warm page "
        f"{floor['images']:.2f} s ({1e3 * floor['images'] / floor['count']:.0f} ms an "
        f"image); with images / floor {with_images / floor_time:.2f}x; Chromium's start "
        f"and first image {floor['first']:.2f} s; the first run on a machine (no browser "
        f"profile kept yet) {shown['first run'][0]:.2f} s{cpu_floor}",
    )

    stages = memory_stages(record_series(work / "memory", 1_000_000))
    raw = stages.pop("raw")
    held = stages.pop("held")
    worst = max(stages, key=stages.get)
    target(
        "memory: peak opening and reducing 10^6 readings / raw",
        stages[worst] / raw,
        3.0,
        f"raw arrays {raw / 1e6:.0f} MB; peaks: "
        + ", ".join(f"{name} {peak / raw:.2f}x" for name, peak in stages.items())
        + f"; held after the analysis {held / raw:.2f}x",
    )

    if large:
        series = record_series(work / "large-7", 10_000_000)
        seconds, peak = run_command(report(series, work / "out-7"))
        target(
            "report on 10^7 readings: peak resident memory",
            peak / 2**30,
            1.0,
            f"{seconds:.1f} s; readings CSV {(series / 'falling_head.csv').stat().st_size / 1e6:.0f} MB",
            " GiB",
        )


# --- the run -----------------------------------------------------------------------------------
def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--rounds", type=int, default=5)
    parser.add_argument("--quick", action="store_true", help="3 rounds, no 10^7 record")
    parser.add_argument("--large", action="store_true", help="report on 10^7 readings")
    parser.add_argument("--scaling", action="store_true", help="the README's scaling table")
    parser.add_argument("--scaling-images", action="store_true", help="with images too")
    parser.add_argument("--only-scaling", action="store_true", help="the table, no targets")
    arguments = parser.parse_args(argv)
    rounds = 3 if arguments.quick else arguments.rounds
    lines, missed = [], []

    def target(name: str, value: float, limit: float, detail: str, unit: str = "x") -> None:
        met = value <= limit
        lines.append(
            f"  {name:<52} {value:>8.2f}{unit} (limit {limit:g}{unit})  "
            f"{'met' if met else 'MISSED'}\n      {detail}"
        )
        if not met:
            missed.append(name)

    with tempfile.TemporaryDirectory(prefix="kitchen-whole-") as folder:
        work = Path(folder)
        if not arguments.only_scaling:
            targets(work, rounds, arguments.large, target)
        if arguments.scaling or arguments.scaling_images or arguments.only_scaling:
            print("scaling (median s, peak MB; columns: without images, with images):")
            rows = scaling(work, max(1, rounds // 2), 10_000_000, 1000, arguments.scaling_images)
            for what in ("readings", "specimens"):
                part = [row for row in rows if row[0] == what]
                sizes = [row[1] for row in part]
                text = f"exponent without images {exponent(sizes, [r[2] for r in part]):.2f}"
                if arguments.scaling_images:
                    text += f", with images {exponent(sizes, [r[4] for r in part]):.2f}"
                print(f"  {what}: {text}")
                for row in part:
                    cells = [f"{row[1]:,}", f"{row[2]:.2f} s", f"{row[3] / 2**20:.0f} MB"]
                    if arguments.scaling_images:
                        cells += [f"{row[4]:.2f} s", f"{row[5] / 2**20:.0f} MB"]
                    print("  | " + " | ".join(cells) + " |")
        shutil.rmtree(work / "memory", ignore_errors=True)
    print("\n".join(lines))
    print(f"{len(lines) - len(missed)} of {len(lines)} targets met")
    return 1 if missed else 0


if __name__ == "__main__":
    sys.exit(main())
