"""The chart of one test over its course: k against time and pore volumes, outflow/inflow."""

import numpy as np
from series_files import SAMPLES

from kitchen.charts import flow_record_figure
from kitchen.workspace import Workspace


def test_three_panels_with_the_record_in_the_unit_asked():
    flow = Workspace(SAMPLES / "flexible_wall_clay").flow_record("FW-01")
    figure = flow_record_figure(flow, "FW-01", "cm/s", "k20")
    k_time, k_pore, ratio = figure.data
    assert np.allclose(np.asarray(k_time.y), flow.k[flow.k > 0] * 100)  # m/s to cm/s
    assert np.allclose(np.asarray(k_time.x), flow.k_time[flow.k > 0] / 3600)
    assert np.allclose(np.asarray(k_pore.x), flow.k_pore_volumes[flow.k > 0])
    assert np.allclose(np.asarray(ratio.y), flow.ratio)
    assert figure.layout.yaxis.type == "log" and figure.layout.yaxis2.type == "log"
    assert figure.layout.yaxis.title.text == "k20 [cm/s]"
    # ticks as powers of ten like every k axis of the tool, never SI prefixes ("520p")
    assert figure.layout.yaxis.exponentformat == figure.layout.yaxis2.exponentformat == "power"
    band = figure.layout.shapes[0]
    assert (band.y0, band.y1) == (0.75, 1.25)  # ASTM D5084 outflow/inflow limits (memory)


def test_a_test_without_volumes_says_so():
    workspace = Workspace(SAMPLES / "clay_liner")
    flow = workspace.flow_record(workspace.specimen_ids()[0])
    figure = flow_record_figure(flow, "no volumes")
    assert len(figure.data) == 2
    note = figure.layout.annotations[-1]
    assert "outflow/inflow not measured" in note.text
    # on the page, in the third panel's band, not tied to axes the empty panel lacks
    low, high = figure.layout.yaxis3.domain
    assert note.yref == "paper" and low < note.y < high


def test_the_panels_lie_where_plotly_lays_out_three_rows():
    # plotly's own make_subplots is the reference for the grid the figure is built on
    from plotly.subplots import make_subplots

    flow = Workspace(SAMPLES / "flexible_wall_clay").flow_record("FW-01")
    figure = flow_record_figure(flow, "FW-01")
    grid = make_subplots(rows=3, cols=1, vertical_spacing=0.11).layout
    for axis in ("xaxis", "yaxis", "xaxis2", "yaxis2", "xaxis3", "yaxis3"):
        assert figure.layout[axis].domain == grid[axis].domain
        assert figure.layout[axis].anchor == grid[axis].anchor
    assert [trace.xaxis for trace in figure.data] == ["x", "x2", "x3"]
    assert [a.text for a in figure.layout.annotations][:3] == [
        "k20 against time",
        "k20 against pore volumes of flow",
        "outflow/inflow against time",
    ]
