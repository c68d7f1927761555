"""Conductivity across a series: trends with void ratio, density and water content; predictions.

Hydraulic conductivity k spans orders of magnitude and is roughly log-normal, so trends are
fitted to log10 k [log10 of m/s] and a series is summarised by its geometric mean. The
grading predictions (Hazen, Chapuis, Kozeny–Carman) are estimates to show beside measured
values, never measurements.

This module holds the trends and the geometric mean. The criterion and the verdicts against
it are in :mod:`kitchen.analysis.criterion`, the grading predictions in
:mod:`kitchen.analysis.grading`.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from kitchen.fits import LinearFit, fit_line, student_t_quantile

from ._checks import (
    checked_confidence,
    conductivity_values,
    finite_numbers,
    like_inputs,
    require_elements,
    require_same_length,
    shown_value,
)

__all__ = [
    "ConductivityTrend",
    "VoidRatioTrend",
    "GeometricMean",
    "fit_log_conductivity",
    "fit_log_conductivity_void_ratio",
    "geometric_mean_conductivity",
]


# --- trends ----------------------------------------------------------------------------------


@dataclass(frozen=True)
class ConductivityTrend:
    """A straight line of log10 k against a compaction-state variable x.

    Attributes
    ----------
    x_name : str
        What x is (for example ``"dry_density"``, ``"void_ratio"``).
    fit : LinearFit
        log10(k / (1 m/s)) = intercept + slope · x, with intervals (:mod:`kitchen.fits`).
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
        values = finite_numbers(x, self.x_name)
        return like_inputs(10.0 ** self.fit.predict(values), x)

    def band(self, x):
        """(k_low, k_high): confidence band of the fitted line at `x`. [m/s]"""
        values = finite_numbers(x, self.x_name)
        low, high = self.fit.band(values)
        return like_inputs(10.0 ** np.asarray(low), x), like_inputs(10.0 ** np.asarray(high), x)


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
    level = checked_confidence(confidence)
    values = finite_numbers(x, x_name)
    log_k = np.log10(conductivity_values(k))
    if values.ndim != 1 or log_k.ndim != 1:
        raise ValueError(f"{x_name}, k: expected one value per specimen (1-D)")
    require_same_length(**{x_name: values, "k": log_k})
    if values.size < 3:
        raise ValueError(
            f"a trend of log10 k on {x_name} needs at least 3 specimens; got {values.size}"
        )
    if np.ptp(values) == 0:
        raise ValueError(
            f"{x_name}: all specimens share one value ({shown_value(values[0])}); no trend to fit"
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
    require_elements(void_ratio, e, e > 0, "void_ratio", "a positive void ratio")
    if initial_void_ratio is None:
        e0 = float(e.max())
    else:
        given = finite_numbers(initial_void_ratio, "initial_void_ratio")
        if given.ndim != 0 or not given > 0:
            raise ValueError(
                "initial_void_ratio: expected one positive void ratio; "
                f"got {shown_value(initial_void_ratio)}"
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


# --- series summary -------------------------------------------------------------------------


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
    level = checked_confidence(confidence)
    log_k = np.log10(conductivity_values(k)).ravel()
    if log_k.size < 2:
        raise ValueError(
            f"k: a geometric mean with a spread needs at least 2 values; got {log_k.size}"
        )
    mean, sd = float(log_k.mean()), float(log_k.std(ddof=1))
    half = student_t_quantile(level, log_k.size - 1) * sd / np.sqrt(log_k.size)
    return GeometricMean(
        geometric_mean=10.0**mean,
        low=10.0 ** (mean - half),
        high=10.0 ** (mean + half),
        log10_mean=mean,
        log10_standard_deviation=sd,
        n=int(log_k.size),
        confidence=level,
    )
