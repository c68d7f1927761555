"""Digests of a table's values, and each specimen's rows, checked against pandas' grouping."""

import numpy as np
import pandas as pd

from kitchen.workspace import frame_digest
from kitchen.workspace.digests import specimen_positions, specimen_spans


def test_frame_digest_follows_the_values_not_the_index():
    frame = pd.DataFrame({"time": [0.0, 60.0], "head": [1.0, 0.9], "specimen": ["A", "A"]})
    same = frame.set_axis([10, 11])
    changed = frame.assign(head=[1.0, 0.9000001])
    assert frame_digest(frame) == frame_digest(same)
    assert frame_digest(frame) != frame_digest(changed)
    assert frame_digest(frame, skip=("specimen",)) == frame_digest(
        frame.assign(specimen="B"), skip=("specimen",)
    )
    assert frame_digest(frame) != frame_digest(frame.assign(specimen="B"))


def test_specimen_rows_are_those_pandas_groups():
    # pandas' own grouping (DataFrame.groupby(...).indices, a reference library) gives the
    # row positions of each specimen, in any arrangement; a contiguous table gives the same
    # positions as one span each
    mixed = pd.DataFrame({"specimen": ["B", "A", "B", "C", "A"], "head": np.arange(5.0)})
    expected = mixed.groupby("specimen", sort=False).indices
    groups = specimen_positions(mixed)
    assert list(groups) == ["B", "A", "C"]
    for specimen, positions in expected.items():
        assert groups[specimen].tolist() == positions.tolist()
    contiguous = mixed.sort_values("specimen", kind="stable").reset_index(drop=True)
    spans = specimen_spans(contiguous)
    for specimen, positions in contiguous.groupby("specimen").indices.items():
        start, stop = spans[specimen]
        assert list(range(start, stop)) == positions.tolist()
    assert specimen_spans(contiguous.iloc[:0]) == {}
