"""The memo style of the figures, and what every figure builder shares.

The look: a serif face, a dark ink, muted greys, and four verdict colours that are never
the only cue (compactive effort is told by marker shape and line dash, the verdict by
marker fill: solid for meets, open for does not meet, open with a dot for not conclusive,
a pale face in a dark outline for a test not judged, each telling apart in greyscale).
Here are the colours, marker shapes and dashes, the plotly template (:func:`memo_template`),
min/max decimation of long records (:func:`decimation_indices`, and of any window of one,
:class:`WindowDecimation`) and the caption in a
figure's margin (:func:`captioned_dict`, :func:`add_caption`).
"""

from __future__ import annotations

import re
import textwrap
from functools import lru_cache

import numpy as np
import plotly.graph_objects as go

from kitchen.analysis import DOES_NOT_MEET, MEETS, NO_CRITERION, NOT_CONCLUSIVE, NOT_JUDGED

__all__ = [
    "EFFORT_DASHES",
    "EFFORT_SYMBOLS",
    "FONT",
    "GRID",
    "HEIGHT",
    "INK",
    "MAX_TRACE_POINTS",
    "MUTED",
    "NO_EFFORT",
    "SATURATION_DASHES",
    "OPTIMUM_DASH",
    "DRAWN_ZONE_DASH",
    "FITTED_ZONE_DASH",
    "CRITERION_DASH",
    "LINE_CODES",
    "VERDICT_COLOURS",
    "VERDICT_FACE",
    "VERDICT_FILL",
    "WIDTH",
    "ZONE",
    "add_caption",
    "captioned_dict",
    "label_specimens",
    "decimation_indices",
    "memo_template",
    "cached_memo_template",
    "PLOT_WIDTH",
    "WindowDecimation",
]


MAX_TRACE_POINTS = 10_000
"""No trace carries more points than this; longer records are decimated."""

FONT = "'DejaVu Serif', 'Liberation Serif', Georgia, serif"
INK = "#1d2731"
MUTED = "#69737d"
GRID = "#e4e7ea"
ZONE = "#2e6b57"
VERDICT_COLOURS = {
    MEETS: "#2e6b57",
    DOES_NOT_MEET: "#a33b20",
    NOT_CONCLUSIVE: "#a87a12",
    NOT_JUDGED: "#4a5d7e",
    NO_CRITERION: "#3d4650",
}
"""The colour of each verdict: its marker's outline and its error bar. A valid test with no
criterion to be judged against is drawn solid in a dark grey, a test not judged pale: with
no criterion the markers tell validity only."""
VERDICT_FILL = {
    MEETS: "",
    DOES_NOT_MEET: "-open",
    NOT_CONCLUSIVE: "-open-dot",
    NOT_JUDGED: "",
    NO_CRITERION: "",
}
"""The suffix each verdict adds to its effort's marker symbol."""
VERDICT_FACE = {**VERDICT_COLOURS, NOT_JUDGED: "#c9d0da"}
"""The colour inside each verdict's marker (for an open symbol, plotly draws its outline
in it): the verdict colour, but a pale face for a test not judged, so that it reads as a
half-tone between the solid marker that meets and the open one that does not."""
EFFORT_SYMBOLS = ("circle", "square", "diamond", "triangle-up", "triangle-down", "pentagon")
EFFORT_DASHES = ("solid", "dash", "20px,5px", "32px,8px", "20px,5px,8px,5px", "44px,10px")
"""Line codes of the compaction curves, one an effort: solid or dashes alone, every piece at
least 8 px, so none is read as a dotted saturation line or a dotted zone border."""
SATURATION_DASHES = {1.0: "dot", 0.9: "3px,7px", 0.8: "3px,12px"}
"""Line codes of the saturation lines: dots alone, further apart as S falls (each line is
also named at its end)."""
OPTIMUM_DASH = "longdashdot"
"""The line of optimums: a long dash and one dot."""
DRAWN_ZONE_DASH = "12px,4px,3px,4px,3px,4px"
"""The border of the drawn acceptable zone: a dash and two dots."""
FITTED_ZONE_DASH = "3px,3px,3px,3px,3px,3px,12px,4px"
"""The fitted zone's border, its extent and its criterion line: three dots and a dash."""
CRITERION_DASH = "longdash"
"""The criterion line on the log-k axes, where no compaction curve is drawn."""
LINE_CODES = {
    "saturation": tuple(SATURATION_DASHES.values()),
    "effort": EFFORT_DASHES,
    "optimums": (OPTIMUM_DASH,),
    "drawn zone": (DRAWN_ZONE_DASH,),
    "fitted zone": (FITTED_ZONE_DASH,),
}
"""The line codes of each family of lines on the compaction plane: no code is used by two
families, so the lines read apart in greyscale print."""
NO_EFFORT = "no effort given"
WIDTH, HEIGHT = 980, 620
MARGIN = dict(l=80, r=20, t=80, b=70)
"""The template's margins around the plot. [px]"""
PLOT_WIDTH = WIDTH - MARGIN["l"] - MARGIN["r"]
"""Width of a chart's plot area at the template's size and margins, at most (an axis title
that needs more room widens a margin). [px]"""


def memo_template() -> go.layout.Template:
    """The memo style as a plotly template (not registered globally)."""
    axis = dict(
        showline=True,
        linecolor=INK,
        linewidth=1,
        mirror=True,
        ticks="outside",
        tickcolor=INK,
        gridcolor=GRID,
        zeroline=False,
        title_standoff=8,
        automargin=True,
    )
    return go.layout.Template(
        layout=dict(
            font=dict(family=FONT, size=13, color=INK),
            paper_bgcolor="white",
            plot_bgcolor="white",
            xaxis=axis,
            yaxis=axis,
            legend=dict(
                bgcolor="rgba(255,255,255,0.9)",
                bordercolor=GRID,
                borderwidth=1,
                font=dict(size=11),
                groupclick="toggleitem",
                traceorder="grouped",
                tracegroupgap=6,
            ),
            title=dict(x=0.0, xanchor="left", xref="paper", font=dict(size=16)),
            hoverlabel=dict(font=dict(family=FONT)),
            margin=dict(MARGIN),
            width=WIDTH,
            height=HEIGHT,
        )
    )


@lru_cache(maxsize=1)
def cached_memo_template() -> go.layout.Template:
    """The memo template built once; figures copy it when it is set on their layout."""
    return memo_template()


def decimation_indices(values, max_points: int = MAX_TRACE_POINTS) -> np.ndarray:
    """Indices of the points to draw so a trace keeps at most `max_points` points.

    Parameters
    ----------
    values : array_like
        The values the shape of the trace depends on (the y of a time record).
    max_points : int, default MAX_TRACE_POINTS
        Largest number of indices returned, at least 4.

    Returns
    -------
    numpy.ndarray of int
        Sorted indices: all of them when there are at most `max_points` values; otherwise
        the first and last, and the smallest and the largest value of each of
        ``(max_points - 2) // 2`` equal buckets, so every peak and trough survives.

    Notes
    -----
    Min–max decimation per bucket is common practice for plotting long records (no
    source). Values that are not finite (NaN, ±inf) are never chosen unless a whole bucket
    is. The same as ``WindowDecimation(values, max_points).indices()``
    (:class:`WindowDecimation`).
    """
    return WindowDecimation(values, max_points).indices()


class WindowDecimation:
    """Min–max decimation of one record on buckets fixed along it, for any window of it.

    The record's readings are cut into ``(max_points - 2) // 2`` equal buckets by reading
    position, once, and each bucket's smallest and largest value found, once. The points to
    draw for the readings of a window, or for those outside it, are then the two extremes
    of every bucket wholly inside that range and the extremes of the at most two buckets it
    cuts, found again over their part alone: a window of a record of 10^6 readings is
    decimated in time proportional to the number of buckets, not of readings, and the
    window's trace and the trace of the readings outside it together carry about
    `max_points` points, as the whole record would.

    Parameters
    ----------
    values : array_like
        The values the shape of the trace depends on (the y of a time record). Held, not
        copied, when already a float array: do not change them afterwards.
    max_points : int, default MAX_TRACE_POINTS
        Largest number of indices :meth:`indices` returns, at least 4.

    Notes
    -----
    Min–max decimation per bucket is common practice for plotting long records (no
    source); fixing the buckets along the record, rather than along each window, is the
    tool's own choice, so that moving a window's end by one reading changes the points of
    one bucket only. Values that are not finite (NaN, ±inf) are never chosen unless every
    value of the part searched is not finite.
    """

    def __init__(self, values, max_points: int = MAX_TRACE_POINTS):
        if not isinstance(max_points, int | np.integer) or max_points < 4:
            raise ValueError(f"max_points: expected an integer of at least 4, got {max_points!r}")
        y = np.asarray(values, dtype=float).ravel()
        self.values = y
        self.n = y.size
        self.max_points = int(max_points)
        self.bucket_size = 0
        """Readings a bucket; 0 when the record is short enough to draw whole."""
        self._pairs = None
        if self.n <= max_points:
            return
        buckets = (max_points - 2) // 2
        size = -(-self.n // buckets)
        buckets = -(-self.n // size)
        # one padded copy, the values that are not finite and the padding set to +inf for
        # the minima, then to -inf for the maxima
        bad = np.flatnonzero(~np.isfinite(y))
        padded = np.empty(buckets * size)
        padded[: self.n] = y
        padded[bad] = padded[self.n :] = np.inf
        start = np.arange(buckets) * size
        lows = start + np.argmin(padded.reshape(buckets, size), axis=1)
        padded[bad] = padded[self.n :] = -np.inf
        highs = start + np.argmax(padded.reshape(buckets, size), axis=1)
        pairs = np.empty((buckets, 2), dtype=np.int64)
        np.minimum(lows, highs, out=pairs[:, 0])
        np.maximum(lows, highs, out=pairs[:, 1])
        self.bucket_size = size
        self._pairs = pairs

    def _extremes(self, start: int, stop: int) -> np.ndarray:
        """The positions of the smallest and largest value of readings start … stop − 1."""
        part = self.values[start:stop]
        good = np.isfinite(part)
        if good.all():
            low, high = int(np.argmin(part)), int(np.argmax(part))
        else:
            low = int(np.argmin(np.where(good, part, np.inf)))
            high = int(np.argmax(np.where(good, part, -np.inf)))
        return start + np.array(sorted((low, high)), dtype=np.int64)

    def indices(self, start: int = 0, stop: int | None = None) -> np.ndarray:
        """Sorted positions of the readings to draw of readings `start` … `stop` − 1.

        Parameters
        ----------
        start, stop : int
            The range, as positions 0 … n (`stop` excluded); the whole record by default.

        Returns
        -------
        numpy.ndarray of int
            The range's first and last reading, and the smallest and largest value of each
            bucket the range holds (of its part of a bucket it cuts); every position when
            the record has at most `max_points` readings. At most `max_points` positions.
        """
        stop = self.n if stop is None else int(stop)
        start = int(start)
        if not 0 <= start <= stop <= self.n:
            raise ValueError(f"readings {start} to {stop}: expected 0 <= start <= stop <= {self.n}")
        if start == stop:
            return np.arange(0, dtype=np.int64)
        if self._pairs is None:
            return np.arange(start, stop, dtype=np.int64)
        size = self.bucket_size
        first, last = -(-start // size), stop // size  # the buckets wholly inside
        parts = [np.array([start], dtype=np.int64)]
        if first > last:  # within one bucket
            parts.append(self._extremes(start, stop))
        else:
            if start < first * size:
                parts.append(self._extremes(start, first * size))
            parts.append(self._pairs[first:last].ravel())
            if last * size < stop:
                parts.append(self._extremes(last * size, stop))
        parts.append(np.array([stop - 1], dtype=np.int64))
        chosen = np.concatenate(parts)
        return chosen[np.concatenate(([True], chosen[1:] != chosen[:-1]))]

    def outside(self, start: int, stop: int) -> np.ndarray:
        """Sorted positions of the readings to draw of those before `start` and from `stop`
        on: :meth:`indices` of the two ranges, at most ``max_points + 4`` together (each
        range brings its own first and last reading, and a window within one bucket
        leaves that bucket's two parts to either side)."""
        return np.concatenate((self.indices(0, start), self.indices(stop, self.n)))


LEGEND_CHARACTER_WIDTH = 5.6
"""Width of a legend character at the legend's 11 px serif, for the room a legend moved beside
the plot needs (a generous mean over the names the charts write). [px]"""
LEGEND_ROW_HEIGHT = 19
"""Height of one legend entry or group title at 11 px. [px]"""


def add_caption(figure: go.Figure, lines, width: int = 160) -> go.Figure:
    """A copy of `figure` with `lines` of small text (cautions, provenance) under the plot:
    :func:`captioned_dict` as a figure."""
    return go.Figure(captioned_dict(figure, lines, width))


def captioned_dict(figure: go.Figure, lines, width: int = 160, plain: dict | None = None) -> dict:
    """`figure` as a plain dict (``figure.to_dict()``) with `lines` of small text (cautions,
    provenance) under the plot, for the static images; `figure` is left as it was.

    `plain` is the figure's dict when the caller has it already: it is left as it was too,
    the caption going to a copy of the parts it changes (the layout, its margin, legend and
    annotations), which shares the traces with it.

    The text goes under the plot and its axis titles, where the README says; the figure
    grows by the height of the text. A legend laid out below the plot (the compaction
    chart's) moves beside it on the copy, so that nothing sits between the plot and the
    cautions and nothing overlaps them; the copy grows by the room that legend needs.

    The copy is made as a dict, not as a figure: the image export sends the dict to the
    browser, and a figure built again from the copy would check every property once more
    (the clay pack's 32 captions: 0.15 s of a core as figures, 0.03 s as dicts).
    """
    layout = figure.layout
    out = figure.to_dict() if plain is None else dict(plain)
    changed = out["layout"] = dict(out.get("layout", {}))
    wrapped = []
    for line in lines:
        wrapped.extend(textwrap.wrap(str(line), width) or [""])
    height = layout.height or HEIGHT
    extra = 14 * len(wrapped) + 16
    legend_below = layout.legend.y is not None and layout.legend.y < 0
    text = dict(
        text="<br>".join(wrapped),
        xref="paper",
        yref="paper",
        x=0.0,
        xanchor="left",
        align="left",
        showarrow=False,
        font=dict(size=10, color=MUTED),
    )
    bottom = layout.margin.b if layout.margin.b is not None else 70
    margin = changed["margin"] = dict(changed.get("margin", {}))
    if legend_below:
        room, needed = legend_room(figure)
        top = layout.margin.t if layout.margin.t is not None else 80
        margin["r"] = (layout.margin.r if layout.margin.r is not None else 20) + room
        bottom = 60
        height = max(height, needed + top + bottom)
        changed["legend"] = {
            **changed.get("legend", {}),
            **dict(orientation="v", x=1.02, xanchor="left", y=1.0, yanchor="top", yref="paper"),
        }
        changed["width"] = (layout.width or WIDTH) + room
    changed["annotations"] = [
        *changed.get("annotations", []),
        dict(y=0.0, yanchor="top", yshift=-(bottom - 8), **text),
    ]
    margin["b"] = bottom + extra
    changed["height"] = height + extra
    return out


def legend_room(figure: go.Figure) -> tuple[int, int]:
    """The width and height a legend of one column needs beside the plot, estimated from its
    entries: the longest line of a name at :data:`LEGEND_CHARACTER_WIDTH`, and a row of
    :data:`LEGEND_ROW_HEIGHT` an entry, a group title or an extra line of a name. [px]"""
    shown = [t for t in figure.data if t.showlegend is not False and t.name]
    titles = {t.legendgroup for t in shown if t.legendgrouptitle.text}
    lines = [_plain_text(part) for t in shown for part in str(t.name).split("<br>")]
    longest = max([len(line) for line in lines] + [10])
    width = int(LEGEND_CHARACTER_WIDTH * longest) + 60
    height = LEGEND_ROW_HEIGHT * (len(lines) + len(titles)) + 6 * len(titles) + 40
    return width, height


def _plain_text(text: str) -> str:
    """A label without its markup (``<b>``, ``<sup>``…), for its length."""
    return re.sub(r"<[^>]+>", "", str(text))


LABEL_FONT_SIZE = 9
"""Size of the specimen labels of a printed chart. [px]"""


def _axis_span(axis, values: np.ndarray) -> tuple[float, float, bool]:
    """The axis's range in its own coordinates (log10 on a log axis) and whether it is log."""
    log = axis.type == "log"
    if axis.range is not None:
        low, high = (float(v) for v in axis.range)
    else:
        shown = np.log10(values[values > 0]) if log else values[np.isfinite(values)]
        low, high = (float(shown.min()), float(shown.max())) if shown.size else (0.0, 1.0)
    return low, (high if high > low else low + 1.0), log


def label_specimens(figure: go.Figure) -> go.Figure:
    """A copy of `figure` whose specimen markers carry their specimen id as a text label,
    where the label has room: beside its marker, clear of every other marker.

    For the printed and static charts, where there is no hover. A specimen marker is a
    marker trace whose ``meta`` names its verdict (:func:`specimen_trace_specs`) and whose
    ``text`` holds the ids. A label is written to the right of its marker when no other
    marker of the same panel lies within the label's box (its length at
    :data:`LABEL_FONT_SIZE`, one line high) on either side, and to the left where it would
    run past the plot's right edge; crowded points stay unlabelled (their id is in the
    hover text of the HTML chart). Common practice, no source.
    """
    out = go.Figure(figure)
    layout = out.layout
    width = (layout.width or WIDTH) - (layout.margin.l or 80) - (layout.margin.r or 20)
    if layout.showlegend is not False and (layout.legend.y is None or layout.legend.y >= 0):
        width -= legend_room(out)[0]  # a legend beside the plot takes its room from it
    height = (layout.height or HEIGHT) - (layout.margin.t or 80) - (layout.margin.b or 70)
    panels: dict[tuple[str, str], list] = {}
    for trace in out.data:
        meta = trace.meta if isinstance(trace.meta, dict) else {}
        if trace.type == "scatter" and "verdict" in meta and trace.text is not None:
            panels.setdefault((trace.xaxis or "x", trace.yaxis or "y"), []).append(trace)
    for (x_name, y_name), traces in panels.items():
        x_axis = layout["xaxis" + x_name[1:]]
        y_axis = layout["yaxis" + y_name[1:]]
        xs = np.concatenate([np.asarray(t.x, dtype=float) for t in traces])
        ys = np.concatenate([np.asarray(t.y, dtype=float) for t in traces])
        x_low, x_high, x_log = _axis_span(x_axis, xs)
        y_low, y_high, y_log = _axis_span(y_axis, ys)
        y_share = float(np.diff(y_axis.domain)[0]) if y_axis.domain is not None else 1.0
        with np.errstate(divide="ignore", invalid="ignore"):
            px = (np.log10(xs) if x_log else xs) - x_low
            py = (np.log10(ys) if y_log else ys) - y_low
        px = px / (x_high - x_low) * width
        py = py / (y_high - y_low) * height * y_share
        names = [str(v) for t in traces for v in t.text]
        tall = LABEL_FONT_SIZE + 5
        start = 0
        for trace in traces:
            count = len(trace.text)
            labels, sides = [], []
            for i in range(start, start + count):
                long = 0.62 * LABEL_FONT_SIZE * len(_plain_text(names[i])) + 10
                dx, dy = px - px[i], np.abs(py - py[i])
                near = (dy < tall) & (dx > -long) & (dx < long)
                near[i] = False
                fits = bool(np.isfinite(px[i]) and np.isfinite(py[i])) and not near.any()
                labels.append(names[i] if fits else "")
                # a label that would run past the right edge of the plot goes on the left
                sides.append("middle left" if px[i] + long > width else "middle right")
            start += count
            trace.update(
                mode="markers+text",
                text=labels,
                textposition=sides,
                textfont=dict(size=LABEL_FONT_SIZE, color=MUTED),
            )
    return out
