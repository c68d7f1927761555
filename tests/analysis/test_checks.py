"""Tests for kitchen.analysis._checks: bad input named where it is, results in the input's kind.

The places a message must name are those of the input itself: a Series' index labels, an
array's positions, and a table's file lines (``source_row``, the header being line 1) with
its specimen ids. The kinds returned are numpy's and pandas' own types.
"""

import numpy as np
import pandas as pd
import pytest

from kitchen.analysis._checks import (
    checked_confidence,
    column_numbers,
    conductivity_values,
    finite_numbers,
    like_inputs,
    require_columns,
    require_same_length,
)


def test_a_bad_element_is_named_by_its_index_label_or_its_position():
    # the index label 'b' is the Series' own; for an array, the position is numpy's index
    with pytest.raises(ValueError, match=r"x: expected a finite number .*; got inf at index 'b'$"):
        finite_numbers(pd.Series([1.0, np.inf], index=["a", "b"]), "x")
    with pytest.raises(ValueError, match="got nan at position 1, nan at position 3$"):
        finite_numbers([1.0, np.nan, 2.0, np.nan], "x")
    with pytest.raises(
        ValueError, match="at position 4 and 2 more$"
    ):  # five named, the rest counted
        finite_numbers([np.nan] * 7, "x")
    with pytest.raises(ValueError, match="x: expected numbers"):
        finite_numbers("wet", "x")


def test_a_bad_table_value_is_named_by_its_file_line_and_specimen():
    # the file line is the one written in source_row (line 3 of the file), not the frame's
    # position; without source_row the frame's index label is named instead
    table = pd.DataFrame({"specimen": ["A1", "A2"], "source_row": [2, 3], "d10": [1e-4, "wet"]})
    with pytest.raises(ValueError, match=r"column 'd10': .*; row 3 \(specimen 'A2'\): 'wet'$"):
        column_numbers(table, "d10", allow_missing=True)
    table = pd.DataFrame({"specimen": ["A1", "A2"], "d10": [1e-4, np.nan]}, index=[5, 6])
    np.testing.assert_array_equal(column_numbers(table, "d10", allow_missing=True), [1e-4, np.nan])
    with pytest.raises(ValueError, match=r"index 6 \(specimen 'A2'\): nan$"):
        column_numbers(table, "d10", allow_missing=False)


def test_missing_columns_and_lengths_are_listed():
    with pytest.raises(ValueError, match="missing column.*d10; required: specimen, d10; found"):
        require_columns(pd.DataFrame({"specimen": ["A1"]}), ("specimen", "d10"), "grading table")
    with pytest.raises(ValueError, match="expected a pandas DataFrame, got list"):
        require_columns([1], ("specimen",), "grading table")
    with pytest.raises(ValueError, match="one value per specimen; w has 2, rho has 3"):
        require_same_length(w=np.zeros(2), rho=np.zeros(3))


def test_conductivity_and_confidence_are_refused_outside_their_ranges():
    with pytest.raises(ValueError, match="k: expected a positive hydraulic conductivity in m/s"):
        conductivity_values([1e-9, 0.0])
    with pytest.raises(ValueError, match=r"a fraction between 0 and 1 \(0.95\); got 95"):
        checked_confidence(95)
    assert checked_confidence(0.9) == 0.9


def test_a_result_comes_back_in_the_kind_of_the_inputs():
    # the kinds are pandas.Series (with the input's index), numpy.ndarray and Python float
    series = like_inputs(np.array([1.0, 2.0]), pd.Series([0, 0], index=["p", "q"]), 3.0)
    assert isinstance(series, pd.Series) and list(series.index) == ["p", "q"]
    assert isinstance(like_inputs(np.array([1.0, 2.0]), [1, 2]), np.ndarray)
    assert type(like_inputs(np.asarray(2.0), 1.0)) is float
