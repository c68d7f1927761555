"""False alarms and coverage of the falling-head verdicts over large seeded populations.

Beside the speed benchmark and, like it, not part of ``make test``: the tests in
tests/reduction/test_falling_head_populations.py assert the rates on populations of about 200
records; this script measures them over larger ones (1000 records each by default) and prints
one line per population:

- steady records judged valid (the rest are false alarms), and valid with a 95 % interval
  that holds the true k20;
- records with a fault (a tailwater datum read ±20 mm off; an early transient), either judged
  not valid with the reason in words, or reported with an interval that holds the true k20;
- early transients under the default fit: a valid proposed window whose interval holds k20;
- for the faults, the share judged valid with an interval that misses k20: a confident wrong
  k, the verdict that must not be given.

The records come from tests/population_records.py (the falling-head law with the fault added,
known k20, seeded reading errors of 0.5 to 2 mm), which does not use the package.

    .venv/bin/python tests/benchmarks/verdict_rates.py             # 1000 records a population
    .venv/bin/python tests/benchmarks/verdict_rates.py --count 200 # a quicker look
"""

from __future__ import annotations

import argparse
import sys
import time
from pathlib import Path

TESTS = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(TESTS))
import population_records  # noqa: E402  (tests/, beside the test helpers)

from kitchen.reduction import FallingHeadRecord  # noqa: E402
from kitchen.settings import Settings  # noqa: E402


def _share(part, counts) -> str:
    return f"{100 * part / counts['records']:5.1f} %"


def _line(label, counts, seconds, kind):
    n = counts["records"]
    if kind == "steady":
        body = (
            f"valid {_share(counts['valid'], counts)} (false alarms "
            f"{_share(n - counts['valid'], counts)}); valid and interval holds k20 "
            f"{_share(counts['valid_holds'], counts)}"
        )
    elif kind == "datum":
        body = (
            f"not valid {_share(n - counts['valid'], counts)} (saying the datum "
            f"{_share(counts['said_datum'], counts)}); interval holds k20 "
            f"{_share(counts['holds'], counts)}; not valid saying the datum, or holds "
            f"{_share(counts['either'], counts)}; valid with k20 outside "
            f"{_share(counts['valid'] - counts['valid_holds'], counts)}"
        )
    elif kind == "fault":
        body = (
            f"not valid {_share(n - counts['valid'], counts)}; interval holds k20 "
            f"{_share(counts['holds'], counts)}; not valid with the reason, or holds "
            f"{_share(counts['either'], counts)}; valid with k20 outside "
            f"{_share(counts['valid'] - counts['valid_holds'], counts)}"
        )
    else:
        body = (
            f"valid {_share(counts['valid'], counts)}; valid and interval holds k20 "
            f"{_share(counts['valid_holds'], counts)}"
        )
    print(f"{label:<62} {n:5d} records  {body}  [{seconds:.0f} s]", flush=True)


def _measure(label, kind, fit, records, datum_uncertainty=None):
    started = time.perf_counter()
    counts = dict(records=0, valid=0, holds=0, valid_holds=0, said=0, said_datum=0, either=0)
    settings = Settings(falling_head_fit=fit)
    if datum_uncertainty is not None:
        settings = settings.with_changes(datum_uncertainty=datum_uncertainty)
    for item in records:
        analysis = FallingHeadRecord(item.readings, item.specimen, settings).analyse()
        holds = population_records.holds(item, analysis)
        said = population_records.said(analysis)
        said_datum = population_records.said(analysis, population_records.DATUM_WORDS)
        counts["records"] += 1
        counts["valid"] += analysis.valid
        counts["holds"] += holds
        counts["valid_holds"] += analysis.valid and holds
        counts["said"] += said
        counts["said_datum"] += said_datum
        counts["either"] += (said_datum if kind == "datum" else said) or holds
    _line(label, counts, time.perf_counter() - started, kind)


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--count", type=int, default=1000, help="records a population")
    parser.add_argument("--seed", type=int, default=2024, help="seed of the first population")
    arguments = parser.parse_args(argv)
    count, seed = arguments.count, arguments.seed
    population = population_records.population
    logger = [population_records.record(10**6, 1.5e-3, s, hours=24.0) for s in range(3)]
    rows = [
        ("steady, 30-3000 readings, log-linear fit", "steady", "log_linear",
         population("steady", count, seed, readings=(30, 3000))),
        ("steady, 10^6 readings (1.5 mm), log-linear fit", "steady", "log_linear", logger),
        ("steady, 30-3000 readings, datum-fitted decay", "steady", "datum",
         population("steady", count, seed + 1, readings=(30, 3000))),
        ("datum ±20 mm, 500-20000 readings, log-linear fit", "datum", "log_linear",
         population("datum", count, seed + 2, readings=(500, 20_000))),
        ("datum ±20 mm, 30-500 readings, log-linear fit", "datum", "log_linear",
         population("datum", count, seed + 3, readings=(30, 500))),
        ("datum ±20 mm, 30-20000 readings, datum-fitted decay", "proposal", "datum",
         population("datum", count, seed + 4, readings=(30, 20_000))),
        ("early transient, 30-3000 readings, datum-fitted decay", "fault", "datum",
         population("transient", count, seed + 5, readings=(30, 3000))),
        ("early transient, 30-3000 readings, log-linear fit", "proposal", "log_linear",
         population("transient", count, seed + 6, readings=(30, 3000))),
    ]  # fmt: skip
    for label, kind, fit, records in rows:
        _measure(label, kind, fit, records)
    # the interval's statistical part alone: without the datum's Type B allowance a steady
    # record's interval should hold the truth about 95 % of the time
    _measure(
        "steady, 30-3000 readings, log-linear fit, datum uncertainty 0",
        "steady",
        "log_linear",
        population("steady", count, seed, readings=(30, 3000)),
        datum_uncertainty=0.0,
    )
    return 0


if __name__ == "__main__":
    sys.exit(main())
