"""The flow through a specimen over its test: pore volumes of flow, k and outflow/inflow.

For every test that records flow — a falling-head test always does, through the fall of
its headwater; a constant-head test through its collections — :class:`FlowRecord` holds
the cumulative inflow and outflow, the cumulative flow in pore volumes, k at each step
against time and against pore volumes, and the ratio of outflow to inflow over each
interval where both were measured. The pore volume is that of the specimen as it stood
during permeation (after consolidation in a flexible-wall cell).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import pandas as pd

from kitchen.specimen import pore_volume

__all__ = ["FlowRecord", "spans_conductivity", "falling_head_flow", "constant_head_flow"]


@dataclass(frozen=True)
class FlowRecord:
    """One test's flow over its course.

    ``time`` [s], ``inflow`` and ``outflow`` [m3] (cumulative from the first reading; NaN
    where not measured; an inflow from the fall of the head, ``head_fall``, is formed when
    read, so a record of 10⁷ readings holds no array of it), ``pore_volumes`` (the
    cumulative flow through the specimen over the pore volume: the inflow of a falling-head
    test, the outflow collected in a constant-head one; formed when read) at each reading
    or collection; ``k_time`` [s],
    ``k`` [m/s] (at the reference temperature) and ``k_pore_volumes`` at each step;
    ``ratio_time`` [s] and ``ratio`` (outflow/inflow over each interval where both were
    measured; empty otherwise). ``void_volume`` [m3] is the specimen's pore volume;
    ``notes`` say how the flow was obtained.
    """

    specimen: str
    time: np.ndarray
    measured_inflow: np.ndarray | None
    """Cumulative inflow as measured (NaN where not); None where it is the fall of the head
    (``head_fall``)."""
    outflow: np.ndarray
    through: str
    """Which volume passed through the specimen: ``"inflow"`` or ``"outflow"``."""
    k_time: np.ndarray
    k: np.ndarray
    k_pore_volumes: np.ndarray
    ratio_time: np.ndarray
    ratio: np.ndarray
    void_volume: float
    notes: tuple[str, ...]
    head_fall: tuple[np.ndarray, float] | None = None
    """(heads [m], standpipe area [m2]) where the inflow is a·(h0 − h)."""

    @property
    def inflow(self) -> np.ndarray:
        """Cumulative inflow at each reading [m3]: as measured, or a·(h0 − h) (formed when
        read)."""
        if self.measured_inflow is not None:
            return self.measured_inflow
        head, area = self.head_fall
        return _fall_volume(head, area, slice(None))

    @property
    def pore_volumes(self) -> np.ndarray:
        """Cumulative flow through the specimen over its pore volume, at each reading. [-]"""
        return getattr(self, self.through) / self.void_volume

    @property
    def total_pore_volumes(self) -> float:
        """Pore volumes of flow over the whole record."""
        if self.through == "inflow" and self.measured_inflow is None:
            head, area = self.head_fall  # every head is finite: its last gives the total
            return float(_fall_volume(head, area, slice(-1, None))[0] / self.void_volume)
        flow = getattr(self, self.through)
        finite = np.isfinite(flow[::-1])  # the last finite value, no copy
        last = int(np.argmax(finite))
        if not (finite.size and finite[last]):
            return math.nan
        return float(flow[-1 - last] / self.void_volume)


def _fall_volume(head: np.ndarray, area: float, readings) -> np.ndarray:
    """a·(h0 − h) at `readings` (a slice or an array of positions): the volume that has
    left a standpipe of area `area` since the first reading. [m3]

    References
    ----------
    ASTM D5084 Methods B and C: the volume through the specimen from the burette's change
    of level (from memory).
    """
    volume = np.subtract(head[0], head[readings])
    volume *= area
    return volume


INTERPOLATION_BLOCK = 1 << 16
"""Points interpolated at a time in the fall of the head (:func:`_interpolated_fall`)."""


def _interpolated_fall(x: np.ndarray, time: np.ndarray, head: np.ndarray, area: float):
    """``numpy.interp(x, time, a·(h0 − h))`` for `x` within the readings' times, the same
    numbers, with the volume formed only at the two readings around each point: interp
    takes each value from the pair of readings that brackets it, and no other reading lies
    between the two, so the pairs alone give it the same pairs (a block of points at a
    time, so nothing the length of the record is formed, however the points are spaced)."""
    out = np.empty(x.size)
    last = time.size - 1
    for a in range(0, x.size, INTERPOLATION_BLOCK):
        part = x[a : a + INTERPOLATION_BLOCK]
        below = np.clip(np.searchsorted(time, part, "right") - 1, 0, last)
        used = np.unique(np.concatenate((below, np.minimum(below + 1, last))))
        out[a : a + part.size] = np.interp(part, time[used], _fall_volume(head, area, used))
    return out


def _void_volume(permeation_row: pd.Series) -> float:
    return float(
        pore_volume(
            float(permeation_row["dry_mass"]),
            float(permeation_row["specific_gravity"]),
            float(permeation_row["area"]) * float(permeation_row["height"]),
        )
    )


def _interval_ratio(time, inflow, outflow):
    """Outflow over inflow of each interval between successive readings with both."""
    both = np.isfinite(inflow) & np.isfinite(outflow)
    if both.sum() < 2:
        return np.empty(0), np.empty(0)
    t, q_in, q_out = time[both], inflow[both], outflow[both]
    d_in, d_out = np.diff(q_in), np.diff(q_out)
    usable = d_in > 0
    middle = (t[1:] + t[:-1]) / 2
    return middle[usable], d_out[usable] / d_in[usable]


def spans_conductivity(reference_time, head, time, scale, step):
    """k over successive spans of `step` readings of a falling-head record.

    Parameters
    ----------
    reference_time : numpy.ndarray
        Reference-equivalent time τ of each reading (elapsed time weighted by μ_ref/μ_T).
        [s]
    head : numpy.ndarray
        Head at each reading (corrected for capillary rise where the analysis did). [m]
    time : numpy.ndarray
        Elapsed time of each reading. [s]
    scale : float
        a·L/A, the effective standpipe area times the flow length over the area. [m]
    step : int
        Readings per span (counted from the first reading; the spans do not overlap).

    Returns
    -------
    time, k : numpy.ndarray
        The middle time of each span [s] and k over it at the reference temperature,
        k = (a·L/A)·ln(h_i/h_j)/(τ_j − τ_i). [m/s]

    References
    ----------
    ASTM D5084 Methods B and C, k from two readings (from memory); Das & Sobhan,
    *Principles of Geotechnical Engineering*, the falling-head test.

    Examples
    --------
    >>> import numpy as np
    >>> t = np.array([0.0, 100.0, 200.0])
    >>> h = 0.5 * np.exp(-1e-3 * t)
    >>> _, k = spans_conductivity(t, h, t, 0.01, 1)
    >>> [round(float(v), 12) for v in k]
    [1e-05, 1e-05]
    """
    ends = np.arange(0, len(head), step)
    if ends.size < 2:
        return np.empty(0), np.empty(0)
    first, last = ends[:-1], ends[1:]
    with np.errstate(divide="ignore", invalid="ignore"):
        k = (
            scale
            * np.log(head[first] / head[last])
            / (reference_time[last] - reference_time[first])
        )
    return (time[first] + time[last]) / 2, k


def falling_head_flow(analysis, record, permeation_row: pd.Series) -> FlowRecord:
    """The flow record of a falling-head test.

    Parameters
    ----------
    analysis : FallingHeadAnalysis
        The test's analysis (:meth:`kitchen.workspace.Workspace.falling_head`).
    record : FallingHeadRecord
        Its prepared readings (:meth:`kitchen.workspace.Workspace.falling_head_record`).
    permeation_row : pandas.Series
        The specimen as permeated (:func:`kitchen.reduction.permeation_state`).

    Returns
    -------
    FlowRecord
        Inflow as recorded, else the fall of the head times the standpipe area,
        Q = a·(h0 − h) (with a tailwater burette the effective area a_in·a_out/(a_in +
        a_out), the inflow when inflow and outflow are equal); k between successive
        spans of readings at the reference temperature (:func:`spans_conductivity`, the
        span the test's steady-values criterion uses), at the middle of each span.

    References
    ----------
    ASTM D5084 Methods B and C: the volume through the specimen from the burettes' change
    of level; pore volumes of flow, and k and outflow/inflow reported against time (from
    memory). Das & Sobhan, *Principles of Geotechnical Engineering*, the falling-head test.
    """
    time = np.asarray(analysis.time, dtype=float)
    head = np.asarray(analysis.head, dtype=float)
    notes = []
    measured_in = record.inflow is not None and np.isfinite(record.inflow).any()
    if measured_in:
        inflow = record.inflow - record.inflow[np.isfinite(record.inflow)][0]
        notes.append("inflow as recorded")
    else:  # a·(h0 − h), formed when read (FlowRecord.inflow)
        inflow = None
        notes.append("inflow from the fall of the head times the standpipe area, a·(h0 − h)")
    if record.outflow is not None and np.isfinite(record.outflow).any():
        outflow = record.outflow - record.outflow[np.isfinite(record.outflow)][0]
    else:  # NaN at every reading, without an array of the record's length (read-only)
        outflow = np.broadcast_to(np.nan, time.shape)
        notes.append("outflow not recorded")
    void = _void_volume(permeation_row)
    k_time, k = spans_conductivity(
        np.asarray(analysis.reference_time, dtype=float),
        np.asarray(analysis.corrected_head, dtype=float),
        time,
        record.scale,
        max(int(analysis.value_step), 1),
    )
    # pore volumes at the spans' middles, interpolated in the inflow (linear, like it)
    if not time.size:
        k_pore_volumes = k_time
    elif inflow is None:
        k_pore_volumes = _interpolated_fall(k_time, time, head, record.standpipe_area) / void
    else:
        k_pore_volumes = np.interp(k_time, time, inflow) / void
    ratio_time, ratio = (
        _interval_ratio(time, inflow, outflow) if measured_in else (np.empty(0), np.empty(0))
    )
    return FlowRecord(
        analysis.specimen,
        time,
        inflow,
        outflow,
        "inflow",
        k_time,
        k,
        k_pore_volumes,
        ratio_time,
        ratio,
        void,
        tuple(notes),
        None if measured_in else (head, record.standpipe_area),
    )


def constant_head_flow(collections: pd.DataFrame, permeation_row: pd.Series) -> FlowRecord:
    """The flow record of a constant-head test: its collections one after another.

    Parameters
    ----------
    collections : pandas.DataFrame
        The specimen's rows of :func:`kitchen.reduction.collection_table` (``duration``
        [s], ``flow_volume`` [m3], ``k_reference`` [m/s]), in the order collected.
    permeation_row : pandas.Series
        The specimen as permeated.

    Returns
    -------
    FlowRecord
        The time is the running sum of the durations; the outflow, the running sum of the
        volumes collected (the inflow is not measured, so no outflow/inflow ratio).

    References
    ----------
    ASTM D2434 and D5084 Method A: the volume collected in a timed interval (from memory).
    """
    time = np.cumsum(collections["duration"].to_numpy(float))
    outflow = np.cumsum(collections["flow_volume"].to_numpy(float))
    void = _void_volume(permeation_row)
    return FlowRecord(
        str(permeation_row["specimen"]),
        time,
        np.full(time.size, np.nan),
        outflow,
        "outflow",
        time,
        collections["k_reference"].to_numpy(float),
        outflow / void,
        np.empty(0),
        np.empty(0),
        void,
        ("outflow as collected; inflow not measured",),
    )
