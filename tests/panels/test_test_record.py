"""The test-record panel: choose a test, see its report items and its course over time."""

import numpy as np
import pytest
from series_files import SAMPLES

from kitchen.memo import NOT_RECORDED
from kitchen.panels import record_panel
from kitchen.workspace import Workspace


def test_choosing_a_test_redraws_its_record_and_items():
    workspace = Workspace(SAMPLES / "flexible_wall_clay")
    panel = record_panel(workspace)
    first = np.asarray(panel.figure.data[0].y).copy()
    items = {item.item: item.value for item in panel.shown}
    assert items["permeameter"] == "flexible wall"
    panel.test.value = ("FW-03", "falling_head")
    assert not np.array_equal(np.asarray(panel.figure.data[0].y), first)
    assert "B-value at the end of saturation" in panel.items.value
    changed = {item.item: item.value for item in panel.shown}
    assert changed["specimen"] == "FW-03"
    assert changed["change of volume during the test"] == "swelled 2.1 %"
    panel.k_unit.value = "cm/s"
    assert "cm/s" in panel.figure.layout.yaxis.title.text


def test_a_rigid_wall_test_shows_what_was_not_recorded():
    panel = record_panel(SAMPLES / "clay_liner", specimen="QF-02")
    assert panel.test.value == ("QF-02", "falling_head")
    assert f"<em>{NOT_RECORDED}</em>" in panel.items.value
    assert "not applicable: rigid-wall cell" in panel.items.value


def test_an_unknown_specimen_is_refused():
    with pytest.raises(ValueError, match="specimen 'ZZ' has no test"):
        record_panel(SAMPLES / "drainage_sand", specimen="ZZ")
