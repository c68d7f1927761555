"""Constant-head test reduction: k for each timed collection, and per specimen from all.

:func:`constant_head_analysis` adds to the reduction the validity verdicts (steady
values, k against gradient, the gradient limit, the Reynolds number) and the 95 %
interval that combines the fit with the measurement resolutions; the results table uses it.
Each collection is reduced in :mod:`kitchen.reduction.constant_head_collections`.

References
----------
ASTM D2434, Standard Test Method for Permeability of Granular Soils (Constant Head):
k = Q·L/(A·h·t) (from memory for the clause).
ASTM D5084, Method A (constant head), and ISO 17892-11 (constant-head test).
Das, B. M. and Sobhan, K., *Principles of Geotechnical Engineering*, chapter on
permeability, constant-head test equation k = Q·L/(A·h·t).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from kitchen.fits import LinearFit, ProportionalFit, fit_through_origin
from kitchen.settings import Settings
from kitchen.uncertainty import (
    UncertaintyResult,
    conductivity_interval,
    fit_quantity,
    rectangular_quantity,
)
from kitchen.validity import (
    Verdict,
    gradient_check,
    gradient_independence_check,
    is_valid,
    reynolds_check,
    reynolds_number,
    steady_values_check,
)
from kitchen.water import water_density, water_viscosity

__all__ = [
    "ConstantHeadResult",
    "reduce_constant_head",
    "ConstantHeadAnalysis",
    "constant_head_analysis",
]


@dataclass(frozen=True)
class ConstantHeadResult:
    """The conductivity of one specimen from all its constant-head collections.

    ``fit`` is the fit of the temperature-corrected Darcy velocity against the gradient
    through the origin; its slope is ``k_reference``.
    """

    specimen: str
    n: int
    k: float
    k_reference: float
    k_reference_low: float
    k_reference_high: float
    gradient_min: float
    gradient_max: float
    temperature: float
    spread: float
    fit: ProportionalFit | None
    collections: pd.DataFrame
    notes: tuple[str, ...]


def reduce_constant_head(collections: pd.DataFrame, specimen: str) -> ConstantHeadResult:
    """Combine one specimen's reduced collections into its conductivity.

    Parameters
    ----------
    collections : pandas.DataFrame
        Rows of :func:`~kitchen.reduction.collection_table` for one specimen.
    specimen : str
        The specimen id.

    Returns
    -------
    ConstantHeadResult
        With k at the test temperature (fit of v on i), k at the reference temperature
        (fit of R_T·v on i) and its 95 % interval from the fit, the gradient range, the
        mean temperature, and ``spread`` — the largest deviation of a single collection's
        k from their mean, as a fraction of the mean.

    Notes
    -----
    In laminar flow v = k·i, so k is the slope of v against i through the origin
    (ASTM D2434 asks to establish the laminar range; D5856 suggests three gradients,
    from memory). With a single collection there is no interval: the bounds equal k and a
    note says so.
    """
    rows = collections[collections["specimen"] == specimen]
    if rows.empty:
        raise ValueError(f"specimen {specimen} has no constant-head collections")
    notes: list[str] = []
    gradient = rows["gradient"].to_numpy(float)
    velocity = rows["darcy_velocity"].to_numpy(float)
    corrected = velocity * rows["viscosity_ratio"].to_numpy(float)
    k_each = rows["k_reference"].to_numpy(float)
    if len(rows) >= 2:
        fit = fit_through_origin(gradient, corrected)
        k_test = fit_through_origin(gradient, velocity).slope
        k_reference, low, high = fit.slope, fit.slope_low, fit.slope_high
    else:
        fit = None
        k_test = float(rows["k"].iloc[0])
        k_reference = low = high = float(k_each[0])
        notes.append("one collection only: no interval from repeat collections")
    mean = float(np.mean(k_each))
    spread = float(np.max(np.abs(k_each - mean)) / mean)
    missing = int(rows["temperature_missing"].sum())
    if missing:
        notes.append(
            f"temperature not recorded for {missing} of {len(rows)} collection(s): "
            "k not corrected for those (about 2.5 % per degC)"
        )
    temperatures = rows["temperature"].to_numpy(float)
    temperature = float(np.nanmean(temperatures)) if missing < len(rows) else float("nan")
    return ConstantHeadResult(
        specimen=specimen,
        n=len(rows),
        k=float(k_test),
        k_reference=float(k_reference),
        k_reference_low=float(low),
        k_reference_high=float(high),
        gradient_min=float(gradient.min()),
        gradient_max=float(gradient.max()),
        temperature=temperature,
        spread=spread,
        fit=fit,
        collections=rows.reset_index(drop=True),
        notes=tuple(notes),
    )


@dataclass(frozen=True, eq=False)
class ConstantHeadAnalysis:
    """One specimen's constant-head collections with their verdicts and interval.

    ``k_reference_low``/``k_reference_high`` bound the 95 % interval that combines the fit
    with the measurement resolutions (``interval``); ``result`` is the plain reduction
    (its bounds are the fit's alone). ``line`` is the straight line of the corrected Darcy
    velocity on the gradient with an intercept, the test of k against gradient.
    """

    specimen: str
    result: ConstantHeadResult
    line: LinearFit | None
    interval: UncertaintyResult
    k_each: np.ndarray
    gradient: np.ndarray
    velocity: np.ndarray
    reynolds: float
    verdicts: tuple[Verdict, ...]
    notes: tuple[str, ...]
    method_notes: tuple[str, ...]

    n = property(lambda self: self.result.n)
    k = property(lambda self: self.result.k)
    k_reference = property(lambda self: self.result.k_reference)
    k_reference_low = property(lambda self: self.interval.low)
    k_reference_high = property(lambda self: self.interval.high)
    temperature = property(lambda self: self.result.temperature)
    gradient_min = property(lambda self: self.result.gradient_min)
    gradient_max = property(lambda self: self.result.gradient_max)

    @property
    def valid(self) -> bool:
        """True when every applicable criterion passes."""
        return is_valid(self.verdicts)

    @property
    def checks(self) -> tuple[str, ...]:
        """The failed criteria in words, then the notes on the data."""
        return tuple(v.sentence for v in self.verdicts if v.passed is False) + self.notes


def constant_head_analysis(
    collections: pd.DataFrame, specimen_row: pd.Series, settings=None
) -> ConstantHeadAnalysis:
    """Reduce one specimen's constant-head collections with verdicts and a 95 % interval.

    Parameters
    ----------
    collections : pandas.DataFrame
        Rows of :func:`~kitchen.reduction.collection_table` (any specimens; the specimen's
        are used), in the order the collections were made.
    specimen_row : pandas.Series
        The specimen's state: ``specimen``, ``diameter`` [m], optional ``d10`` [m].
    settings : Settings, optional
        Criteria, resolutions, uncertainty method, reference temperature and viscosity
        (:class:`kitchen.settings.Settings`).

    Returns
    -------
    ConstantHeadAnalysis
        k from :func:`reduce_constant_head`; its interval combines the fit's standard error
        with the resolutions (:func:`kitchen.uncertainty.conductivity_interval`).
        Verdicts: the last ``steady_count`` collections' k within the band of their mean;
        k independent of gradient (v on i with an intercept, the tool's own test); the
        largest gradient against the ASTM D5084 table; the Reynolds number on d10. The
        trend in time and outflow/inflow are not judged (the collections carry no times
        and no inflow).

    Notes
    -----
    Collections at one head share one head reading, so its error is common to them: the
    fit's standard error is taken from the line through the mean of the collections at
    each head (degrees of freedom: heads − 1), not from every collection as if each had
    its own head. With a single head, the collections' scatter and the head-scale
    resolution are combined instead; with a single collection, the resolutions of its
    readings.

    References
    ----------
    ASTM D2434 and D5084 Method A (from memory); JCGM 100:2008 for the interval.
    """
    if settings is None:
        settings = Settings()
    criteria, resolutions = settings.criteria, settings.resolutions
    specimen = str(specimen_row["specimen"])
    result = reduce_constant_head(collections, specimen)
    rows = result.collections
    gradient = rows["gradient"].to_numpy(float)
    velocity = rows["darcy_velocity"].to_numpy(float) * rows["viscosity_ratio"].to_numpy(float)
    k_each = rows["k_reference"].to_numpy(float)
    steady = steady_values_check(k_each, criteria, "one value per collection, in the file's order")
    heads = rows["head_difference"].to_numpy(float)
    independence, line = gradient_independence_check(gradient, velocity, criteria, heads)
    temperatures = rows["temperature"].to_numpy(float)
    used = np.where(np.isnan(temperatures), settings.reference_temperature, temperatures)
    reynolds = float("nan")
    d10 = specimen_row.get("d10", np.nan)
    if d10 is not None and not pd.isna(d10):
        each = reynolds_number(
            rows["darcy_velocity"].to_numpy(float),
            float(d10),
            water_density(used),
            water_viscosity(used),
        )
        reynolds = float(np.max(each))
    verdicts = (
        steady,
        Verdict(
            "trend",
            None,
            "trend in k with time: not judged — constant-head collections carry no times "
            "(k against gradient is judged instead)",
        ),
        independence,
        gradient_check(result.gradient_max, result.k_reference, criteria),
        reynolds_check(reynolds, criteria),
    )
    readings, factor, fitted = (), None, None
    levels, inverse = np.unique(heads, return_inverse=True)
    if levels.size >= 2:  # Type A from the head means: collections at a head share its reading
        counts = np.bincount(inverse)
        means = fit_through_origin(
            np.bincount(inverse, gradient) / counts, np.bincount(inverse, velocity) / counts
        )
        fitted = fit_quantity(
            "slope of v on i (head means)",
            means.slope_standard_error / abs(means.slope),
            levels.size - 1,
        )
    elif result.n >= 2:  # one head: the scatter of the collections, and the head reading
        scatter = float(np.std(k_each, ddof=1) / np.sqrt(result.n) / np.mean(k_each))
        fitted = fit_quantity("k of the collections", scatter, result.n - 1)
        head = float(heads[0])
        readings = (rectangular_quantity("head difference", head, resolutions.head_scale),)

        def factor(values):
            return head / values["head difference"]

    else:
        row = rows.iloc[0]
        weighed = pd.isna(row["volume"])
        collected = float(row["outflow_mass"] if weighed else row["volume"])
        step = resolutions.balance if weighed else resolutions.volume_scale
        duration, head = float(row["duration"]), float(row["head_difference"])
        readings = (
            rectangular_quantity("collected water", collected, step),
            rectangular_quantity("duration", duration, resolutions.timer),
            rectangular_quantity("head difference", head, resolutions.head_scale),
        )

        def factor(values):
            return (
                values["collected water"]
                / collected
                * duration
                / values["duration"]
                * head
                / values["head difference"]
            )

    interval = conductivity_interval(
        result.k_reference,
        diameter=float(specimen_row["diameter"]),
        flow_length=float(rows["flow_length"].mean()),
        resolutions=resolutions,
        fit=fitted,
        readings=readings,
        reading_factor=factor,
        temperature=result.temperature,
        reference_temperature=settings.reference_temperature,
        viscosity=settings.viscosity,
        method=settings.uncertainty_method,
        trials=settings.monte_carlo_trials,
        seed=settings.monte_carlo_seed,
    )
    notes = result.notes
    if result.fit is None:
        notes = tuple(n for n in notes if not n.startswith("one collection")) + (
            "one collection only: the interval comes from the reading resolutions alone",
        )
    method_notes = (
        f"k from the slope of v on i through the origin over {result.n} collection(s) at "
        f"gradients {result.gradient_min:.3g} to {result.gradient_max:.3g}",
    )
    return ConstantHeadAnalysis(
        specimen=specimen,
        result=result,
        line=line,
        interval=interval,
        k_each=k_each,
        gradient=gradient,
        velocity=velocity,
        reynolds=reynolds,
        verdicts=verdicts,
        notes=notes,
        method_notes=method_notes,
    )
