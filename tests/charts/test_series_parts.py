"""The pieces the series charts share: marker shape by effort, fill by verdict, escaped labels."""

import pytest
from chart_series import specimen_traces, wide_analysis

from kitchen.analysis import DOES_NOT_MEET, MEETS, NOT_CONCLUSIVE
from kitchen.charts import compaction as compaction_chart


@pytest.fixture(scope="module")
def wide():
    return wide_analysis()


def test_markers_tell_effort_by_shape_and_verdict_by_fill(wide):
    figure = compaction_chart.compaction_conductivity_figure(wide)
    shapes = {}
    for trace in specimen_traces(figure):
        effort, verdict = trace.meta["effort"], trace.meta["verdict"]
        symbol = trace.marker.symbol
        suffix = {MEETS: "", DOES_NOT_MEET: "-open", NOT_CONCLUSIVE: "-open-dot"}[verdict]
        assert symbol.endswith(suffix) if suffix else "-open" not in symbol
        shapes.setdefault(effort, set()).add(symbol.removesuffix(suffix))
    assert all(len(s) == 1 for s in shapes.values())  # one shape per effort
    assert len(set().union(*shapes.values())) == len(shapes)  # a different one for each
    verdicts = {t.meta["verdict"] for t in specimen_traces(figure)}
    assert verdicts == {MEETS, DOES_NOT_MEET, NOT_CONCLUSIVE}


def test_input_text_is_escaped_in_labels(wide):
    figure = compaction_chart.compaction_conductivity_figure(wide)
    hover = " ".join(h for t in specimen_traces(figure) for h in t.hovertext)
    assert "&lt;b&gt;W0&lt;/b&gt;" in hover and "<b>W0</b>" not in hover
