"""Which result of each specimen the series analysis uses, its k and interval, and its verdict.

The results table is checked for the columns of :func:`kitchen.reduction.results.series_results`.
The rules, each said in a note where it applies:

- each specimen keeps one result: its first that passed every check; else its first that
  the engineer keeps on record with a reason; else its first;
- a specimen without a usable conductivity is left out;
- validity comes before compliance: a test that is not valid, and not kept on record, is
  :data:`~kitchen.analysis.criterion.NOT_JUDGED` — never "meets" nor "does not meet";
- a judged specimen without an interval on k is not conclusive; the others are judged by
  their interval against the criterion; where no criterion is given, a judged specimen is
  :data:`~kitchen.analysis.criterion.NO_CRITERION`;
- the saturation lines take the median Gs of the specimens.
"""

from __future__ import annotations

from collections.abc import Mapping

import numpy as np
import pandas as pd

from .criterion import NO_CRITERION, NOT_CONCLUSIVE, NOT_JUDGED, classify_against_criterion

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


def _validity(results: pd.DataFrame) -> np.ndarray:
    """The ``valid`` column as booleans; every test valid when the table has none."""
    if "valid" not in results.columns:
        return np.ones(len(results), dtype=bool)
    return results["valid"].fillna(False).to_numpy(dtype=bool)


def _kept_flags(results: pd.DataFrame, kept) -> np.ndarray:
    """True where the row's (specimen, method) is kept on record."""
    pairs = zip(results["specimen"], results["method"], strict=True)
    return np.array([pair in kept for pair in pairs], dtype=bool)


def one_result_per_specimen(results: pd.DataFrame, notes: list[str], kept=None) -> pd.DataFrame:
    """One row per specimen, in the order of the table.

    The rule, in order of preference: the specimen's first result that passed every check;
    else its first result kept on record (`kept`: the ``(specimen, method)`` pairs the
    engineer keeps despite a failed check); else its first result.
    """
    specimens = results["specimen"].to_numpy(dtype=object)
    valid, on_record = _validity(results), _kept_flags(results, kept or {})
    preference = np.where(valid, 0, np.where(on_record, 1, 2))  # the lower, the better
    chosen: dict = {}
    repeated = []
    for position, specimen in enumerate(specimens):
        held = chosen.get(specimen)
        if held is None:
            chosen[specimen] = position
        else:
            repeated.append(specimen)
            if preference[position] < preference[held]:
                chosen[specimen] = position
    methods = results["method"].to_numpy(dtype=object)
    for specimen in dict.fromkeys(repeated):
        method = methods[chosen[specimen]]
        notes.append(f"specimen {specimen} has more than one result: the {method} result is used")
    return results.iloc[sorted(chosen.values())].reset_index(drop=True)


def usable_conductivity(
    frame: pd.DataFrame, notes: list[str], criterion_given: bool = True
) -> pd.DataFrame:
    """The rows with a positive k, with ``k``, ``k_low`` and ``k_high`` added.

    The interval is NaN where it does not bound k; each specimen left out, and each left
    without an interval, is noted (the latter only when there is a criterion to judge by).
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
    judged = (  # a test not judged has no verdict against the criterion to qualify
        frame["judged"].to_numpy(dtype=bool)[usable]
        if "judged" in frame.columns
        else np.ones(k.size, dtype=bool)
    )
    for specimen in specimens[usable][judged & ~bounded & criterion_given]:
        notes.append(f"specimen {specimen}: no interval on k, so its verdict is not conclusive")
    out = frame.iloc[np.flatnonzero(usable)].reset_index(drop=True)
    return out.assign(
        k=k, k_low=np.where(bounded, low, np.nan), k_high=np.where(bounded, high, np.nan)
    )


def validity_on_record(frame: pd.DataFrame, kept, notes: list[str]) -> pd.DataFrame:
    """The rows with ``valid``, ``kept_on_record`` and ``judged`` set, each exception noted.

    A test is judged against the criterion when it is valid, or when it is not valid but
    the engineer keeps it on record with a reason (`kept`: ``{(specimen, method): the
    record in words}``). ``kept_on_record`` holds that record for a kept test that is not
    valid, "" otherwise.
    """
    kept = kept or {}
    if not isinstance(kept, Mapping):  # the pairs alone: the record says only that
        kept = dict.fromkeys(kept, "kept on record, no words given")
    valid = _validity(frame)
    records = [
        "" if ok else kept.get((specimen, method), "")
        for specimen, method, ok in zip(frame["specimen"], frame["method"], valid, strict=True)
    ]
    on_record = np.array([bool(record) for record in records], dtype=bool)
    for specimen, method, ok, record in zip(
        frame["specimen"], frame["method"], valid, records, strict=True
    ):
        test = f"its {str(method).replace('_', ' ')} test"
        if record:
            notes.append(
                f"specimen {specimen}: {test} is not valid but is kept on record "
                f"({record}): it is judged against the criterion and used in the acceptable "
                "zone and the trends"
            )
        elif not ok:
            notes.append(
                f"specimen {specimen}: {test} is not valid, so it is not judged against the "
                "criterion and takes no part in drawing the acceptable zone, the compaction "
                "curves, the trends or the geometric mean (see its checks; an engineer may keep "
                "it on record with a reason)"
            )
    return frame.assign(valid=valid, kept_on_record=records, judged=valid | on_record)


def criterion_verdicts(frame: pd.DataFrame, criterion: float | None) -> np.ndarray:
    """Each row's verdict from its interval against `criterion`: not judged where the row
    is not ``judged`` (a test not valid, not kept on record), not conclusive where it has
    no interval; "no criterion given" for every judged row when `criterion` is None."""
    verdict = np.full(len(frame), NOT_CONCLUSIVE if criterion is not None else NO_CRITERION)
    verdict = verdict.astype(object)
    bounded = frame["k_low"].notna().to_numpy() & (criterion is not None)
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
    if "judged" in frame.columns:
        verdict[~frame["judged"].to_numpy(dtype=bool)] = NOT_JUDGED
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
