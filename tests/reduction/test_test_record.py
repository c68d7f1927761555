"""The flow through a specimen over its test: pore volumes of flow, k and outflow/inflow."""

import math

import numpy as np
import pytest
from series_files import SAMPLES

from kitchen.reduction import spans_conductivity
from kitchen.specimen import pore_volume
from kitchen.workspace import Workspace


def test_spans_recover_a_known_k():
    # k = (a·L/A)·ln(h1/h2)/Δt (Das & Sobhan, falling-head test); readings made by hand from
    # k = 3e-9 m/s with a·L/A = 6.25e-4 m: h = h0·exp(−k·t/(a·L/A))
    scale, k = 6.25e-4, 3e-9
    time = np.arange(0, 40) * 3600.0
    head = 1.5 * np.exp(-k * time / scale)
    middle, values = spans_conductivity(time, head, time, scale, 5)
    assert values == pytest.approx(np.full(values.size, k), rel=1e-9)
    assert middle[0] == pytest.approx(2.5 * 3600)
    assert spans_conductivity(time[:1], head[:1], time[:1], scale, 5)[1].size == 0


def test_pore_volumes_of_a_falling_head_test_without_volumes():
    workspace = Workspace(SAMPLES / "clay_liner")
    specimen = workspace.specimen_ids()[0]
    flow = workspace.flow_record(specimen)
    record = workspace.falling_head_record(specimen)
    state = workspace.permeation_state(specimen)
    # inflow a·(h0 − h), over Vv = V − Ms/(Gs·ρw) (Das & Sobhan)
    void = pore_volume(state["dry_mass"], state["specific_gravity"], state["volume"])
    expected = record.standpipe_area * (record.head[0] - record.head[-1]) / void
    assert flow.total_pore_volumes == pytest.approx(expected)
    assert flow.ratio.size == 0 and "outflow not recorded" in flow.notes
    assert np.all(np.diff(flow.pore_volumes) >= -1e-12)


@pytest.mark.parametrize("block", [1, 3, 1 << 16])
def test_an_inflow_from_the_fall_of_the_head_is_formed_when_read_with_the_same_numbers(
    monkeypatch, block
):
    # the record holds no array of a·(h0 − h); its pore volumes at the spans' middles are
    # numpy's own linear interpolation in the whole inflow (numpy.interp, the reference),
    # to the bit, whatever the block the interpolation is taken in
    from kitchen.reduction import test_record

    monkeypatch.setattr(test_record, "INTERPOLATION_BLOCK", block)
    workspace = Workspace(SAMPLES / "clay_liner")
    for specimen in workspace.specimen_ids()[:4]:
        flow = workspace.flow_record(specimen)
        record = workspace.falling_head_record(specimen)
        assert flow.measured_inflow is None and flow.head_fall is not None
        inflow = (record.head[0] - record.head) * record.standpipe_area
        assert np.array_equal(flow.inflow, inflow)
        expected = np.interp(flow.k_time, flow.time, inflow) / flow.void_volume
        assert np.array_equal(flow.k_pore_volumes, expected)
        assert flow.total_pore_volumes == inflow[-1] / flow.void_volume


def test_burette_volumes_give_outflow_over_inflow_near_the_generated_ratio():
    workspace = Workspace(SAMPLES / "flexible_wall_clay")
    flow = workspace.flow_record("FW-01")
    # the generator makes the outflow 0.98 ± 0.005 of the inflow (its own seeded ratio),
    # read to 0.1 mm on 8 mm burettes; the ratios over two-hour intervals scatter about it
    late = flow.ratio[flow.ratio_time > 6 * 3600]
    assert np.median(late) == pytest.approx(0.98, abs=0.02)
    assert flow.k_pore_volumes.size == flow.k.size


def test_constant_head_flow_adds_up_the_collections():
    workspace = Workspace(SAMPLES / "drainage_sand")
    specimen = workspace.specimen_ids()[0]
    collections = workspace.readings(specimen, "constant_head")
    flow = workspace.flow_record(specimen, "constant_head")
    assert flow.time[-1] == pytest.approx(collections["duration"].sum())
    assert flow.outflow[-1] == pytest.approx(collections["volume"].sum())
    assert np.isnan(flow.inflow).all() and flow.ratio.size == 0
    analysis = workspace.constant_head(specimen)
    assert flow.k == pytest.approx(analysis.k_each)
    assert math.isfinite(flow.total_pore_volumes)
