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
