"""The pieces the series charts share: marker shape by effort, fill by verdict, escaped labels."""

import pytest
from chart_series import sample_series, specimen_traces, wide_analysis

from kitchen.analysis import DOES_NOT_MEET, MEETS, NOT_CONCLUSIVE, NOT_JUDGED
from kitchen.charts import VERDICT_COLOURS, VERDICT_FACE
from kitchen.charts import compaction as compaction_chart
from kitchen.charts import conductivity_trend as conductivity_trend_chart


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


def _grey(colour: str) -> float:
    """Relative luminance of an sRGB colour, 0 (black) to 1 (white): WCAG 2.1, definition of
    relative luminance (from memory)."""
    channels = [int(colour[i : i + 2], 16) / 255 for i in (1, 3, 5)]
    linear = [c / 12.92 if c <= 0.04045 else ((c + 0.055) / 1.055) ** 2.4 for c in channels]
    return 0.2126 * linear[0] + 0.7152 * linear[1] + 0.0722 * linear[2]


def test_a_test_not_judged_has_a_marker_of_its_own_that_reads_in_greyscale():
    # QF-04 fails its trend check by design (sample_data/README.md): not judged
    _, analysis = sample_series("clay_liner")
    for figure in (
        compaction_chart.compaction_conductivity_figure(analysis),
        conductivity_trend_chart.conductivity_trend_figure(analysis, "void_ratio"),
    ):
        marked = [t for t in figure.data if t.meta and "verdict" in t.meta and "QF-04" in t.text]
        assert marked and {t.meta["verdict"] for t in marked} == {NOT_JUDGED}
        for marker in (t.marker for t in marked):
            assert "-open" not in marker.symbol and marker.color == VERDICT_FACE[NOT_JUDGED]
            assert marker.line.color == VERDICT_COLOURS[NOT_JUDGED] != marker.color
    # filled and dark, pale in a dark outline, open: three greys a printer keeps apart
    # (a luminance step of 0.3 or more is the tool's own choice)
    filled, pale = _grey(VERDICT_FACE[MEETS]), _grey(VERDICT_FACE[NOT_JUDGED])
    assert pale - filled >= 0.3 and 1.0 - pale >= 0.3
    assert _grey(VERDICT_COLOURS[NOT_JUDGED]) <= filled + 0.05  # its outline is as dark
    # five: the verdict of a valid test with no criterion given has a colour of its own too
    assert len(set(VERDICT_COLOURS.values())) == len(VERDICT_COLOURS) == 5
