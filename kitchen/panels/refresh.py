"""Bringing a live figure to a freshly built one, sending only what changed.

A panel redraws a chart by building the whole figure again — the builders of
:mod:`kitchen.charts` are pure — and handing it to :func:`refresh_figure`. Rebuilding a
plotly figure validates every property of every trace, which for the series chart costs
more than the analysis behind it; sending it whole sends every array again. So the
figure's plain-dict form (a *spec*: ``{"data": [trace dicts], "layout": {...}}``, what
the ``*_spec`` builders of :mod:`kitchen.charts` return) is compared with the spec the
widget last showed, and only the properties that differ are set on the widget — and so
validated and sent. A revised height moves one specimen's points, its compaction curve
and the zone; the saturation lines, the criterion and the axes stay as they were.
"""

from __future__ import annotations

import copy

import numpy as np
import plotly.graph_objects as go

__all__ = ["refresh_figure", "figure_spec", "same_value", "live_figure"]

_SHOWN = "_kitchen_shown_spec"
"""The attribute of a widget that holds the spec it last showed through this module."""


def same_value(a, b) -> bool:
    """Whether two property values are the same, arrays and nested dicts included.

    Arrays compare by shape and values (NaN equal to NaN), dicts by keys and values,
    lists and tuples item by item; anything else by identity, then ``==``.
    """
    if a is b:
        return True
    if isinstance(a, np.ndarray) or isinstance(b, np.ndarray):
        try:
            x, y = np.asarray(a), np.asarray(b)
        except (TypeError, ValueError):
            return False
        if x.shape != y.shape or x.dtype.kind != y.dtype.kind:
            return False
        if x.dtype.kind in "fc":
            return bool(np.array_equal(x, y, equal_nan=True))
        return bool(np.array_equal(x, y))
    if isinstance(a, dict) and isinstance(b, dict):
        return a.keys() == b.keys() and all(same_value(a[key], b[key]) for key in a)
    if isinstance(a, (list, tuple)) and isinstance(b, (list, tuple)):
        return len(a) == len(b) and all(same_value(x, y) for x, y in zip(a, b, strict=True))
    if type(a) is not type(b):
        return False
    try:
        return bool(a == b)
    except (TypeError, ValueError):
        return False


def figure_spec(figure) -> dict:
    """A figure as a spec: a plotly Figure converted, a spec dict taken as it is."""
    if isinstance(figure, dict):
        if set(figure) - {"data", "layout"}:
            extra = ", ".join(sorted(set(figure) - {"data", "layout"}))
            raise ValueError(f"a figure spec holds 'data' and 'layout' only, not {extra}")
        return {"data": list(figure.get("data", ())), "layout": dict(figure.get("layout", {}))}
    data = []
    for trace in figure.data:
        json = trace.to_plotly_json()
        json.pop("uid", None)
        data.append(json)
    return {"data": data, "layout": figure.layout.to_plotly_json()}


def _template_size(template, key):
    if template is None:
        return None
    if isinstance(template, go.layout.Template):
        return template.layout[key]
    return (template.get("layout") or {}).get(key)


def _template_json(template):
    if isinstance(template, go.layout.Template):
        return template.to_plotly_json()
    return template


def _changes(old: dict, new: dict) -> dict:
    """The top-level properties of `new` that differ from `old`; None for those gone."""
    changes = {key: value for key, value in new.items() if not same_value(old.get(key), value)}
    changes.update({key: None for key in old if key not in new})
    return changes


def refresh_figure(widget: go.FigureWidget, figure) -> int:
    """Bring a live FigureWidget to the state of a freshly built figure, in place.

    Parameters
    ----------
    widget : plotly.graph_objects.FigureWidget
        The figure on screen.
    figure : plotly.graph_objects.Figure or dict
        The figure as it should now be, or its spec (``{"data": [...], "layout": {...}}``
        of plain dicts, as the ``*_spec`` builders of :mod:`kitchen.charts` return).

    Returns
    -------
    int
        How many top-level properties (of traces and of the layout) were set.

    Notes
    -----
    When the widget last showed a figure through this function and the new figure has
    the same traces (count and types), only the properties that differ are set, inside
    one ``batch_update`` so that open views receive one message. Otherwise every trace
    is updated in place (same traces) or the traces are replaced. The layout is updated
    key by key.

    The browser's model follows the changes as messages, and views drawn later from it
    (the panel displayed after this call, a second display) show the figure as it now is.
    When the traces were replaced (or first set) the whole state is sent as well, so that
    a model that missed an early message is still right (:func:`_send_state`); otherwise
    the kernel's copy of the synchronised state, sent to a browser that connects later (a
    page reload with the kernel alive), is brought up to date without sending it.
    """
    spec = figure_spec(figure)
    layout = dict(spec["layout"])
    template = layout.get("template")
    for key in ("width", "height"):  # a new view falls back to 360 px without them
        size = _template_size(template, key)
        if layout.get(key) is None and size is not None:
            layout[key] = size
    spec["layout"] = layout
    new_traces = spec["data"]
    shown = getattr(widget, _SHOWN, None)
    same = len(new_traces) == len(widget.data) and all(
        old.type == new.get("type", "scatter")
        for old, new in zip(widget.data, new_traces, strict=True)
    )
    sent = 0
    if same and shown is not None and len(shown["data"]) == len(new_traces):
        with widget.batch_update():
            for trace, old, new in zip(widget.data, shown["data"], new_traces, strict=True):
                changes = _changes(old, new)
                if changes:
                    trace.update(changes, overwrite=True)
                    sent += len(changes)
            changes = _changes(shown["layout"], layout)
            if changes:
                widget.layout.update(changes, overwrite=True)
                sent += len(changes)
    else:
        sent_layout = dict(layout)
        if template is not None and same_value(
            _template_json(template), widget.layout.template.to_plotly_json()
        ):
            sent_layout.pop("template")  # unchanged: not validated and sent again
        if same:
            with widget.batch_update():
                for trace, new in zip(widget.data, new_traces, strict=True):
                    trace.update(new, overwrite=True)
                widget.layout.update(sent_layout, overwrite=True)
        else:
            with widget.batch_update():
                widget.data = ()
                widget.layout.update(sent_layout, overwrite=True)
            widget.add_traces(new_traces)
        sent = sum(len(trace) for trace in new_traces) + len(sent_layout)
    setattr(widget, _SHOWN, spec)
    if same and shown is not None and len(shown["data"]) == len(new_traces):
        _keep_state(widget)
    else:
        _send_state(widget)
    return sent


def _send_state(widget: go.FigureWidget) -> None:
    """Send the whole figure as the widget's synchronised state, as plotly does when a
    FigureWidget is displayed on its own.

    A FigureWidget shown inside a box is never displayed on its own, so its state is
    only what the update messages made of it in the browser. The first messages can reach
    the browser before plotly's widget code there has started listening to them (the
    figure built while the cell runs, its view drawn after): they are then lost, and the
    view is drawn empty. Sending the state whole after a figure is first drawn, or after
    its traces were replaced, leaves the browser's model right whatever it caught; later
    refreshes of the same traces send only what changed (:func:`_keep_state`).
    """
    widget._widget_layout = copy.deepcopy(widget._layout_obj._props)
    widget._widget_data = copy.deepcopy(widget._data)


def _keep_state(widget: go.FigureWidget) -> None:
    """Bring the widget's synchronised state up to date without sending it.

    Plotly sets ``_widget_data`` and ``_widget_layout`` (what a view is first drawn from)
    only when a FigureWidget is displayed on its own. The browser's copy of the model is
    kept current by the update messages above (plotly.js applies each one to it), so
    only the kernel's copy is stale: it is what a browser that connects later (a page
    reload) is sent. Setting the traits the usual way would send the whole figure to the
    browser again after every refresh, and redraw it; the values are stored as they are
    instead, for the next time the state is asked for.
    """
    state = widget._trait_values  # traitlets' store: no change notification, no message
    state["_widget_layout"] = copy.deepcopy(widget._layout_obj._props)
    state["_widget_data"] = copy.deepcopy(widget._data)


def live_figure(figure) -> go.FigureWidget:
    """A new FigureWidget that opens on `figure` whole, ready for :func:`refresh_figure`.

    A FigureWidget made empty and then drawn sends its traces as messages before any view
    exists; one made from the figure carries it in the state it opens with, which every
    view is drawn from. Panels make each figure this way the first time they draw it.
    """
    spec = figure_spec(figure)
    layout = dict(spec["layout"])
    template = layout.get("template")
    for key in ("width", "height"):
        size = _template_size(template, key)
        if layout.get(key) is None and size is not None:
            layout[key] = size
    spec["layout"] = layout
    widget = go.FigureWidget({"data": spec["data"], "layout": layout})
    setattr(widget, _SHOWN, figure_spec(widget))
    return widget
