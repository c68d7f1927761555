"""Records made from known parameters, shared by several test modules.

:func:`known_k_record` gives falling-head readings made from a known k20 (used by the tests of
the falling-head modules); :func:`drifting_log_head` gives ln h with k drifting by a known
fraction (used by the tests of the validity criteria and of the window proposal).
"""

import numpy as np
import pandas as pd

from kitchen.reduction import effective_standpipe_area, reference_elapsed_time


def known_k_record(k20=2.0e-9, n=40, temperature=None, noise=0.0, seed=1, tailwater_area=np.nan):
    area, length, standpipe = 0.0081, 0.116, 2.0e-6
    a = effective_standpipe_area(standpipe, tailwater_area)
    time = np.linspace(0.0, 8 * 3600.0, n)
    temps = np.full(n, 20.0) if temperature is None else np.asarray(temperature, dtype=float)
    tau = reference_elapsed_time(time, temps)
    head = 1.2 * np.exp(-k20 * area / (a * length) * tau)
    head = head + np.random.default_rng(seed).normal(0.0, noise, n)
    readings = pd.DataFrame({"time": time, "head": head, "temperature": temps})
    specimen = pd.Series(
        {
            "specimen": "C1",
            "area": area,
            "height": length,
            "standpipe_area": standpipe,
            "tailwater_standpipe_area": tailwater_area,
        }
    )
    return readings, specimen


def drifting_log_head(change, noise, n=40, seed=2):
    """ln h with k changing linearly by `change` (relative) across the record."""
    t = np.linspace(0, 6 * 3600.0, n)
    rate = 1.0 / (10 * 3600.0)
    slope = -rate * (1 + change * (t - t.mean()) / np.ptp(t))
    log_h = np.concatenate(([0.0], np.cumsum(0.5 * (slope[1:] + slope[:-1]) * np.diff(t))))
    return t, log_h + np.random.default_rng(seed).normal(0, noise, n)
