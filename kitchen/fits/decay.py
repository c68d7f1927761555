"""The three-parameter exponential decay of a head record, fitted without start values.

:func:`fit_exponential_decay` fits ``h(t) = h_inf + (h0 - h_inf) exp(-(t - t[0]) / tau)``
by separable least squares and returns a :class:`DecayFit` with intervals, residuals and
a plain-language status. Pure numpy/scipy.

References
----------
.. [DS] Draper, N. R. & Smith, H. *Applied Regression Analysis*, 3rd ed., Wiley, 1998,
   ch. 24 (nonlinear least squares, linearised covariance). From memory.
.. [GP] Golub, G. H. & Pereyra, V. (1973). The differentiation of pseudo-inverses and nonlinear
   least squares problems whose variables separate. SIAM J. Numer. Anal. 10(2), 413-432.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
from scipy import optimize

from ._common import (
    DOT_BLOCK,
    MACHINE_EPSILON,
    blocked_dot,
    checked_confidence,
    finite_sum,
    paired_vectors,
    refuse_overflow,
    student_t_quantile,
)

__all__ = ["DecayFit", "fit_exponential_decay"]


# --------------------------------------------------------------------------- exponential decay
@dataclass(frozen=True)
class DecayFit:
    """Fit of ``h(t) = asymptote + (initial - asymptote) * exp(-(t - t[0]) / time_constant)``.

    Attributes
    ----------
    asymptote, asymptote_low, asymptote_high : float
        Final head h_inf and its interval (infinite on one side when the record cannot tell
        the decay from a straight line). [head unit]
    initial, initial_low, initial_high : float
        Fitted head h0 at the first reading time and its interval. [head unit]
    time_constant, time_constant_low, time_constant_high : float
        tau and its interval (upper end infinite when the rate interval reaches zero). [s]
    r_squared : float
        ``1 - sum(residuals**2) / sum((h - mean(h))**2)``. [-]
    residual_standard_deviation : float
        ``sqrt(sum(residuals**2) / (n - 3))``. [head unit]
    n : int
        Number of readings.
    confidence : float
        Confidence level of the intervals. [-]
    residuals : numpy.ndarray
        Observed minus fitted head in input order, read-only. [head unit]
    iterations : int
        Newton iterations on the full data (each one exponential per reading).
    converged : bool
        False, with the reason in `message`, when the record does not determine a decay; the
        numbers are then those of the best fit at the edge of the searched range and must not
        be reported as results.
    message : str
        Plain-language status.
    asymptote_standard_error, initial_standard_error, time_constant_standard_error : float
        Linearised standard errors. [head unit], [head unit], [s]
    start_time : float
        t[0], the time origin of the model. [s]

    Notes
    -----
    Intervals are two-sided Student-t intervals with n - 3 degrees of freedom from the
    linearised covariance ``s**2 (J^T J)^-1`` ([DS]_ ch. 24), widened for the asymptote as
    described in :func:`fit_exponential_decay`.
    """

    asymptote: float
    asymptote_low: float
    asymptote_high: float
    initial: float
    initial_low: float
    initial_high: float
    time_constant: float
    time_constant_low: float
    time_constant_high: float
    r_squared: float
    residual_standard_deviation: float
    n: int
    confidence: float
    residuals: np.ndarray = field(repr=False, compare=False)
    iterations: int
    converged: bool
    message: str
    asymptote_standard_error: float
    initial_standard_error: float
    time_constant_standard_error: float
    start_time: float

    def predict(self, t) -> np.ndarray:
        """Fitted head at times `t`. [head unit]"""
        fitted = np.subtract(np.asarray(t, dtype=np.float64), self.start_time)  # one new array
        np.negative(fitted, out=fitted)
        fitted /= self.time_constant
        np.exp(fitted, out=fitted)  # exp(-(t - t0)/tau)
        fitted *= self.initial - self.asymptote
        fitted += self.asymptote
        return fitted


@dataclass(frozen=True)
class _DecayTerms:
    """What one rate gives on the full data (:func:`_decay_terms`).

    ``a`` and ``b`` are the linear parameters of ``h - mean(h) = A + B g(k, u)`` at that rate;
    ``gauss_newton`` is J^T J and ``hessian`` the full Newton matrix, both in (A, B, rate);
    ``gradient`` is minus half the gradient of the sum of squares in (A, B, rate);
    ``sse_drop`` is how far the sum of squares lies below ``sum((h - mean(h))**2)``.
    """

    a: float
    b: float
    gauss_newton: np.ndarray
    hessian: np.ndarray
    gradient: np.ndarray
    sse_drop: float


@dataclass(frozen=True)
class _RateSolution:
    """Where the Newton iteration on the rate stopped (:func:`_polish_rate`).

    ``status`` is ``"done"``, ``"edge"``, ``"limit"`` or ``"failed"``; ``terms`` are those at
    ``rate``; ``step`` is the last Newton step in (A, B, rate), still to be applied (zeros
    unless the iteration converged on an exact Newton step).
    """

    status: str
    iterations: int
    rate: float
    terms: _DecayTerms
    step: np.ndarray


_RATE_LOW = 1e-4  # lowest rate searched, in 1/record span: time constants up to 1e4 spans


_STEP_DONE = 1e-5  # a Newton step smaller than this (relative) ends the iteration


_MAX_ITERATIONS = 30


def _decay_subsample(n, head=1024, body=3072):
    """Indices and weights of a subsample whose weighted sums approximate full-data sums.

    All of the first `head` readings, then a stride through the rest ending on the last reading;
    each sample stands for the readings up to the next one.
    """
    if n <= head + body:
        return np.arange(n), np.ones(n)
    stride = -(-(n - head) // body)
    index = np.concatenate([np.arange(head), np.arange(head, n, stride)])
    if index[-1] != n - 1:
        index = np.append(index, n - 1)
    return index, np.diff(np.append(index, n)).astype(np.float64)


def _profile_sse(rates, u, hc, w, chunk: int = 8):
    """Weighted residual sum of squares after the linear parameters, one per rate (rows).

    Rates are taken `chunk` at a time, so the working arrays are `chunk` rows of the
    subsample whatever the grid's length (each row's sums are its own: the same numbers).
    """
    rates = np.atleast_1d(rates)
    if rates.size > chunk:
        return np.concatenate(
            [
                _profile_sse(rates[i : i + chunk], u, hc, w, chunk)
                for i in range(0, rates.size, chunk)
            ]
        )
    g = -np.expm1(np.multiply.outer(-rates, u)) / rates[:, None]
    gc = g - (np.einsum("ij,j->i", g, w) / w.sum())[:, None]  # einsum: no BLAS threads
    var = np.einsum("ij,ij,j->i", gc, gc, w)
    slope = np.divide(np.einsum("ij,j->i", gc, w * hc), var, out=np.zeros_like(var), where=var > 0)
    r = hc - slope[:, None] * gc
    return np.einsum("ij,ij,j->i", r, r, w)


def _decay_block(rate, inverse, uu, work) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """g, dg/drate and d2g/drate2 of one block of readings at `rate`, in `work`'s arrays.

    `work` holds four scratch arrays at least as long as `uu`; the first three are filled
    with g = (1 - e)/rate, dg/drate = (u e - g)/rate and d2g/drate2 = -(u**2 e + 2 dg/drate)
    /rate, with e = exp(-rate u). Element by element, so a value does not depend on the
    block it is computed in.
    """
    m = uu.size
    g, gk, gkk, e = (row[:m] for row in work)
    np.multiply(uu, -rate, out=e)
    np.exp(e, out=e)
    np.subtract(1.0, e, out=g)
    g *= inverse  # g = (1 - e) / rate
    np.multiply(uu, e, out=e)  # e now holds u * exp(-rate u)
    np.subtract(e, g, out=gk)
    gk *= inverse  # dg/drate = (u e - g) / rate
    np.multiply(uu, e, out=gkk)
    gkk += gk
    gkk += gk
    gkk *= -inverse  # d2g/drate2 = -(u**2 e + 2 dg/drate) / rate
    return g, gk, gkk


class _ScaledTime:
    """u = (t − t[0]) / span, formed a block at a time where it is read: the same numbers
    as the whole array (element by element), without an array of the record's length."""

    def __init__(self, t: np.ndarray, inverse_span: float):
        self.t, self.origin, self.inverse = t, t[0], inverse_span
        self.size = t.size

    def __getitem__(self, index) -> np.ndarray:
        return (self.t[index] - self.origin) * self.inverse


def _scratch() -> list[np.ndarray]:
    """Four scratch arrays of one block (:func:`_decay_block`): the fit's working memory
    does not grow with the record."""
    return [np.empty(DOT_BLOCK) for _ in range(4)]


def _decay_terms(rate, u, hc, h_sum, work) -> _DecayTerms:
    """Linear parameters, Newton system and Gauss-Newton matrix at one rate (full data).

    The data are processed in blocks of :data:`DOT_BLOCK` readings (`work`, from
    :func:`_scratch`), so that each block's terms are summed while in cache and the
    working arrays stay a block long.
    """
    n = u.size
    inverse = 1.0 / rate
    sums = np.zeros(10)
    dot = np.dot
    for i in range(0, n, DOT_BLOCK):
        j = i + DOT_BLOCK
        hh = hc[i:j]
        g, gk, gkk = _decay_block(rate, inverse, u[i:j], work)
        sums += (
            g.sum(),
            gk.sum(),
            gkk.sum(),
            dot(g, g),
            dot(g, gk),
            dot(gk, gk),
            dot(g, gkk),
            dot(hh, g),
            dot(hh, gk),
            dot(hh, gkk),
        )
    sg, sk, skk2, sgg, sgk, skk, sgkk, shg, shk, shkk = sums.tolist()
    determinant = n * sgg - sg * sg
    b = (n * shg - h_sum * sg) / determinant if determinant > 0 else math.nan
    a = (h_sum - b * sg) / n
    rk = shk - a * sk - b * sgk
    rkk = shkk - a * skk2 - b * sgkk
    gauss_newton = np.array([[n, sg, b * sk], [sg, sgg, b * sgk], [b * sk, b * sgk, b * b * skk]])
    hessian = gauss_newton.copy()
    hessian[1, 2] = hessian[2, 1] = b * sgk - rk
    hessian[2, 2] = b * b * skk - b * rkk
    # minus half the gradient of sum(r**2) in (A, B, rate); the first two vanish up to rounding
    gradient = np.array([h_sum - n * a - b * sg, shg - a * sg - b * sgg, b * rk])
    sse_drop = 2 * a * h_sum + 2 * b * shg - n * a * a - 2 * a * b * sg - b * b * sgg
    return _DecayTerms(a, b, gauss_newton, hessian, gradient, sse_drop)


def _newton_step(hessian, gauss_newton, gradient):
    try:
        np.linalg.cholesky(hessian)
        return np.linalg.solve(hessian, gradient), True
    except np.linalg.LinAlgError:
        pass
    try:
        return np.linalg.solve(gauss_newton, gradient), False
    except np.linalg.LinAlgError:
        return np.zeros(3), False


def fit_exponential_decay(t, h, confidence=0.95) -> DecayFit:
    """Fit ``h(t) = h_inf + (h0 - h_inf) exp(-(t - t[0]) / tau)`` by least squares.

    No start values are needed: for a fixed rate 1/tau the model is linear in ``h0`` and
    ``h_inf``, so only the rate is searched (variable projection, [GP]_).

    Parameters
    ----------
    t : array_like
        Reading times, not decreasing, at least 4 readings and a positive span. [s]
    h : array_like
        Heads (or head differences) at those times. [m]
    confidence : float, default 0.95
        Two-sided confidence level of the intervals. [-]

    Returns
    -------
    DecayFit
        Asymptote h_inf [m], initial head h0 [m] and time constant tau [s] with intervals,
        R², residual standard deviation [m], residuals [m], iteration count and status.

    Raises
    ------
    ValueError
        Fewer than 4 readings, lengths differ, a value is not finite, times decrease or do not
        span a positive interval, or the heads are all equal.

    Notes
    -----
    Internally ``h = A + B g(k, u)`` with ``u = (t - t[0]) / span``, ``k = span / tau`` and
    ``g = (1 - exp(-k u)) / k``, a basis that stays well conditioned as tau grows; then
    ``h0 = A`` and ``h_inf = A + B / k``. The rate is located on a subsample (the first 1024
    readings and a weighted stride through the rest): a grid in log k from 1e-4 to 40 over the
    shortest sampling interval (in record spans), then a bounded scalar search between the best
    grid neighbours. Newton steps on the full data follow, each with one exponential per
    reading; the reduced step is the rate part of the full three-parameter Newton step taken
    where the linear parameters are optimal ([GP]_). Once a step is below 1e-5 of the rate it is
    applied with a second-order update of the residuals and iteration stops.

    The interval for tau is the t interval of the rate, mapped to tau; its upper end is infinite
    when the rate interval reaches zero (the record cannot tell the decay from a straight line).
    The asymptote's linearised interval is widened to include the asymptotes of the refitted
    model at both ends of the rate interval (first order in A and B, exact in 1/k), and is
    unbounded on one side when the rate interval reaches zero: the linearisation alone badly
    understates how little a nearly straight record says about h_inf. When the best rate lies
    at an end of the searched range, or the head settles within the first reading interval,
    the fit is reported with ``converged=False``.

    References
    ----------
    .. [1] Golub & Pereyra (1973), SIAM J. Numer. Anal. 10(2):413 ([GP]_).
    .. [2] Draper & Smith, ch. 24, linearised covariance of nonlinear least squares ([DS]_).
       From memory.
    """
    confidence = checked_confidence(confidence)
    t, h = paired_vectors(t, h, ("t", "h"), 4, "an exponential decay fit (three parameters)")
    n = t.size
    finite_sum(t, "t")
    h_mean = finite_sum(h, "h") / n
    steps = np.diff(t)
    if (steps < 0).any():
        i = int(np.flatnonzero(steps < 0)[0]) + 1
        raise ValueError(f"times must not decrease: t[{i}] = {t[i]} comes after {t[i - 1]}")
    distinct = np.count_nonzero(steps) + 1
    del steps
    if distinct < 3:
        raise ValueError(
            f"the readings are at {distinct} distinct time(s); a decay needs at least 3"
        )
    span = float(t[-1] - t[0])
    hc = h - h_mean
    with np.errstate(over="ignore", invalid="ignore"):
        shh = blocked_dot(hc, hc)
    refuse_overflow(shh, span)
    if not shh > n * (64.0 * MACHINE_EPSILON * h_mean) ** 2:
        raise ValueError(f"the head does not change (every value is {h[0]!r}); nothing decays")
    u = _ScaledTime(t, 1.0 / span)

    rate, rate_high, head_range = _locate_rate(u, h)
    work = _scratch()
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        solution = _polish_rate(rate, rate_high, u, hc, shh, work)
    rate = solution.rate

    # apply the last step; residuals updated to second order in the rate step, block by
    # block from g and its derivatives at the rate of the last terms (the same numbers)
    d_a, d_b, d_rate = (float(v) for v in solution.step)
    a, b, rate_final = solution.terms.a + d_a, solution.terms.b + d_b, rate + d_rate
    residuals = hc  # hc (formed here) becomes the residuals, in place
    residuals -= a
    coefficients = (b, b * d_rate, 0.5 * b * d_rate * d_rate)
    scratch = work[3]
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        for i in range(0, n, DOT_BLOCK):
            j = i + DOT_BLOCK
            rows = _decay_block(rate, 1.0 / rate, u[i:j], work)
            part = scratch[: min(j, n) - i]
            for coefficient, row in zip(coefficients, rows, strict=True):
                if coefficient:
                    np.multiply(row, coefficient, out=part)
                    residuals[i:j] -= part
    del work, scratch, u
    sse = blocked_dot(residuals, residuals)
    residuals.flags.writeable = False

    iterations = solution.iterations
    message = {
        "edge": _EDGE_MESSAGES["low" if rate <= _RATE_LOW else "high"],
        "limit": f"no convergence after {iterations} full-data iterations",
        "failed": "numerical failure: the normal equations became singular",
        "done": f"converged after {iterations} full-data Newton iteration(s)",
    }[solution.status]
    return _decay_result(
        initial=h_mean + a,
        b=b,
        rate=rate_final,
        span=span,
        start_time=float(t[0]),
        jtj=solution.terms.gauss_newton,
        sse=sse,
        shh=shh,
        n=n,
        confidence=confidence,
        residuals=residuals,
        iterations=iterations,
        converged=solution.status == "done",
        message=message,
        head_range=head_range,
        h=h,
        rate_high=rate_high,
    )


def _polish_rate(rate, rate_high, u, hc, shh, work) -> _RateSolution:
    """Safeguarded Newton iteration on the rate over the full data, from the subsample rate."""
    h_sum = float(hc.sum())
    iterations, best_sse, last_change = 0, math.inf, 0.0
    while True:
        iterations += 1
        terms = _decay_terms(rate, u, hc, h_sum, work)
        if not (
            math.isfinite(terms.a) and math.isfinite(terms.b) and np.isfinite(terms.hessian).all()
        ):
            return _RateSolution("failed", iterations, rate, terms, np.zeros(3))
        sse = shh - terms.sse_drop
        if sse > best_sse * (1 + 1e-9) + 1e-13 * shh and iterations < _MAX_ITERATIONS:
            last_change *= 0.5  # the last step raised the sum of squares: go back half of it
            rate -= last_change
            continue
        best_sse = sse
        step, exact = _newton_step(terms.hessian, terms.gauss_newton, terms.gradient)
        d_rate = float(step[2])
        if (rate <= _RATE_LOW and d_rate < 0) or (rate >= rate_high and d_rate > 0):
            return _RateSolution("edge", iterations, rate, terms, np.zeros(3))
        if abs(d_rate) <= (_STEP_DONE if exact else 1e-10) * rate:
            return _RateSolution("done", iterations, rate, terms, step if exact else np.zeros(3))
        if iterations >= _MAX_ITERATIONS:
            return _RateSolution("limit", iterations, rate, terms, np.zeros(3))
        new_rate = rate + max(-0.5 * rate, min(d_rate, rate))
        new_rate = min(max(new_rate, _RATE_LOW), rate_high)
        last_change, rate = new_rate - rate, new_rate


_EDGE_MESSAGES = {
    "low": (
        "no decay resolved: the record is as straight as a line (time constant beyond"
        f" {1 / _RATE_LOW:.0f} record spans) or bends away from an asymptote; the asymptote and"
        " time constant are undetermined - fit a straight line instead"
    ),
    "high": (
        "no decay resolved: the head reaches its final level within the first reading"
        " interval, so the time constant cannot be measured from these readings"
    ),
}


def _locate_rate(u, h):
    """Rate (1/record span) minimising the profiled sum of squares on a weighted subsample."""
    index, w = _decay_subsample(u.size)
    us, hs = u[index], h[index]
    hs = hs - np.dot(w, hs) / w.sum()
    gaps = np.diff(us)
    rate_high = max(40.0 / gaps[gaps > 0].min(), 100.0 * _RATE_LOW)  # exp(-40) ~ 4e-18
    grid = np.geomspace(_RATE_LOW, rate_high, int(5 * math.log10(rate_high / _RATE_LOW)) + 2)
    best = int(np.argmin(_profile_sse(grid, us, hs, w)))
    low, high = grid[max(best - 1, 0)], grid[min(best + 1, grid.size - 1)]
    found = optimize.minimize_scalar(
        lambda log_rate: _profile_sse(math.exp(log_rate), us, hs, w)[0],
        bounds=(math.log(low), math.log(high)),
        method="bounded",
        options={"xatol": 1e-5},
    )
    rate = min(max(math.exp(found.x), _RATE_LOW), rate_high)
    return rate, rate_high, float(np.ptp(hs))


def _decay_result(
    *,
    initial,
    b,
    rate,
    span,
    start_time,
    jtj,
    sse,
    shh,
    n,
    confidence,
    residuals,
    iterations,
    converged,
    message,
    head_range,
    h,
    rate_high,
):
    """Intervals from the linearised covariance and the DecayFit record.

    The model is ``h = initial + b g(rate, u)`` with ``u = (t - start_time) / span``; `jtj` is
    J^T J in (A, B, rate); `sse` and `shh` are the residual sum of squares and that of the
    heads about their mean; `head_range` is the range of the heads on the subsample and
    `rate_high` the upper end of the searched rates.
    """
    dof = n - 3
    s = math.sqrt(sse / dof)
    tq = student_t_quantile(confidence, dof)
    asymptote = initial + b / rate
    with np.errstate(all="ignore"):
        try:
            covariance = s * s * np.linalg.inv(jtj)
        except np.linalg.LinAlgError:
            covariance = np.full((3, 3), np.inf)
        gradient = np.array([1.0, 1.0 / rate, -b / rate**2])  # of the asymptote in (A, B, rate)
        se_initial = math.sqrt(max(covariance[0, 0], 0.0))
        se_asymptote = math.sqrt(max(float(gradient @ covariance @ gradient), 0.0))
        se_rate = math.sqrt(max(covariance[2, 2], 0.0))
        path = -np.linalg.solve(jtj[:2, :2], jtj[:2, 2])  # d(A, B)/d rate with the fit refitted
    rate_low, rate_up = rate - tq * se_rate, rate + tq * se_rate
    low, high = asymptote - tq * se_asymptote, asymptote + tq * se_asymptote
    # widen to the asymptotes implied along the profile by the ends of the rate interval
    for end in (rate_low, rate_up):
        if 0 < end < math.inf:
            implied = initial + path[0] * (end - rate) + (b + path[1] * (end - rate)) / end
            low, high = min(low, implied), max(high, implied)
        elif end <= 0 and b - path[1] * rate < 0:  # towards zero rate the asymptote runs to -inf
            low = -math.inf
        elif end <= 0:
            high = math.inf
    if rate > 0.35 * rate_high:  # exp(-rate * shortest interval) < 1e-6: only a final level
        converged, message = False, _EDGE_MESSAGES["high"]
    elif not all(math.isfinite(v) for v in (se_initial, se_asymptote, se_rate)):
        converged = False
        message = "the readings do not determine all three parameters (singular Jacobian)"
    elif converged and high - low > 10 * head_range and high - low > 10 * np.ptp(h):
        message += (
            "; the asymptote is poorly determined (its interval is wider than ten times the"
            " range of the heads): the record is nearly a straight line"
        )
    if not all(math.isfinite(float(v)) for v in (asymptote, initial, rate, s)):
        converged = False
        message = "numerical failure: the fit produced non-finite values; " + message
    return DecayFit(
        asymptote=float(asymptote),
        asymptote_low=float(low),
        asymptote_high=float(high),
        initial=float(initial),
        initial_low=float(initial - tq * se_initial),
        initial_high=float(initial + tq * se_initial),
        time_constant=span / rate,
        time_constant_low=span / rate_up,
        time_constant_high=span / rate_low if rate_low > 0 else math.inf,
        r_squared=1.0 - sse / shh,
        residual_standard_deviation=s,
        n=n,
        confidence=confidence,
        residuals=residuals,
        iterations=iterations,
        converged=converged,
        message=message,
        asymptote_standard_error=se_asymptote,
        initial_standard_error=se_initial,
        time_constant_standard_error=span * se_rate / rate**2,
        start_time=start_time,
    )
