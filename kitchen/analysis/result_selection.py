"""Which result of each specimen the series analysis uses, its k and interval, and its verdict.

The results table is checked for the columns of :func:`kitchen.reduction.results.series_results`;
each specimen keeps one result (its first that passed every check, else its first); a
specimen without a usable conductivity is left out, and one without an interval on k has a
verdict that is not conclusive; the verdicts come from the intervals against the criterion;
the saturation lines take the median Gs of the specimens. Each choice is said in a note.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from .criterion import NOT_CONCLUSIVE, classify_against_criterion

__all__ = ["REQUIRED_COLUMNS"]

REQUIRED_COLUMNS = (
    "specimen",
    "method",
    "effort",
    "water_content",
    "dry_density",
    "void_ratio",
    "saturation",
    "specific_gravity",
    "d10",
    "k_reference",
    "k_reference_low",
    "k_reference_high",
)


def require_results_table(results) -> None:
    """Refuse a results table that is not a DataFrame, lacks a required column, or is empty."""
    if not isinstance(results, pd.DataFrame):
        raise ValueError(f"results: expected a pandas DataFrame, got {type(results).__name__}")
    missing = [column for column in REQUIRED_COLUMNS if column not in results.columns]
    if missing:
        raise ValueError(
            f"results table: missing column(s) {', '.join(missing)}; expected the frame of "
            "kitchen.reduction.results.series_results"
        )
    if results.empty:
        raise ValueError("results table: no rows; the series has no reduced test")


def one_result_per_specimen(results: pd.DataFrame, notes: list[str]) -> pd.DataFrame:
    """One row per specimen, in the order of the table: its first valid result, else its
    first result."""
    specimens = results["specimen"].to_numpy(dtype=object)
    valid = (
        results["valid"].to_numpy(dtype=bool)
        if "valid" in results.columns
        else np.ones(len(results), dtype=bool)
    )
    chosen: dict = {}
    repeated = []
    for position, (specimen, is_valid) in enumerate(zip(specimens, valid, strict=True)):
        held = chosen.get(specimen)
        if held is None:
            chosen[specimen] = position
        else:
            repeated.append(specimen)
            if is_valid and not valid[held]:
                chosen[specimen] = position
    methods = results["method"].to_numpy(dtype=object)
    for specimen in dict.fromkeys(repeated):
        method = methods[chosen[specimen]]
        notes.append(f"specimen {specimen} has more than one result: the {method} result is used")
    return results.iloc[sorted(chosen.values())].reset_index(drop=True)


def usable_conductivity(frame: pd.DataFrame, notes: list[str]) -> pd.DataFrame:
    """The rows with a positive k, with ``k``, ``k_low`` and ``k_high`` added.

    The interval is NaN where it does not bound k; each specimen left out, and each left
    without an interval, is noted.
    """

    def numbers(column):
        return pd.to_numeric(frame[column], errors="coerce").to_numpy(dtype=float)

    k, low, high = numbers("k_reference"), numbers("k_reference_low"), numbers("k_reference_high")
    with np.errstate(invalid="ignore"):
        usable = np.isfinite(k) & (k > 0)
    specimens = frame["specimen"].to_numpy(dtype=object)
    for specimen in specimens[~usable]:
        notes.append(f"specimen {specimen}: no usable conductivity, left out of the analysis")
    k, low, high = k[usable], low[usable], high[usable]
    with np.errstate(invalid="ignore"):
        bounded = np.isfinite(low) & np.isfinite(high) & (low > 0) & (low <= k) & (high >= k)
    for specimen in specimens[usable][~bounded]:
        notes.append(f"specimen {specimen}: no interval on k, so its verdict is not conclusive")
    out = frame.iloc[np.flatnonzero(usable)].reset_index(drop=True)
    return out.assign(
        k=k, k_low=np.where(bounded, low, np.nan), k_high=np.where(bounded, high, np.nan)
    )


def criterion_verdicts(frame: pd.DataFrame, criterion: float) -> np.ndarray:
    """Each row's verdict from its interval against `criterion`; not conclusive without one."""
    verdict = np.full(len(frame), NOT_CONCLUSIVE, dtype=object)
    bounded = frame["k_low"].notna().to_numpy()
    if bounded.any():
        verdict[bounded] = np.asarray(
            classify_against_criterion(
                frame["k"].to_numpy()[bounded],
                frame["k_low"].to_numpy()[bounded],
                frame["k_high"].to_numpy()[bounded],
                criterion,
            ),
            dtype=object,
        )
    return verdict


def median_specific_gravity(frame: pd.DataFrame, notes: list[str]) -> float | None:
    """The median Gs of the rows (None when none has one); a spread of values is noted."""
    gs = pd.to_numeric(frame["specific_gravity"], errors="coerce").dropna()
    if gs.empty:
        return None
    if gs.nunique() > 1:
        notes.append(
            f"specimens carry {gs.nunique()} values of Gs ({gs.min():g} to {gs.max():g}): the "
            f"saturation lines use their median, {gs.median():g}"
        )
    return float(gs.median())
