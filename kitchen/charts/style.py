"""The memo style of the figures, and what every figure builder shares.

The look: a serif face, a dark ink, muted greys, and four verdict colours that are never
the only cue (compactive effort is told by marker shape and line dash, the verdict by
marker fill: solid for meets, open for does not meet, open with a dot for not conclusive,
a pale face in a dark outline for a test not judged, each telling apart in greyscale).
Here are the colours, marker shapes and dashes, the plotly template (:func:`memo_template`),
min/max decimation of long records (:func:`decimation_indices`) and the caption in a
figure's margin (:func:`add_caption`).
"""

from __future__ import annotations

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
    "VERDICT_COLOURS",
    "VERDICT_FACE",
    "VERDICT_FILL",
    "WIDTH",
    "ZONE",
    "add_caption",
    "decimation_indices",
    "memo_template",
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
EFFORT_DASHES = ("solid", "dash", "dot", "dashdot", "longdash", "longdashdot")
SATURATION_DASHES = {1.0: "solid", 0.9: "dash", 0.8: "dot"}
NO_EFFORT = "no effort given"
WIDTH, HEIGHT = 980, 620


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
            margin=dict(l=80, r=20, t=80, b=70),
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
    source). NaN values are never chosen unless a whole bucket is NaN.
    """
    if not isinstance(max_points, int | np.integer) or max_points < 4:
        raise ValueError(f"max_points: expected an integer of at least 4, got {max_points!r}")
    y = np.asarray(values, dtype=float).ravel()
    n = y.size
    if n <= max_points:
        return np.arange(n)
    buckets = (max_points - 2) // 2
    size = -(-n // buckets)
    buckets = -(-n // size)
    # one padded copy, NaN and padding set to +inf for the minima, then to -inf for the maxima
    nan = np.flatnonzero(np.isnan(y))
    padded = np.empty(buckets * size)
    padded[:n] = y
    padded[nan] = padded[n:] = np.inf
    start = np.arange(buckets) * size
    lows = start + np.argmin(padded.reshape(buckets, size), axis=1)
    padded[nan] = padded[n:] = -np.inf
    highs = start + np.argmax(padded.reshape(buckets, size), axis=1)
    # the buckets are in order, so the sorted union needs no sort: the smaller of each
    # bucket's two indices, then the larger, with repeats dropped
    pairs = np.empty(2 * buckets + 2, dtype=lows.dtype)
    pairs[0], pairs[-1] = 0, n - 1
    np.minimum(lows, highs, out=pairs[1:-1:2])
    np.maximum(lows, highs, out=pairs[2:-1:2])
    chosen = pairs[np.concatenate(([True], pairs[1:] != pairs[:-1]))]
    return chosen[chosen < n]


def add_caption(figure: go.Figure, lines, width: int = 160) -> go.Figure:
    """A copy of `figure` with `lines` of small text (cautions, provenance) in its margin.

    The text goes below the plot, or between the title and the plot when the legend sits
    below it; the figure grows by the height of the text.
    """
    out = go.Figure(figure)
    wrapped = []
    for line in lines:
        wrapped.extend(textwrap.wrap(str(line), width) or [""])
    height = out.layout.height or HEIGHT
    extra = 14 * len(wrapped) + 16
    legend_below = out.layout.legend.y is not None and out.layout.legend.y < 0
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
    if legend_below:
        top = out.layout.margin.t if out.layout.margin.t is not None else 80
        out.add_annotation(y=1.0, yanchor="bottom", yshift=10, **text)
        out.update_layout(
            margin=dict(t=top + extra),
            height=height + extra,
            title=dict(yref="container", y=1.0, yanchor="top", pad=dict(t=24)),
        )
    else:
        bottom = out.layout.margin.b if out.layout.margin.b is not None else 70
        out.add_annotation(y=0.0, yanchor="top", yshift=-(bottom - 8), **text)
        out.update_layout(margin=dict(b=bottom + extra), height=height + extra)
    return out
