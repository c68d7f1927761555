"""Conductivity across a series: trends with void ratio, density and water content; predictions.

Hydraulic conductivity k spans orders of magnitude and is roughly log-normal, so trends are
fitted to log10 k [log10 of m/s] and a series is summarised by its geometric mean. The
grading predictions (Hazen, Chapuis, Kozeny–Carman) are estimates to show beside measured
values, never measurements.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd
from scipy import stats

from kitchen.compaction import (
    _like,
    _numbers,
    _require,
    _require_columns,
    _row,
    _same_length,
    _show,
    _table_numbers,
)
from kitchen.fitting import LinearFit, fit_line

__all__ = [
    "MEETS",
    "DOES_NOT_MEET",
    "NOT_CONCLUSIVE",
    "ConductivityTrend",
    "VoidRatioTrend",
    "GeometricMean",
    "GradingPrediction",
    "fit_log_conductivity",
    "fit_log_conductivity_void_ratio",
    "geometric_mean_conductivity",
    "CRITERION_KINDS",
    "Criterion",
    "as_criterion",
    "classify_against_criterion",
    "hazen_conductivity",
    "chapuis_conductivity",
    "kozeny_carman_ratio",
    "grading_predictions",
]

MEETS = "meets"
DOES_NOT_MEET = "does not meet"
NOT_CONCLUSIVE = "not conclusive"

_POSITIVE_K = "a positive hydraulic conductivity in m/s"


def _confidence(confidence) -> float:
    if not isinstance(confidence, int | float) or not 0.0 < confidence < 1.0:
        raise ValueError(
            f"confidence: expected a fraction between 0 and 1 (0.95); got {confidence!r}"
        )
    return float(confidence)


def _conductivity(k, name="k") -> np.ndarray:
    values = _numbers(k, name)
    _require(k, values, values > 0, name, _POSITIVE_K)
    return values


# --- trends ----------------------------------------------------------------------------------


@dataclass(frozen=True)
class ConductivityTrend:
    """A straight line of log10 k against a compaction-state variable x.

    Attributes
    ----------
    x_name : str
        What x is (for example ``"dry_density"``, ``"void_ratio"``).
    fit : LinearFit
        log10(k / (1 m/s)) = intercept + slope · x, with intervals (:mod:`kitchen.fitting`).
    n : int
        Number of specimens.
    confidence : float
        Confidence level of the intervals and the band.
    """

    x_name: str
    fit: LinearFit
    n: int
    confidence: float

    def conductivity(self, x):
        """k on the fitted line at `x` (units of x as fitted). [m/s]"""
        values = _numbers(x, self.x_name)
        return _like(10.0 ** self.fit.predict(values), x)

    def band(self, x):
        """(k_low, k_high): confidence band of the fitted line at `x`. [m/s]"""
        values = _numbers(x, self.x_name)
        low, high = self.fit.band(values)
        return _like(10.0 ** np.asarray(low), x), _like(10.0 ** np.asarray(high), x)


@dataclass(frozen=True)
class VoidRatioTrend(ConductivityTrend):
    """The e–log k line of Tavenas et al. (1983): log10 k = a + e/Ck.

    Attributes
    ----------
    change_index : float
        Ck = 1/slope, the change in void ratio per tenfold change in k. [-]
    change_index_low, change_index_high : float
        Interval on Ck from the slope interval; ``change_index_high`` is infinite when the
        slope interval reaches zero or below (see ``message``). [-]
    initial_void_ratio : float
        e0 used in the comparison with Ck ≈ 0.5·e0. [-]
    change_index_rule : float
        0.5·e0, the rule of thumb of Tavenas et al. (1983). [-]
    message : str
        Empty when the slope interval is positive; otherwise a caution.
    """

    change_index: float
    change_index_low: float
    change_index_high: float
    initial_void_ratio: float
    change_index_rule: float
    message: str


def _trend_inputs(x, k, x_name: str, confidence):
    if not isinstance(x_name, str) or not x_name:
        raise ValueError(f"x_name: expected the name of x, such as 'dry_density'; got {x_name!r}")
    level = _confidence(confidence)
    values = _numbers(x, x_name)
    log_k = np.log10(_conductivity(k))
    if values.ndim != 1 or log_k.ndim != 1:
        raise ValueError(f"{x_name}, k: expected one value per specimen (1-D)")
    _same_length(**{x_name: values, "k": log_k})
    if values.size < 3:
        raise ValueError(
            f"a trend of log10 k on {x_name} needs at least 3 specimens; got {values.size}"
        )
    if np.ptp(values) == 0:
        raise ValueError(
            f"{x_name}: all specimens share one value ({_show(values[0])}); no trend to fit"
        )
    return values, log_k, level


def fit_log_conductivity(x, k, x_name: str, confidence=0.95) -> ConductivityTrend:
    """Fit log10 k against a compaction-state variable by least squares.

    Parameters
    ----------
    x : array_like or pandas.Series
        The variable: dry density [kg/m3], water content relative to optimum w − w_opt [-],
        or any other, in SI.
    k : array_like or pandas.Series
        Hydraulic conductivity of each specimen. [m/s]
    x_name : str
        Name of x, used in messages and kept on the result.
    confidence : float, default 0.95
        Confidence level of the intervals and band.

    Returns
    -------
    ConductivityTrend

    Notes
    -----
    Fitting log k treats k as log-normal (common practice, no source). For compacted clay,
    k falls steeply as the molding water content rises past optimum (Mitchell, Hooper &
    Campanella 1965): a single straight line across dry and wet of optimum can hide that.

    References
    ----------
    Mitchell, J. K., Hooper, D. R. and Campanella, R. G. (1965). Permeability of compacted
    clay. Journal of the Soil Mechanics and Foundations Division 91(SM4), 41–65 (pages
    from memory).
    """
    values, log_k, level = _trend_inputs(x, k, x_name, confidence)
    fit = fit_line(values, log_k, confidence=level)
    return ConductivityTrend(x_name=x_name, fit=fit, n=int(values.size), confidence=level)


def fit_log_conductivity_void_ratio(
    void_ratio, k, initial_void_ratio=None, confidence=0.95
) -> VoidRatioTrend:
    """Fit the linear e–log k relation of Tavenas et al. (1983).

    Parameters
    ----------
    void_ratio : array_like or pandas.Series
        Void ratio of each specimen. [-]
    k : array_like or pandas.Series
        Hydraulic conductivity of each specimen. [m/s]
    initial_void_ratio : float, optional
        e0 for the comparison with Ck ≈ 0.5·e0; the largest void ratio tested when omitted. [-]
    confidence : float, default 0.95
        Confidence level of the intervals and band.

    Returns
    -------
    VoidRatioTrend
        log10 k = a + e/Ck: the fit, Ck = 1/slope with its interval (1/slope_high,
        1/slope_low), and the rule of thumb 0.5·e0.

    Notes
    -----
    Tavenas et al. write log k = log k0 − (e0 − e)/Ck and found Ck ≈ 0.5·e0 for natural
    soft clays; compacted soils need not follow it, and the comparison is for orientation.

    References
    ----------
    Tavenas, F., Jean, P., Leblond, P. and Leroueil, S. (1983). The permeability of natural
    soft clays. Part II: Permeability characteristics. Canadian Geotechnical Journal 20(4),
    645–660 (title and pages from memory).
    """
    e, log_k, level = _trend_inputs(void_ratio, k, "void_ratio", confidence)
    _require(void_ratio, e, e > 0, "void_ratio", "a positive void ratio")
    if initial_void_ratio is None:
        e0 = float(e.max())
    else:
        given = _numbers(initial_void_ratio, "initial_void_ratio")
        if given.ndim != 0 or not given > 0:
            raise ValueError(
                "initial_void_ratio: expected one positive void ratio; "
                f"got {_show(initial_void_ratio)}"
            )
        e0 = float(given)
    fit = fit_line(e, log_k, confidence=level)
    slope, low, high = float(fit.slope), float(fit.slope_low), float(fit.slope_high)
    message = ""
    if low > 0:
        ck_low, ck_high = 1.0 / high, 1.0 / low
    else:
        ck_low = 1.0 / high if high > 0 else -np.inf
        ck_high = np.inf
        message = (
            f"the {100 * level:g} % interval of the slope ({low:.3g} to {high:.3g}) reaches "
            "zero or below: k does not rise clearly with void ratio, and Ck is not bounded"
        )
    return VoidRatioTrend(
        x_name="void_ratio",
        fit=fit,
        n=int(e.size),
        confidence=level,
        change_index=1.0 / slope if slope != 0 else np.inf,
        change_index_low=ck_low,
        change_index_high=ck_high,
        initial_void_ratio=e0,
        change_index_rule=0.5 * e0,
        message=message,
    )


# --- series summary and verdicts -------------------------------------------------------------


@dataclass(frozen=True)
class GeometricMean:
    """Geometric mean of a set of conductivities, with the spread of log10 k.

    Attributes
    ----------
    geometric_mean : float
        10 ** mean(log10 k). [m/s]
    low, high : float
        Interval on the geometric mean: 10 ** (mean ± t·s/√n), Student t on log10 k. [m/s]
    log10_mean : float
        Mean of log10(k / (1 m/s)).
    log10_standard_deviation : float
        Sample standard deviation of log10 k (n − 1).
    n : int
    confidence : float
    """

    geometric_mean: float
    low: float
    high: float
    log10_mean: float
    log10_standard_deviation: float
    n: int
    confidence: float


def geometric_mean_conductivity(k, confidence=0.95) -> GeometricMean:
    """Summarise a set of conductivities by their geometric mean.

    Parameters
    ----------
    k : array_like or pandas.Series
        Hydraulic conductivities, at least two. [m/s]
    confidence : float, default 0.95
        Confidence level of the interval on the geometric mean.

    Returns
    -------
    GeometricMean

    References
    ----------
    Common practice (no source): k is roughly log-normal, so the mean of log10 k and a
    Student-t interval on it summarise a series.
    """
    level = _confidence(confidence)
    log_k = np.log10(_conductivity(k)).ravel()
    if log_k.size < 2:
        raise ValueError(
            f"k: a geometric mean with a spread needs at least 2 values; got {log_k.size}"
        )
    mean, sd = float(log_k.mean()), float(log_k.std(ddof=1))
    half = stats.t.ppf(0.5 + level / 2, log_k.size - 1) * sd / np.sqrt(log_k.size)
    return GeometricMean(
        geometric_mean=10.0**mean,
        low=10.0 ** (mean - half),
        high=10.0 ** (mean + half),
        log10_mean=mean,
        log10_standard_deviation=sd,
        n=int(log_k.size),
        confidence=level,
    )


CRITERION_KINDS = ("maximum", "minimum")


class Criterion(float):
    """A limit on k from the project specification, in m/s, that knows its direction.

    A float (its value is the limit, so it multiplies, compares and formats as one) with a
    ``kind``: ``"maximum"``, the largest k allowed (a liner, a cut-off: k ≤ limit), or
    ``"minimum"``, the smallest k required (a drainage layer, a filter: k ≥ limit). A
    plain float given where a criterion is expected is a maximum.

    Examples
    --------
    >>> c = Criterion(1e-4, "minimum")
    >>> c.symbol, float(c) * 100
    ('≥', 0.01)
    """

    kind: str

    def __new__(cls, limit, kind: str = "maximum"):
        if kind not in CRITERION_KINDS:
            raise ValueError(
                f"criterion kind {kind!r}: expected 'maximum' (largest k allowed) or "
                "'minimum' (smallest k required)"
            )
        value = super().__new__(cls, limit)
        value.kind = kind
        return value

    def __reduce__(self):
        return (Criterion, (float(self), self.kind))

    def __repr__(self) -> str:
        return f"Criterion({float(self)!r}, {self.kind!r})"

    @property
    def symbol(self) -> str:
        """``≤`` for a maximum, ``≥`` for a minimum."""
        return "≤" if self.kind == "maximum" else "≥"

    @property
    def words(self) -> str:
        """The criterion's role in words: ``largest k allowed`` or ``smallest k required``."""
        return "largest k allowed" if self.kind == "maximum" else "smallest k required"


def as_criterion(value, kind: str | None = None) -> Criterion:
    """`value` as a :class:`Criterion`: a Criterion as it is (or with `kind`), a number as a
    limit of `kind` (default a maximum). The limit must be a positive conductivity.
    """
    if isinstance(value, Criterion) and kind is None:
        limit, kind = float(value), value.kind
    else:
        limit = _conductivity(value, "maximum" if (kind or "maximum") == "maximum" else kind)
        if np.ndim(limit) != 0:
            raise ValueError(f"criterion: expected one criterion value in m/s; got {value!r:.60}")
        limit = float(limit)
    return Criterion(limit, kind or "maximum")


def classify_against_criterion(k, k_low, k_high, criterion):
    """Compare each conductivity and its interval with the criterion of the specification.

    Parameters
    ----------
    k, k_low, k_high : float, array_like or pandas.Series
        Conductivity and the low and high ends of its interval, k_low ≤ k ≤ k_high. [m/s]
    criterion : float or Criterion
        The largest conductivity allowed (a number, or a ``Criterion`` of kind
        ``"maximum"``), or the smallest required (a ``Criterion`` of kind ``"minimum"``),
        from the project specification. [m/s]

    Returns
    -------
    str, numpy.ndarray of str or pandas.Series
        Against a maximum: ``"meets"`` where k_high ≤ maximum, ``"does not meet"`` where
        k_low > maximum. Against a minimum: ``"meets"`` where k_low ≥ minimum, ``"does not
        meet"`` where k_high < minimum. ``"not conclusive"`` where the interval straddles
        the criterion.

    Notes
    -----
    The criterion is an input: 1×10⁻⁹ m/s is common for compacted clay liners (US 40 CFR
    258.40; EU Directive 1999/31/EC, Annex I), and drainage layers are specified by a
    smallest k (1×10⁻⁴ m/s is often met in landfill leachate collection layers, from
    memory), but the governing value comes from local codes and the project
    specification. An interval that straddles the criterion is reported as such rather
    than decided on the central value (the tool's own rule).

    References
    ----------
    US 40 CFR 258.40 (design criteria for municipal solid waste landfills: compacted soil
    liner of k ≤ 1×10⁻⁷ cm/s); Council Directive 1999/31/EC on the landfill of waste,
    Annex I (geological barrier k ≤ 1×10⁻⁹ m/s).
    """
    values = _conductivity(k, "k")
    low, high = _conductivity(k_low, "k_low"), _conductivity(k_high, "k_high")
    if np.ndim(criterion) != 0:
        raise ValueError(f"maximum: expected one criterion value in m/s; got {criterion!r:.60}")
    limit = as_criterion(criterion)
    _same_length(k=values, k_low=low, k_high=high)
    _require(k_low, low, low <= values, "k_low", "the low end of the interval, k_low ≤ k")
    _require(k_high, high, high >= values, "k_high", "the high end of the interval, k_high ≥ k")
    if limit.kind == "maximum":
        meets, fails = high <= limit, low > limit
    else:
        meets, fails = low >= limit, high < limit
    verdict = np.where(meets, MEETS, np.where(fails, DOES_NOT_MEET, NOT_CONCLUSIVE))
    return _like(verdict.astype(object), k, k_low, k_high)


# --- predictions from grading ----------------------------------------------------------------

_HAZEN_D10_RANGE = (0.1e-3, 3.0e-3)  # [m]
_CHAPUIS_D10_RANGE = (0.13e-3, 1.98e-3)  # [m]
_CHAPUIS_VOID_RATIO_RANGE = (0.4, 1.5)


@dataclass(frozen=True)
class GradingPrediction:
    """A conductivity predicted from grading, with whether the inputs are in the method's range.

    Attributes
    ----------
    conductivity : float, numpy.ndarray or pandas.Series
        Predicted k, in the kind of the inputs. [m/s]
    within_range : bool, numpy.ndarray of bool or pandas.Series
        True where the inputs lie inside the range the method was established for.
    method : str
        The method's name.
    validity : str
        The range of validity, in words.
    """

    conductivity: object
    within_range: object
    method: str
    validity: str


def _d10(d10) -> np.ndarray:
    values = _numbers(d10, "d10")
    _require(
        d10,
        values,
        values > 0,
        "d10",
        "a positive effective grain size d10 in m (0.2 mm is 0.0002)",
    )
    return values


def _void_ratio(void_ratio, name="void_ratio") -> np.ndarray:
    values = _numbers(void_ratio, name)
    _require(void_ratio, values, values > 0, name, "a positive void ratio")
    return values


def hazen_conductivity(d10, coefficient=100.0) -> GradingPrediction:
    """Hazen's estimate of the conductivity of a clean, uniform sand, k = C·d10².

    Parameters
    ----------
    d10 : float, array_like or pandas.Series
        Effective grain size, the size 10 % by mass is finer than. [m]
    coefficient : float, default 100.0
        Hazen's C with k in cm/s and d10 in cm (about 100; 1 to 1.5 with d10 in mm).
        [cm⁻¹·s⁻¹, i.e. (cm/s)/cm²]

    Returns
    -------
    GradingPrediction
        k = C·d10² converted to SI: k [m/s] = 0.01 · C · (100 · d10 [m])² = 100·C·d10².
        ``within_range`` is True for 0.1 mm ≤ d10 ≤ 3 mm.

    Notes
    -----
    Meant for clean, uniform sands (uniformity coefficient below about 5, from memory);
    the grading's uniformity is not checked here. A prediction, not a measurement.

    References
    ----------
    Hazen, A. (1892), as given in Das, B. M. and Sobhan, K., *Principles of Geotechnical
    Engineering*, permeability chapter, Hazen's equation (from memory); the range
    0.1–3 mm of d10 as quoted there and by Carrier, W. D. (2003), J. Geotech. Geoenviron.
    Eng. 129(11), 1054–1056 (from memory).
    """
    values = _d10(d10)
    c = _numbers(coefficient, "coefficient")
    if c.ndim != 0 or not c > 0:
        raise ValueError(
            "coefficient: expected one positive Hazen coefficient (about 100); "
            f"got {_show(coefficient)}"
        )
    k = 100.0 * float(c) * values**2
    inside = (values >= _HAZEN_D10_RANGE[0]) & (values <= _HAZEN_D10_RANGE[1])
    return GradingPrediction(
        conductivity=_like(k, d10),
        within_range=_like(inside, d10),
        method="Hazen (1892)",
        validity="clean uniform sand, 0.1 mm ≤ d10 ≤ 3 mm",
    )


def chapuis_conductivity(d10, void_ratio) -> GradingPrediction:
    """Chapuis's (2004) prediction for natural sands and gravels from d10 and void ratio.

    Parameters
    ----------
    d10 : float, array_like or pandas.Series
        Effective grain size. [m]
    void_ratio : float, array_like or pandas.Series
        Void ratio. [-]

    Returns
    -------
    GradingPrediction
        k [cm/s] = 2.4622 · (d10² · e³/(1 + e))^0.7825 with d10 in mm, returned in m/s.
        ``within_range`` is True for 0.13 mm ≤ d10 ≤ 1.98 mm and 0.4 ≤ e ≤ 1.5.

    Notes
    -----
    Established for homogeneous natural sands and gravels, without plastic fines. A
    prediction, not a measurement.

    References
    ----------
    Chapuis, R. P. (2004). Predicting the saturated hydraulic conductivity of sand and
    gravel using effective diameter and void ratio. Canadian Geotechnical Journal 41(5),
    787–795 (coefficients and range from memory).
    """
    d = _d10(d10)
    e = _void_ratio(void_ratio)
    _same_length(d10=d, void_ratio=e)
    d_mm = 1000.0 * d
    k_cm = 2.4622 * (d_mm**2 * e**3 / (1.0 + e)) ** 0.7825
    inside = (
        (d >= _CHAPUIS_D10_RANGE[0])
        & (d <= _CHAPUIS_D10_RANGE[1])
        & (e >= _CHAPUIS_VOID_RATIO_RANGE[0])
        & (e <= _CHAPUIS_VOID_RATIO_RANGE[1])
    )
    return GradingPrediction(
        conductivity=_like(0.01 * k_cm, d10, void_ratio),
        within_range=_like(inside, d10, void_ratio),
        method="Chapuis (2004)",
        validity="natural sand and gravel, 0.13 mm ≤ d10 ≤ 1.98 mm, 0.4 ≤ e ≤ 1.5",
    )


def kozeny_carman_ratio(e_from, e_to):
    """Ratio k(e_to)/k(e_from) for one sand at two void ratios, k ∝ e³/(1 + e).

    Parameters
    ----------
    e_from : float, array_like or pandas.Series
        Void ratio at which k is known. [-]
    e_to : float, array_like or pandas.Series
        Void ratio at which k is wanted. [-]

    Returns
    -------
    float, numpy.ndarray or pandas.Series
        [e_to³/(1 + e_to)] / [e_from³/(1 + e_from)]; multiply a known k by it. [-]

    Notes
    -----
    The proportionality holds for one sand whose grains and fabric stay the same; it is a
    prediction, not a measurement.

    References
    ----------
    Taylor, D. W. (1948). *Fundamentals of Soil Mechanics*, Wiley, permeability chapter
    (from memory); as given in Das, B. M. and Sobhan, K., *Principles of Geotechnical
    Engineering*, permeability chapter (from memory).
    """
    a = _void_ratio(e_from, "e_from")
    b = _void_ratio(e_to, "e_to")
    _same_length(e_from=a, e_to=b)
    return _like((b**3 / (1.0 + b)) / (a**3 / (1.0 + a)), e_from, e_to)


def grading_predictions(table: pd.DataFrame) -> pd.DataFrame:
    """Hazen and Chapuis predictions for each specimen of a table.

    Parameters
    ----------
    table : pandas.DataFrame
        Columns ``specimen``, ``d10`` [m] (NaN when not given) and ``void_ratio`` [-];
        ``source_row`` names rows in messages when present.

    Returns
    -------
    pandas.DataFrame
        A new frame, same index: ``specimen``, ``d10`` [m], ``void_ratio`` [-],
        ``hazen_k`` [m/s], ``hazen_within_range``, ``chapuis_k`` [m/s],
        ``chapuis_within_range`` and ``note`` (in words: predictions, not measurements;
        which inputs lie outside a method's range; why a value is missing). Rows without a
        d10 (or, for Chapuis, a void ratio) get no prediction, said so in ``note``.

    References
    ----------
    See :func:`hazen_conductivity` and :func:`chapuis_conductivity`.
    """
    _require_columns(table, ("specimen", "d10", "void_ratio"), "grading table")
    d10 = pd.Series(_table_numbers(table, "d10", allow_missing=True), index=table.index)
    e = pd.Series(_table_numbers(table, "void_ratio", allow_missing=True), index=table.index)
    for values, column, expected in (
        (d10, "d10", "a positive d10 in m (0.2 mm is 0.0002)"),
        (e, "void_ratio", "a positive void ratio"),
    ):
        bad = values <= 0
        if bad.any():
            rows = "; ".join(f"{_row(table, i)}: {_show(values[i])}" for i in table.index[bad][:5])
            raise ValueError(f"column {column!r}: expected {expected}; {rows}")
    hazen_k = pd.Series(np.nan, index=table.index)
    chapuis_k = pd.Series(np.nan, index=table.index)
    hazen_ok = pd.Series(False, index=table.index)
    chapuis_ok = pd.Series(False, index=table.index)
    has_d10, has_both = d10.notna(), d10.notna() & e.notna()
    if has_d10.any():
        hazen = hazen_conductivity(d10[has_d10])
        hazen_k[has_d10], hazen_ok[has_d10] = hazen.conductivity, hazen.within_range
    if has_both.any():
        chapuis = chapuis_conductivity(d10[has_both], e[has_both])
        chapuis_k[has_both], chapuis_ok[has_both] = chapuis.conductivity, chapuis.within_range
    notes = []
    for i in table.index:
        if not has_d10[i]:
            notes.append("d10 not given: no prediction from grading")
            continue
        parts = ["predictions from grading, not measurements"]
        if not hazen_ok[i]:
            parts.append(f"Hazen: d10 = {1000 * d10[i]:.3g} mm is outside 0.1–3 mm")
        if not has_both[i]:
            parts.append("void ratio not given: no Chapuis prediction")
        elif not chapuis_ok[i]:
            parts.append(
                f"Chapuis: d10 = {1000 * d10[i]:.3g} mm, e = {e[i]:.3g} is outside "
                "0.13–1.98 mm, 0.4–1.5"
            )
        notes.append("; ".join(parts))
    return pd.DataFrame(
        {
            "specimen": table["specimen"],
            "d10": d10,
            "void_ratio": e,
            "hazen_k": hazen_k,
            "hazen_within_range": hazen_ok,
            "chapuis_k": chapuis_k,
            "chapuis_within_range": chapuis_ok,
            "note": notes,
        },
        index=table.index,
    )
