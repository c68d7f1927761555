"""The plain script an engineer would write instead of ``kitchen report``: the peer of
``whole_commands.py``.

Reads a series folder's ``falling_head.csv`` with ``pandas.read_csv``, fits ln h on t by
least squares for each specimen (``scipy.stats.linregress``) and writes the slope, its
standard error and the number of readings to a CSV file:

    python tests/benchmarks/peer_report.py SERIES_FOLDER OUT.csv

It checks nothing, converts no unit and writes no memo: it is the floor the whole report
is measured against.
"""

from __future__ import annotations

import sys

import numpy as np
import pandas as pd
from scipy import stats


def main(folder: str, out: str) -> None:
    readings = pd.read_csv(f"{folder}/falling_head.csv")
    rows = []
    for specimen, group in readings.groupby("specimen", sort=False):
        fit = stats.linregress(group["time [s]"].to_numpy(), np.log(group["head [mm]"].to_numpy()))
        rows.append((specimen, fit.slope, fit.stderr, len(group)))
    pd.DataFrame(rows, columns=["specimen", "slope [1/s]", "stderr [1/s]", "readings"]).to_csv(
        out, index=False
    )


if __name__ == "__main__":
    main(*sys.argv[1:3])
