"""Results tables as kitchen.reduction.results.series_results returns them, built from short rows."""

import numpy as np
import pandas as pd


def results_frame(rows) -> pd.DataFrame:
    """A results table as kitchen.reduction.results.series_results returns it, from short rows."""
    frame = pd.DataFrame(rows)
    defaults = dict(
        method="falling_head",
        effort=pd.NA,
        saturation=0.9,
        specific_gravity=2.70,
        d10=np.nan,
        valid=True,
    )
    for column, value in defaults.items():
        if column not in frame:
            frame[column] = value
    if "void_ratio" not in frame:
        frame["void_ratio"] = 2.70 * 1000.0 / frame["dry_density"] - 1.0
    for column, factor in (("k_reference_low", 0.95), ("k_reference_high", 1.05)):
        if column not in frame:
            frame[column] = frame["k_reference"] * factor
    frame["checks"] = [[] for _ in range(len(frame))]
    return frame
