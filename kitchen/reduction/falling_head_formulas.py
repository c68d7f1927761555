"""The falling-head equations in closed form: k from two readings, and what they need.

With the tailwater level constant, the head difference across the specimen decays as
ln h(t) = ln h0 − (k·A/(a·L))·t, so k = (a·L/(A·Δt))·ln(h1/h2)
(:func:`falling_head_conductivity`). With two burettes (rising tailwater, ASTM D5084
Method C) the standpipe area is replaced by a_in·a_out/(a_in + a_out)
(:func:`effective_standpipe_area`, :func:`rising_tailwater_conductivity`). Also here: the
elapsed time scaled to the reference temperature (:func:`reference_elapsed_time`), the
capillary rise in a standpipe by Jurin's law (:func:`jurin_capillary_rise`), k between
successive readings (:func:`incremental_conductivity`) and the readings between two times
(:func:`reading_window`).

References
----------
ASTM D5084, Methods B (falling head, constant tailwater) and C (falling head, rising
tailwater), calculation section (from memory for the clauses).
Das, B. M. and Sobhan, K., *Principles of Geotechnical Engineering*, chapter on
permeability, falling-head test equation k = (a·L/(A·t))·ln(h1/h2).
Head, K. H., *Manual of Soil Laboratory Testing*, Vol. 2, permeability tests: capillary
rise in standpipes (from memory).
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from kitchen.water import viscosity_ratio, water_density, water_surface_tension

__all__ = [
    "falling_head_conductivity",
    "effective_standpipe_area",
    "rising_tailwater_conductivity",
    "reference_elapsed_time",
    "jurin_capillary_rise",
    "incremental_conductivity",
    "reading_window",
]


STANDARD_GRAVITY = 9.80665
"""Standard acceleration of gravity (CGPM 1901). [m/s2]"""


def falling_head_conductivity(standpipe_area, flow_length, area, head_start, head_end, elapsed):
    """Conductivity from two readings of a falling-head test, constant tailwater.

    Parameters
    ----------
    standpipe_area : float or array_like
        Inside area of the standpipe. [m2]
    flow_length : float or array_like
        Specimen height (flow path length). [m]
    area : float or array_like
        Specimen cross-section area. [m2]
    head_start, head_end : float or array_like
        Head difference across the specimen at the two readings. [m]
    elapsed : float or array_like
        Time between the readings. [s]

    Returns
    -------
    float or array_like
        k = (a·L/(A·Δt))·ln(h1/h2) at the test temperature. [m/s]

    References
    ----------
    ASTM D5084 Method B (from memory for the clause); Das & Sobhan, *Principles of
    Geotechnical Engineering*, falling-head test equation.

    Examples
    --------
    Das, falling-head example (inputs confirmed, answer from memory: 2.27e-3 cm/s):
    L = 200 mm, A = 1000 mm², a = 40 mm², head 500 → 300 mm in 180 s.

    >>> k = falling_head_conductivity(40e-6, 0.200, 1000e-6, 0.500, 0.300, 180.0)
    >>> round(float(k) * 100, 5)  # cm/s
    0.00227
    """
    return standpipe_area * flow_length / (area * elapsed) * np.log(head_start / head_end)


def effective_standpipe_area(inflow_area, outflow_area=np.nan):
    """Standpipe area that makes the rising-tailwater case look like a single standpipe.

    Parameters
    ----------
    inflow_area : float or array_like
        Area of the headwater burette. [m2]
    outflow_area : float or array_like, optional
        Area of the tailwater burette; NaN (default) for a constant tailwater. [m2]

    Returns
    -------
    float or array_like
        a_in·a_out/(a_in + a_out), or a_in when there is no tailwater burette. [m2]

    References
    ----------
    ASTM D5084 Method C, rising tailwater: k = a_in·a_out·L/((a_in + a_out)·A·Δt)·
    ln(Δh1/Δh2) (from memory for the clause).
    """
    inflow = np.asarray(inflow_area, dtype=float)
    outflow = np.asarray(outflow_area, dtype=float)
    combined = np.where(np.isnan(outflow), inflow, inflow * outflow / (inflow + outflow))
    return float(combined) if combined.ndim == 0 else combined


def rising_tailwater_conductivity(
    inflow_area, outflow_area, flow_length, area, head_start, head_end, elapsed
):
    """Conductivity from two readings with a rising tailwater (two burettes).

    Parameters
    ----------
    inflow_area, outflow_area : float or array_like
        Areas of the headwater and tailwater burettes. [m2]
    flow_length : float or array_like
        Specimen height. [m]
    area : float or array_like
        Specimen cross-section area. [m2]
    head_start, head_end : float or array_like
        Head difference across the specimen at the two readings. [m]
    elapsed : float or array_like
        Time between the readings. [s]

    Returns
    -------
    float or array_like
        k = a_in·a_out·L/((a_in + a_out)·A·Δt)·ln(Δh1/Δh2). [m/s]

    References
    ----------
    ASTM D5084 Method C (from memory for the clause).
    """
    effective = effective_standpipe_area(inflow_area, outflow_area)
    return falling_head_conductivity(effective, flow_length, area, head_start, head_end, elapsed)


def per_distinct_value(
    values: np.ndarray, function, probe: int = 4096, few: int = 256, block: int = 1 << 16
):
    """``function(values)`` for an element-by-element `function`, evaluated once per
    distinct value when the values repeat (a logger's temperatures: a few dozen values,
    read to 0.01 °C, over 10⁶ readings), else on every value: the same numbers either way.

    Whether they repeat is judged on the first `probe` values (at most `few` distinct).
    The values are taken `block` at a time, so no array of codes as long as the record is
    formed beside the result.
    """
    if values.size > probe and np.unique(values[:probe]).size <= few:
        result = np.empty(values.size)
        for start in range(0, values.size, block):
            codes, distinct = pd.factorize(values[start : start + block])
            result[start : start + block] = np.asarray(function(distinct), dtype=float)[codes]
        return result
    return function(values)


def reference_elapsed_time(
    time, temperature, reference_temperature=20.0, viscosity="kestin", steps=None
):
    """Elapsed time scaled to the reference temperature, ∫ dt / R_T.

    Parameters
    ----------
    time : array_like
        Reading times. [s]
    temperature : array_like
        Temperature at each reading, no NaN. [degC]
    reference_temperature : float
        Reference temperature. [degC]
    viscosity : str
        Viscosity method for R_T.
    steps : numpy.ndarray, optional
        ``numpy.diff(time)``, where the caller has formed it already. [s]

    Returns
    -------
    numpy.ndarray
        τ_i = ∫ from t_0 to t_i of dt / R_T(t), by the trapezoid rule. [s]

    Notes
    -----
    Between readings d ln h/dt = −k_T(t)·A/(a·L) and k_T = k_ref/R_T(t), so ln h is a
    straight line in τ with slope −k_ref·A/(a·L) even when the temperature drifts. The
    standards correct each trial by its own temperature; this integral is the same
    correction applied reading by reading (the tool's own formulation, following from
    Darcy's law and the viscosity ratio of ASTM D5084).
    """
    time = np.asarray(time, dtype=float)
    inverse = per_distinct_value(
        np.asarray(temperature, dtype=float),
        lambda values: (
            1.0 / np.asarray(viscosity_ratio(values, reference_temperature, viscosity), dtype=float)
        ),
    )
    return cumulative_trapezoid(np.diff(time) if steps is None else steps, inverse)


def cumulative_trapezoid(steps: np.ndarray, values: np.ndarray, initial: float = 0.0) -> np.ndarray:
    """∫ values dt from the first reading to each, by the trapezoid rule.

    `steps` are the time steps between readings (``numpy.diff`` of the times; one fewer
    than `values`). Returns an array of the readings' length starting at `initial`: the
    numbers of ``cumsum(concatenate(([initial], steps * 0.5 * (values[1:] +
    values[:-1]))))`` to the last bit (halving is exact, so it may come last; with
    `initial` 0, ``0 + x`` is x), formed in the result itself: no other array of the
    record's length. A cumulative sum runs one value at a time, so an integral resumed
    from a value it reached, as `initial`, goes on with the numbers it would have given.

    References
    ----------
    The composite trapezoid rule (any numerical-analysis text, e.g. Press et al.,
    *Numerical Recipes*, 3rd ed., §4.1; from memory).
    """
    area = np.empty(values.size)
    area[0] = initial
    part = area[1:]
    np.add(values[1:], values[:-1], out=part)
    part *= steps
    part *= 0.5
    np.cumsum(area, out=area)
    return area


class TrapezoidArea:
    """∫ values dt from the first reading to any reading, by the trapezoid rule, without an
    array of the record's length.

    ``area(i)`` is the number ``cumulative_trapezoid(numpy.diff(time), values)[i]`` gives,
    to the last bit: the area is kept at every `every`-th reading, and the readings after
    one are summed again from it, one at a time in the same order (a cumulative sum runs
    one value at a time, so resuming it from a value it reached gives the numbers it would
    have given). A record of 10⁷ readings keeps 153 numbers rather than 76 MiB; a reading's
    area costs a sum of at most `every` terms (about 0.2 ms).

    References
    ----------
    The composite trapezoid rule (Press et al., *Numerical Recipes*, 3rd ed., §4.1; from
    memory), as :func:`cumulative_trapezoid`.
    """

    def __init__(self, time: np.ndarray, values: np.ndarray, every: int = 1 << 16):
        self.time, self.values, self.every = time, values, every
        n = values.size
        marks = np.empty((n - 1) // every + 1)  # the area at readings 0, every, 2·every, ...
        marks[0] = 0.0
        for block in range(marks.size - 1):  # each mark from the one before
            start = block * every
            marks[block + 1] = self._sums(marks[block], start, start + every)[-1]
        self._marks = marks

    def _sums(self, carry: float, start: int, stop: int) -> np.ndarray:
        """The area at readings ``start`` to ``stop``, from the area `carry` at ``start``."""
        readings = slice(start, stop + 1)
        return cumulative_trapezoid(np.diff(self.time[readings]), self.values[readings], carry)

    def area(self, index: int) -> float:
        """∫ values dt from the first reading to reading `index` (0 at the first)."""
        index = range(self.values.size)[index]  # a negative index counts from the end
        block, offset = divmod(index, self.every)
        start = block * self.every
        if offset == 0:
            return float(self._marks[block])
        return float(self._sums(self._marks[block], start, start + offset)[-1])


def jurin_capillary_rise(diameter, temperature=20.0):
    """Capillary rise of water in a clean glass standpipe, by Jurin's law.

    Parameters
    ----------
    diameter : float or array_like
        Inside diameter (bore) of the standpipe. [m]
    temperature : float or array_like
        Water temperature. [degC]

    Returns
    -------
    float or array_like
        hc = 4σ/(ρw·g·d), with a contact angle of zero (clean glass). [m]

    Notes
    -----
    The standpipe level stands hc above the pressure head, so the head across the
    specimen is the reading less hc; with a tailwater burette the two rises oppose, and
    equal burettes cancel.

    References
    ----------
    Jurin's law as given by Head, *Manual of Soil Laboratory Testing*, Vol. 2,
    permeability tests (from memory: about 3 mm in a 10 mm tube, 15 mm in a 2 mm tube).
    """
    rho = water_density(temperature)
    return 4.0 * water_surface_tension(temperature) / (rho * STANDARD_GRAVITY * diameter)


def spaced_conductivity(time, reference_time, log_head, scale, step, count=None):
    """k between readings ``step`` apart, counted back from the last reading.

    With ``count``, only the last ``count`` values (or as many as the readings allow).
    """
    values = (time.size - 1) // step
    if count is not None:
        values = min(values, count)
    index = (time.size - 1) - step * np.arange(values, -1, -1)
    k = scale * (log_head[index[:-1]] - log_head[index[1:]])
    k = k / (reference_time[index[1:]] - reference_time[index[:-1]])
    return 0.5 * (time[index[:-1]] + time[index[1:]]), k


def span_conductivity(time, reference_time, log_head, scale, step, count):
    """k from a least-squares line over each of the last spans of ``step`` reading intervals.

    Parameters
    ----------
    time, reference_time, log_head : numpy.ndarray
        Reading times [s], reference-equivalent times [s] and ln h [-] of the readings used,
        in time order.
    scale : float
        a·L/A, so that k = −scale · slope of ln h on the reference time. [m]
    step : int
        Reading intervals a span covers (``step + 1`` readings); consecutive spans share
        their boundary reading, as successive two-reading values share theirs. [-]
    count : int
        Spans, counted back from the last reading (fewer when the readings hold fewer). [-]

    Returns
    -------
    time : numpy.ndarray
        Middle time of each span, oldest first. [s]
    k : numpy.ndarray
        k_i = −scale·b_i, b_i the least-squares slope Σ(τ − τ̄)(y − ȳ)/Σ(τ − τ̄)² of
        y = ln h on τ over span i, at the reference temperature. [m/s]

    Notes
    -----
    With ``step = 1`` each span holds two readings and k_i is the two-reading value of
    :func:`falling_head_conductivity`, k = (a·L/(A·Δt))·ln(h1/h2).

    References
    ----------
    Das & Sobhan, *Principles of Geotechnical Engineering*, falling-head test: ln h falls
    linearly in time with slope −k·A/(a·L). Draper & Smith, *Applied Regression Analysis*,
    3rd ed., ch. 1, the least-squares slope (from memory).
    """
    values = min((time.size - 1) // step, count)
    ends = (time.size - 1) - step * np.arange(values, -1, -1)  # span boundaries, oldest first
    index = ends[:-1, None] + np.arange(step + 1)
    x = reference_time[index]
    y = log_head[index]
    x = x - x.mean(axis=1, keepdims=True)
    y = y - y.mean(axis=1, keepdims=True)
    k = -scale * np.einsum("ij,ij->i", x, y) / np.einsum("ij,ij->i", x, x)
    return 0.5 * (time[ends[:-1]] + time[ends[1:]]), k


def incremental_conductivity(
    time,
    head,
    standpipe_area,
    flow_length,
    area,
    temperature=None,
    reference_temperature=20.0,
    viscosity="kestin",
    step=1,
):
    """k between successive readings (or readings ``step`` apart) of a falling-head test.

    Parameters
    ----------
    time : array_like
        Reading times, increasing. [s]
    head : array_like
        Head difference at each reading. [m]
    standpipe_area : float
        Standpipe area (the effective one with a tailwater burette). [m2]
    flow_length : float
        Specimen height. [m]
    area : float
        Specimen area. [m2]
    temperature : array_like, optional
        Temperature at each reading; each value is then corrected to the reference
        temperature with the temperatures of its own readings. [degC]
    reference_temperature : float
        Reference temperature. [degC]
    viscosity : str
        Viscosity method of R_T.
    step : int
        Reading intervals per value, counted back from the last reading. [-]

    Returns
    -------
    time : numpy.ndarray
        Middle time of each value. [s]
    k : numpy.ndarray
        k_i = a·L/A · ln(h_i/h_j)/(τ_j − τ_i) with τ the reference-equivalent time (the
        elapsed time when no temperature is given). [m/s]

    References
    ----------
    ASTM D5084 Method B, applied to each pair of readings (from memory).
    """
    time = np.asarray(time, dtype=float)
    head = np.asarray(head, dtype=float)
    if not isinstance(step, (int, np.integer)) or not 1 <= step < time.size:
        raise ValueError(f"step must be a whole number from 1 to {time.size - 1}, got {step!r}")
    if temperature is None:
        reference_time = time - time[0]
    else:
        reference_time = reference_elapsed_time(time, temperature, reference_temperature, viscosity)
    scale = standpipe_area * flow_length / area
    return spaced_conductivity(time, reference_time, np.log(head), scale, int(step))


def reading_window(time, start_time=None, end_time=None) -> tuple[int, int]:
    """The reading window ``(start, stop)`` of the readings between two times.

    Parameters
    ----------
    time : array_like
        Reading times, increasing. [s]
    start_time, end_time : float, optional
        First and last times to keep (inclusive); the record's ends by default. [s]

    Returns
    -------
    (int, int)
        Positions of the first reading kept and one past the last, for
        :meth:`~kitchen.reduction.FallingHeadRecord.analyse`.
    """
    time = np.asarray(time, dtype=float)
    start = 0 if start_time is None else int(np.searchsorted(time, start_time, "left"))
    stop = time.size if end_time is None else int(np.searchsorted(time, end_time, "right"))
    if stop - start < 2:
        raise ValueError(
            f"fewer than two readings between {start_time} s and {end_time} s; a window needs two"
        )
    return start, stop
