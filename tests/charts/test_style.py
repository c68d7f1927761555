"""The memo style: min/max decimation of long records, the template, captions in the margin."""

import numpy as np
import plotly.graph_objects as go
import pytest
from chart_series import sample_series

from kitchen.cautions import CAUTIONS
from kitchen.charts import compaction as compaction_chart
from kitchen.charts import conductivity_trend as conductivity_trend_chart
from kitchen.charts import style as chart_style


@pytest.fixture(scope="module")
def clay():
    return sample_series("clay_liner")


# --- decimation ------------------------------------------------------------------------------


def test_decimation_keeps_short_records_whole():
    np.testing.assert_array_equal(
        chart_style.decimation_indices(np.arange(10.0), 10), np.arange(10)
    )


def test_decimation_caps_points_and_keeps_every_bucket_extreme():
    rng = np.random.default_rng(7)
    y = np.cumsum(rng.normal(size=50_003))
    cap = 1000
    kept = chart_style.decimation_indices(y, cap)
    assert kept.size <= cap and np.all(np.diff(kept) > 0)
    assert {0, y.size - 1, int(np.argmin(y)), int(np.argmax(y))} <= set(kept.tolist())
    # The same buckets computed one by one: each one's minimum and maximum are kept.
    buckets = (cap - 2) // 2
    size = -(-y.size // buckets)
    for start in range(0, y.size, size):
        part = y[start : start + size]
        assert start + int(np.argmin(part)) in kept and start + int(np.argmax(part)) in kept


def test_decimation_ignores_nan_and_refuses_a_tiny_cap():
    y = np.sin(np.linspace(0, 20, 100_000))
    y[::7] = np.nan
    kept = chart_style.decimation_indices(y, 500)
    assert kept.size <= 500 and not np.isnan(y[kept[1:-1]]).any()
    with pytest.raises(ValueError, match="max_points: expected an integer of at least 4"):
        chart_style.decimation_indices(y, 3)


def _bucket_extremes_kept(y, kept, start, stop, size):
    """Whether, for every bucket of `size` readings fixed along the record, the smallest
    and largest finite value of its part within start … stop − 1 are among `kept`."""
    for first in range(0, y.size, size):
        low, high = max(first, start), min(first + size, stop)
        if low >= high:
            continue
        part = y[low:high][np.isfinite(y[low:high])]
        if not part.size:
            continue
        values = set(y[[i for i in kept if low <= i < high]].tolist())
        if part.min() not in values or part.max() not in values:
            return False
    return True


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_window_decimation_keeps_each_fixed_bucket_extreme_of_any_window(seed):
    # the buckets are fixed along the record; any window keeps its ends and, of every bucket
    # it holds or cuts, the smallest and largest value of its part; the readings outside
    # likewise; checked here bucket by bucket (min/max decimation, common practice)
    rng = np.random.default_rng(seed)
    y = np.cumsum(rng.normal(size=20_011))
    y[rng.random(y.size) < 0.05] = np.nan
    y[5_000] = np.inf  # never drawn while its bucket has finite values
    cap = 400
    decimation = chart_style.WindowDecimation(y, cap)
    size = -(-y.size // ((cap - 2) // 2))
    assert decimation.bucket_size == size
    for start, stop in [(0, y.size), (1, y.size - 1), (37, 38), (990, 1010), (12_345, 19_000)]:
        inside = decimation.indices(start, stop)
        outside = decimation.outside(start, stop)
        assert inside.size <= cap and outside.size <= cap + 4
        assert np.all(np.diff(inside) > 0) and np.all(np.diff(outside) > 0)
        assert inside[0] == start and inside[-1] == stop - 1
        assert np.all((inside >= start) & (inside < stop))
        assert not np.any((outside >= start) & (outside < stop))
        assert 5_000 not in inside and 5_000 not in outside
        assert _bucket_extremes_kept(y, inside, start, stop, size)
        assert _bucket_extremes_kept(y, outside, 0, start, size)
        assert _bucket_extremes_kept(y, outside, stop, y.size, size)
    # the whole record is the plain decimation
    np.testing.assert_array_equal(decimation.indices(), chart_style.decimation_indices(y, cap))
    # a short record is drawn whole
    short = chart_style.WindowDecimation(np.arange(50.0), cap)
    np.testing.assert_array_equal(short.indices(10, 20), np.arange(10, 20))
    np.testing.assert_array_equal(short.outside(10, 48), [*range(10), 48, 49])


def test_window_decimation_refuses_a_range_beyond_the_record():
    decimation = chart_style.WindowDecimation(np.arange(100.0), 10)
    with pytest.raises(ValueError, match=r"readings 5 to 101: expected 0 <= start <= stop <= 100"):
        decimation.indices(5, 101)
    assert decimation.indices(7, 7).size == 0


# --- style and captions ----------------------------------------------------------------------


def test_caption_carries_the_cautions_on_a_copy(clay):
    figure = conductivity_trend_chart.conductivity_trend_figure(clay[1], "void_ratio")
    captioned = chart_style.add_caption(figure, CAUTIONS)
    assert len(figure.layout.annotations) == 0 and len(captioned.layout.annotations) == 1
    text = captioned.layout.annotations[0].text.replace("<br>", " ")
    for caution in CAUTIONS:
        assert caution in text
    assert captioned.layout.height > (figure.layout.height or chart_style.HEIGHT)


def test_memo_style_is_applied(clay):
    figure = conductivity_trend_chart.conductivity_trend_figure(clay[1], "dry_density")
    assert isinstance(figure, go.Figure)
    assert "DejaVu Serif" in figure.layout.template.layout.font.family
    assert figure.layout.template.layout.legend.traceorder == "grouped"


def test_caption_goes_under_the_plot_and_a_legend_below_moves_beside_it(clay):
    # the README: the PNG and SVG carry the cautions "printed under" the chart
    figure = compaction_chart.compaction_conductivity_figure(clay[1])
    assert figure.layout.legend.y < 0  # laid out below the plot on screen
    captioned = chart_style.add_caption(figure, CAUTIONS)
    note = captioned.layout.annotations[-1]
    assert (note.y, note.yanchor) == (0.0, "top") and note.yshift < 0
    assert captioned.layout.legend.x > 1 and captioned.layout.legend.orientation == "v"
    assert captioned.layout.width > chart_style.WIDTH
    assert captioned.layout.margin.b >= 14 * len(CAUTIONS) + 16
    assert figure.layout.legend.y < 0  # the figure given is left as it was


def test_printed_series_charts_name_their_specimens_where_there_is_room(clay):
    # a printed chart has no hover: the id beside the marker, unless another marker is in
    # the label's way (common practice, no source)
    figure = compaction_chart.compaction_conductivity_figure(clay[1])
    labelled = chart_style.label_specimens(figure)
    markers = [t for t in labelled.data if isinstance(t.meta, dict) and "verdict" in t.meta]
    shown = [v for t in markers for v in t.text if v]
    ids = set(clay[1].specimens["specimen"].astype(str))
    assert set(shown) <= ids and len(shown) >= len(ids)  # each panel names most of them
    assert all(t.mode == "markers+text" for t in markers)
    # the hover still names every specimen, and the figure given keeps its plain markers
    assert all(t.hovertext for t in markers)
    assert all(t.mode == "markers" for t in figure.data if isinstance(t.meta, dict))


def test_a_label_that_would_overlap_another_marker_is_left_out():
    points = go.Figure(
        [
            go.Scatter(x=[1.0, 1.02, 5.0], y=[1.0, 1.0, 3.0], text=["A-1", "A-2", "B"],
                       mode="markers", meta={"verdict": "meets"})
        ],
        layout=dict(xaxis=dict(range=[0, 6]), yaxis=dict(range=[0, 4])),
    )  # fmt: skip
    assert list(chart_style.label_specimens(points).data[0].text) == ["", "", "B"]


def test_caption_as_a_dict_is_the_captioned_figures_and_leaves_the_figure_as_it_was(clay):
    # the image export draws the captioned dict; the HTML and notebooks keep the figure
    import json

    from plotly.utils import PlotlyJSONEncoder

    for figure in (
        compaction_chart.compaction_conductivity_figure(clay[1]),
        conductivity_trend_chart.conductivity_trend_figure(clay[1], "void_ratio"),
    ):
        before = json.dumps(figure.to_dict(), cls=PlotlyJSONEncoder, sort_keys=True)
        captioned = chart_style.captioned_dict(figure, CAUTIONS)
        assert json.dumps(figure.to_dict(), cls=PlotlyJSONEncoder, sort_keys=True) == before
        assert isinstance(captioned, dict)
        assert go.Figure(captioned).to_dict() == captioned  # plotly takes it as it is
        assert captioned["layout"]["annotations"][-1]["text"].count("<br>") >= len(CAUTIONS) - 1


def test_caption_on_a_dict_given_is_the_same_and_leaves_that_dict_as_it_was(clay):
    # the export shares one dict of a figure between its pages and its images; the caption
    # made from it must equal the one made from the figure (common practice, no source)
    import copy

    for figure in (
        compaction_chart.compaction_conductivity_figure(clay[1]),
        conductivity_trend_chart.conductivity_trend_figure(clay[1], "void_ratio"),
    ):
        plain = figure.to_dict()
        kept = copy.deepcopy(plain)
        assert chart_style.captioned_dict(figure, CAUTIONS, plain=plain) == (
            chart_style.captioned_dict(figure, CAUTIONS)
        )
        assert plain == kept
