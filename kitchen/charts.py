"""Figures for the series memo: plain plotly figures, drawn the same way in notebook and print.

Every builder returns a new :class:`plotly.graph_objects.Figure` and leaves its inputs
alone. Axis titles carry their units; the conductivity unit (m/s, cm/s) and the density
unit (Mg/m³, kN/m³, lb/ft³) are options. The look is the memo style of this package: a
serif face, a dark ink, and three verdict colours that are never the only cue — compactive
effort is told by marker shape and line dash, the verdict by marker fill (filled: meets,
open: does not meet, open with a dot: not conclusive), so a chart still reads in
greyscale print.

The builders live in modules of their own: the style, decimation and captions in
:mod:`kitchen.chart_style`, the pieces the series charts share in
:mod:`kitchen.series_chart_parts`, the compaction–conductivity chart in
:mod:`kitchen.compaction_chart`, the trend chart in :mod:`kitchen.conductivity_trend_chart`
and the specimen charts in :mod:`kitchen.specimen_charts`. Their names are importable
from here.
"""

from __future__ import annotations

from .chart_style import EFFORT_DASHES as EFFORT_DASHES
from .chart_style import EFFORT_SYMBOLS as EFFORT_SYMBOLS
from .chart_style import FONT as FONT
from .chart_style import GRID as GRID
from .chart_style import HEIGHT as HEIGHT
from .chart_style import INK as INK
from .chart_style import MAX_TRACE_POINTS, add_caption, decimation_indices, memo_template
from .chart_style import MUTED as MUTED
from .chart_style import NO_EFFORT as NO_EFFORT
from .chart_style import SATURATION_DASHES as SATURATION_DASHES
from .chart_style import VERDICT_COLOURS as VERDICT_COLOURS
from .chart_style import VERDICT_FILL as VERDICT_FILL
from .chart_style import WIDTH as WIDTH
from .chart_style import ZONE as ZONE
from .compaction_chart import compaction_conductivity_figure, compaction_conductivity_spec
from .conductivity_trend_chart import conductivity_trend_figure
from .series_chart_parts import CRITERION_REACH as CRITERION_REACH
from .series_chart_parts import ERROR_BAR_FRACTION as ERROR_BAR_FRACTION
from .specimen_charts import constant_head_figure, falling_head_figure, falling_head_spec

__all__ = [
    "MAX_TRACE_POINTS",
    "memo_template",
    "decimation_indices",
    "add_caption",
    "compaction_conductivity_figure",
    "compaction_conductivity_spec",
    "conductivity_trend_figure",
    "falling_head_figure",
    "falling_head_spec",
    "constant_head_figure",
]
