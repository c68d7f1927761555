"""Figure refresh: a live figure brought to a new one by sending only what changed.

The reference for every check is plotly itself: the widget's state after a refresh that
sent only changes must equal its state after a refresh that sent the whole figure.
"""

import numpy as np
import plotly.graph_objects as go
import pytest
from series_files import SAMPLES, copy_sample

from kitchen import charts
from kitchen.analysis import analyse_series
from kitchen.panels.refresh import figure_spec, refresh_figure, same_value
from kitchen.reduction import series_results
from kitchen.revisions import load_effective_series, revise


def _pruned(value):
    """A property reset to None reads back as an empty object, which plotly.js draws as
    the default: the two are the same figure."""
    if isinstance(value, dict):
        kept = {key: _pruned(item) for key, item in value.items()}
        return {key: item for key, item in kept.items() if item != {}}
    if isinstance(value, list):
        return [_pruned(item) for item in value]
    return value


def _state(widget) -> dict:
    json = widget.to_plotly_json()
    for trace in json["data"]:
        trace.pop("uid", None)
    return _pruned(json)


def _whole(spec) -> dict:
    """The state of a fresh widget given the whole figure."""
    widget = go.FigureWidget()
    refresh_figure(widget, go.Figure(spec))
    return _state(widget)


def test_refresh_figure_updates_traces_in_place():
    widget = go.FigureWidget(go.Figure(go.Scatter(x=[1, 2], y=[3, 4], name="readings")))
    first = widget.data[0]
    refresh_figure(
        widget,
        go.Figure(
            go.Scatter(x=[5, 6, 7], y=[1, 1, 1], name="readings"), layout={"title": {"text": "new"}}
        ),
    )
    assert widget.data[0] is first  # same trace object: updated, not replaced
    assert widget.data[0].x == (5, 6, 7)
    assert widget.layout.title.text == "new"


def test_refresh_figure_replaces_traces_when_the_structure_changes():
    widget = go.FigureWidget(go.Figure(go.Scatter(x=[1], y=[1])))
    refresh_figure(widget, go.Figure([go.Scatter(x=[1], y=[2]), go.Bar(x=[1], y=[3])]))
    assert [trace.type for trace in widget.data] == ["scatter", "bar"]
    assert widget.data[1].y == (3,)


def test_refresh_figure_keeps_the_state_new_views_are_drawn_from():
    # a FigureWidget shown inside a box is drawn from its synchronised state, which plotly
    # itself only refreshes when the FigureWidget is displayed on its own
    widget = go.FigureWidget()
    refresh_figure(widget, go.Figure(go.Scatter(x=[1, 2], y=[5, 6], name="k")))
    assert list(widget._widget_data[0]["y"]) == [5, 6]
    refresh_figure(
        widget, go.Figure(go.Scatter(x=[1, 2], y=[7, 8], name="k"), layout={"height": 500})
    )
    assert list(widget._widget_data[0]["y"]) == [7, 8]
    assert widget._widget_layout["height"] == 500


def test_refresh_figure_carries_the_template_size_to_new_views():
    # plotly's view draws a figure without a top-level height at 360 px
    template = go.layout.Template(layout={"width": 980, "height": 620})
    widget = go.FigureWidget()
    refresh_figure(widget, go.Figure(go.Scatter(x=[1], y=[1]), layout={"template": template}))
    assert (widget._widget_layout["width"], widget._widget_layout["height"]) == (980, 620)


def test_same_value_compares_arrays_dicts_and_lists():
    assert same_value(np.array([1.0, np.nan]), np.array([1.0, np.nan]))
    assert not same_value(np.array([1.0, 2.0]), np.array([1.0, 2.5]))
    assert not same_value(np.array([1.0, 2.0]), np.array([1.0, 2.0, 3.0]))
    assert same_value({"a": [1, {"b": np.arange(3)}]}, {"a": (1, {"b": np.arange(3)})})
    assert not same_value({"a": 1}, {"a": 1, "b": 2})
    assert not same_value(1, True) and not same_value("1", 1)


def test_only_what_changed_is_sent_and_the_result_is_the_whole_figure():
    first = {
        "data": [
            {"type": "scatter", "x": np.arange(3.0), "y": np.ones(3), "name": "a"},
            {
                "type": "scatter",
                "x": np.arange(3.0),
                "y": np.zeros(3),
                "name": "b",
                "error_y": {"array": np.ones(3)},
            },
        ],
        "layout": {"title": {"text": "before"}, "height": 400},
    }
    widget = go.FigureWidget()
    refresh_figure(widget, first)
    second = {
        "data": [
            dict(first["data"][0]),
            {"type": "scatter", "x": np.arange(3.0), "y": np.full(3, 2.0), "name": "b"},
        ],
        "layout": {"title": {"text": "after"}, "height": 400},
    }
    sent = refresh_figure(widget, second)
    assert sent == 3  # trace b's y, its error bars (gone), the title
    assert _state(widget) == _whole(second)
    assert refresh_figure(widget, second) == 0  # nothing changed, nothing sent


def test_a_spec_names_data_and_layout_only():
    with pytest.raises(ValueError, match="'data' and 'layout' only, not frames"):
        figure_spec({"data": [], "frames": []})


def test_the_series_chart_after_a_height_revision(tmp_path):
    # a revised height moves one specimen: far fewer properties go to the browser than the
    # whole chart holds, and the chart shown is the chart built afresh
    folder = copy_sample(SAMPLES / "clay_liner", tmp_path / "clay_liner")

    def spec():
        results = series_results(load_effective_series(folder).series)
        return charts.compaction_conductivity_spec(analyse_series(results, 1e-9))

    widget = go.FigureWidget()
    whole = refresh_figure(widget, spec())
    revise(folder, specimen="QF-05", field="height", value="121.0 mm", reason="re-measured")
    revised = spec()
    sent = refresh_figure(widget, revised)
    assert 0 < sent < whole / 4
    assert _state(widget) == _whole(revised)
    assert list(widget._widget_data[0]["x"]) == list(widget.data[0].x)  # what new views draw


def test_a_refresh_sends_changes_only_not_the_whole_state():
    # plotly's widget sends its whole figure when _widget_data is set as a trait; a refresh
    # keeps the kernel's copy current for a browser that connects later, without sending it
    widget = go.FigureWidget()
    refresh_figure(widget, {"data": [{"type": "scatter", "y": np.arange(3.0)}], "layout": {}})
    sent = []
    original = widget.send_state
    widget.send_state = lambda key=None: sent.append(key) or original(key)
    refresh_figure(widget, {"data": [{"type": "scatter", "y": np.arange(4.0)}], "layout": {}})
    keys = {k for key in sent for k in ([key] if isinstance(key, str) else key or ["all"])}
    assert keys and not keys & {"_widget_data", "_widget_layout", "all"}
    assert list(widget._widget_data[0]["y"]) == [0.0, 1.0, 2.0, 3.0]  # what get_state sends


def test_the_whole_state_is_sent_when_traces_are_set_and_only_changes_after():
    """A figure shown inside a box is never displayed on its own (which is when plotly
    sends its whole state): the first refresh, and one that replaces the traces, send it."""
    widget = go.FigureWidget()
    sent = []
    widget.observe(lambda change: sent.append(change["name"]), names=["_widget_data"])
    refresh_figure(widget, go.Figure(go.Scatter(x=[1, 2], y=[3, 4], name="readings")))
    assert sent == ["_widget_data"]
    assert widget._widget_data[0]["name"] == "readings"
    refresh_figure(widget, go.Figure(go.Scatter(x=[1, 2], y=[3, 5], name="readings")))
    assert sent == ["_widget_data"]  # same traces: only the change went, as a message
    assert list(widget._widget_data[0]["y"]) == [3, 5]  # the kernel's copy is current
    two = [go.Scatter(x=[1], y=[1], name="a"), go.Scatter(x=[2], y=[2], name="b")]
    refresh_figure(widget, go.Figure(two))
    assert sent == ["_widget_data"] * 2
    assert [trace["name"] for trace in widget._widget_data] == ["a", "b"]


def test_a_live_figure_opens_whole_and_then_sends_only_changes():
    from kitchen.panels.refresh import live_figure

    figure = go.Figure(go.Scatter(x=[1, 2], y=[3, 4], name="readings"))
    widget = live_figure(figure)
    assert [trace["name"] for trace in widget._widget_data] == ["readings"]  # opened with it
    assert _state(widget)["data"] == _whole(figure)["data"]
    sent = []
    widget.observe(lambda change: sent.append(change["name"]), names=["_widget_data"])
    count = refresh_figure(widget, go.Figure(go.Scatter(x=[1, 2], y=[3, 5], name="readings")))
    assert count == 1 and sent == []  # only y, as a message
    assert widget.data[0].y == (3, 5)
