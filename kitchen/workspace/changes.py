"""What a revision changed: the specimens whose dry density, void ratio, k, validity or
verdict moved between two results tables, or across one row of a series' revision log.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd

from kitchen.analysis import NOT_JUDGED, classify_against_criterion
from kitchen.revisions import RevisionError, read_revisions, revisions_path

from .workspace import Workspace

__all__ = ["what_changed", "revision_effect"]


_COMPARED = ("dry_density", "void_ratio", "k_reference", "valid")
_NUMBERS = ("dry_density", "void_ratio", "k_reference")
_RELATIVE = 1e-12


def _verdicts(results: pd.DataFrame, criterion, kept) -> np.ndarray:
    """Each row's verdict, as the series analysis gives it: not judged where the test is not
    valid and not kept on record (:mod:`kitchen.analysis.result_selection`)."""
    out = np.full(len(results), pd.NA, dtype=object)
    if criterion is None:
        return out
    k, low, high = (
        pd.to_numeric(results[c], errors="coerce").to_numpy(dtype=float)
        for c in ("k_reference", "k_reference_low", "k_reference_high")
    )
    with np.errstate(invalid="ignore"):
        usable = np.isfinite(k) & np.isfinite(low) & np.isfinite(high)
        usable &= (k > 0) & (low > 0) & (high > 0)
    out[~usable] = "no result"
    if usable.any():
        out[usable] = classify_against_criterion(k[usable], low[usable], high[usable], criterion)
    pairs = zip(results["specimen"], results["method"], strict=True)
    on_record = np.array([pair in kept for pair in pairs], dtype=bool)
    valid = results["valid"].fillna(False).to_numpy(dtype=bool)
    out[usable & ~valid & ~on_record] = NOT_JUDGED
    return out


def _moved(old: np.ndarray, new: np.ndarray, number: bool) -> np.ndarray:
    if number:
        old, new = old.astype(float), new.astype(float)
        same = np.isclose(old, new, rtol=_RELATIVE, atol=0.0) | (np.isnan(old) & np.isnan(new))
        return ~same
    gone_old, gone_new = pd.isna(old), pd.isna(new)
    equal = np.array(
        [not (a or b) and x == y for x, y, a, b in zip(old, new, gone_old, gone_new, strict=True)],
        dtype=bool,
    )
    return ~(equal | (gone_old & gone_new))


def what_changed(
    before: pd.DataFrame, after: pd.DataFrame, criterion: float | None = None, kept=None
) -> pd.DataFrame:
    """Every specimen whose results moved, old and new side by side.

    Parameters
    ----------
    before, after : pandas.DataFrame
        From :func:`kitchen.reduction.results.series_results`, before and after a revision. Needs
        ``specimen``, ``method``, ``dry_density``, ``void_ratio``, ``k_reference``,
        ``k_reference_low``, ``k_reference_high`` and ``valid``.
    criterion : float or Criterion, optional
        Largest conductivity allowed (a number), or a :class:`kitchen.analysis.Criterion` of
        either kind; when given, each side's verdict from
        :func:`kitchen.analysis.classify_against_criterion`, or not judged where the test
        is not valid and not kept on record. [m/s]
    kept : collection of (str, str), optional
        The tests kept on record despite a failed check, ``(specimen, method)``
        (:attr:`Workspace.kept`).

    Returns
    -------
    pandas.DataFrame
        One row per specimen and method that moved: ``specimen``, ``method``, ``moved``
        (the quantities that moved, in words), then ``<quantity>_before`` and
        ``<quantity>_after`` for ``dry_density`` [kg/m3], ``void_ratio``,
        ``k_reference`` [m/s] (k20 at the default reference temperature), ``valid`` and
        ``verdict`` (``<NA>`` without a criterion; ``"no result"`` where k is missing).
        Rows in the order of `before`, then those of `after` alone.

    Notes
    -----
    Numbers count as moved when they differ by more than one part in 10¹²; a specimen
    present on one side only counts as moved. The two tables are aligned on (specimen,
    method) with arrays: the tables hold one row per test, so this is quick beside the
    reductions it compares.
    """
    needed = ["specimen", "method", *_COMPARED, "k_reference_low", "k_reference_high"]
    for name, frame in (("before", before), ("after", after)):
        missing = [c for c in needed if c not in frame.columns]
        if missing:
            raise ValueError(f"{name}: results table lacks the columns {', '.join(missing)}")
    quantities = [*_COMPARED, "verdict"]
    sides = []
    for frame in (before, after):
        values = {q: frame[q].to_numpy(dtype=object) for q in _COMPARED}
        values["verdict"] = _verdicts(frame, criterion, kept or {})
        keys = list(zip(frame["specimen"], frame["method"], strict=True))
        sides.append((dict(zip(keys, range(len(keys)), strict=True)), values))
    (old_at, old), (new_at, new) = sides
    keys = list(old_at) + [key for key in new_at if key not in old_at]

    def aligned(at, values, q):
        out = np.full(len(keys), np.nan if q in _NUMBERS else pd.NA, dtype=object)
        for i, key in enumerate(keys):
            if key in at:
                out[i] = values[q][at[key]]
        return out

    columns = {"specimen": [key[0] for key in keys], "method": [key[1] for key in keys]}
    moved = {}
    for q in quantities:
        columns[f"{q}_before"] = aligned(old_at, old, q)
        columns[f"{q}_after"] = aligned(new_at, new, q)
        moved[q] = _moved(columns[f"{q}_before"], columns[f"{q}_after"], q in _NUMBERS)
    one_side = np.array([(key in old_at) != (key in new_at) for key in keys], dtype=bool)
    words = [
        ", ".join(q for q in quantities if moved[q][i]) or "present on one side only"
        for i in range(len(keys))
    ]
    keep = np.logical_or.reduce([*moved.values(), one_side]) if keys else np.zeros(0, bool)
    table = {"specimen": columns["specimen"], "method": columns["method"], "moved": words}
    for q in quantities:
        for side in ("before", "after"):
            values = columns[f"{q}_{side}"]
            table[f"{q}_{side}"] = values.astype(float) if q in _NUMBERS else values
    return pd.DataFrame(table).loc[keep].reset_index(drop=True)


def revision_effect(
    series_path: str | Path, revision_id: str, settings=None, criterion=None
) -> pd.DataFrame:
    """What one row of the log changed: :func:`what_changed` across that row.

    Compares the results with the log as it stood just before the row and just after it
    (for a withdrawal, what withdrawing changed), each opened as a :class:`Workspace`,
    so with the reading windows on record, as the report reduces the series.

    Parameters
    ----------
    series_path : str or pathlib.Path
        Series folder or ``.xlsx`` workbook.
    revision_id : str
        The row's id.
    settings : kitchen.settings.Settings, optional
        Reference temperature and viscosity method.
    criterion : float or Criterion, optional
        A criterion given for the comparison (typed on the command line): the largest k
        allowed (a number) or a :class:`kitchen.analysis.Criterion` of either kind; it
        overrides the series' own. [m/s] None (the default) means the criterion of the
        series' project table as it stands after the row, else none: then the verdict
        columns are ``<NA>``.
    """
    revisions = read_revisions(series_path)
    wanted = str(revision_id).strip().lower()
    ids = [revision.id for revision in revisions]
    if wanted not in ids:
        raise RevisionError(f"no revision {revision_id!r} in {revisions_path(series_path)}")
    position = ids.index(wanted)
    before = Workspace(series_path, settings, log_rows=position).results()
    after = Workspace(series_path, settings, log_rows=position + 1)
    in_force, _ = after.criterion_in_force(criterion)
    return what_changed(before, after.results(), in_force, after.kept)
