"""The window proposal against a refit of every window, and the criteria it honours."""

import numpy as np
from synthetic_records import drifting_log_head

from kitchen.fits import curvature_test
from kitchen.validity import (
    Criteria,
    propose_window,
    recommended_maximum_gradient,
    window_trends,
)

D5084 = Criteria()


# ----------------------------------------------------------------- the window proposal
def _transient_record(n=300, seed=8):
    t = np.linspace(0.0, 10 * 3600.0, n)
    rate = 1.0 / (20 * 3600.0) * (1 + 1.5 * np.exp(-t / 1800.0))
    log_h = np.concatenate(([0.0], -np.cumsum(0.5 * (rate[1:] + rate[:-1]) * np.diff(t))))
    return t, log_h + np.random.default_rng(seed).normal(0, 2e-4, n)


def test_proposal_agrees_with_refitting_every_window():
    # Suffix sums against a refit of every window from scratch (curvature_test per start).
    t, y = _transient_record()
    proposal = propose_window(t, y, np.full(t.size, 1.0), 1e-3, D5084)
    first = next(
        s for s in range(0, 151) if curvature_test(t[s:], y[s:]).p_value >= D5084.trend_level
    )
    assert proposal.meets_criteria
    assert (proposal.start, proposal.stop) == (first, t.size)
    assert 0 < proposal.start < 150


def test_trends_block_by_block_are_the_whole_record_computation_to_the_last_bit():
    # The working arrays are a few blocks long; the sums still run one reading at a time
    # from the last, so every slope and verdict equals the one-block computation exactly.
    t, y = _transient_record(n=1001)
    whole = window_trends(t, y, D5084, block=t.size)
    assert 0 < whole.trend_ok.sum() < whole.starts  # both verdicts occur
    for block in (1, 7, 64, 500):
        blocks = window_trends(t, y, D5084, block=block)
        assert (blocks.n, blocks.starts, blocks.span) == (whole.n, whole.starts, whole.span)
        assert np.array_equal(blocks.slope, whole.slope)
        assert np.array_equal(blocks.trend_ok, whole.trend_ok)


def test_proposal_keeps_every_reading_of_a_steady_record():
    t, y = drifting_log_head(0.0, 3e-4, n=80)
    proposal = propose_window(t, y, np.full(t.size, 1.0), 1e-3, D5084)
    assert (proposal.start, proposal.meets_criteria) == (0, True)


def test_proposal_refuses_a_drift():
    t, y = drifting_log_head(-0.5, 3e-4, n=80)
    proposal = propose_window(t, y, np.full(t.size, 1.0), 1e-3, D5084)
    assert (proposal.start, proposal.stop, proposal.meets_criteria) == (0, 80, False)
    assert "50 % of the readings" in proposal.reason


def test_proposal_honours_the_gradient_and_flow_limits():
    t, y = drifting_log_head(0.0, 3e-4, n=80)
    k = 1.0 / (10 * 3600.0) * 1e-4  # scale 1e-4 m: k = 2.8e-9 m/s, limit 20
    gradient = np.where(np.arange(80) < 10, 25.0, 15.0)
    proposal = propose_window(t, y, gradient, 1e-4, D5084)
    assert recommended_maximum_gradient(k) == 20.0
    assert proposal.start == 10
    # Inflow 1 mL per interval; no outflow over the first 39 intervals, then 1 mL each:
    # outflow/inflow from reading s is 40/(79 - s), at least 0.75 from s = 26 (by hand).
    inflow = np.arange(80) * 1e-6
    outflow = np.maximum(np.arange(80) - 39, 0) * 1e-6
    proposal = propose_window(t, y, np.full(80, 1.0), 1e-4, D5084, inflow=inflow, outflow=outflow)
    assert proposal.start == 26
