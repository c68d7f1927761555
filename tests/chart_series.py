"""The series the chart tests draw on: the two sample series analysed, and a constructed one."""

import numpy as np
import pandas as pd
from series_files import SAMPLES

from kitchen.analysis import analyse_series
from kitchen.io import load_series
from kitchen.reduction import series_results

# NIST SP 811 (2008), Appendix B, from the exact foot, pound and standard gravity:
KN_PER_MG = 9.80665  # 1 Mg/m3 of dry density is a dry unit weight of 9.80665 kN/m3
LBFT3_PER_MG = 62.42796  # 1 Mg/m3 = 62.428 lb/ft3


def sample_series(name: str):
    """A sample series and its analysis against a criterion of 1e-9 m/s."""
    series = load_series(SAMPLES / name)
    return series, analyse_series(series_results(series), 1e-9)


def wide_analysis():
    """A constructed series with wide intervals: all three verdicts, visible error bars."""
    w = np.array([0.14, 0.16, 0.18, 0.20, 0.22, 0.15, 0.17, 0.19, 0.21])
    rho = np.array([1700, 1760, 1780, 1750, 1690, 1650, 1700, 1710, 1680], dtype=float)
    k = np.array([2e-8, 5e-9, 8e-10, 3e-10, 2e-10, 4e-8, 1e-8, 1.1e-9, 5e-10])
    frame = pd.DataFrame(
        dict(
            specimen=[f"<b>W{i}</b>" if i == 0 else f"W{i}" for i in range(9)],
            method="falling_head",
            effort=["heavy"] * 5 + ["light"] * 4,
            water_content=w,
            dry_density=rho,
            void_ratio=2.7e3 / rho - 1,
            saturation=0.9,
            specific_gravity=2.7,
            d10=np.nan,
            k_reference=k,
            k_reference_low=k / 1.6,
            k_reference_high=k * 1.6,
            valid=True,
            checks=[[] for _ in w],
        )
    )
    return analyse_series(frame, 1e-9)


def traces(figure, **where):
    return [t for t in figure.data if all(getattr(t, k) == v for k, v in where.items())]


def specimen_traces(figure, axis="y"):
    return [t for t in figure.data if t.meta and "verdict" in t.meta and t.yaxis == axis]
