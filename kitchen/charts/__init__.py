"""FACE-DOCSTRING"""

from .compaction import (
    compaction_conductivity_figure,
    compaction_conductivity_spec,
)
from .conductivity_trend import (
    conductivity_trend_figure,
)
from .specimen import (
    constant_head_figure,
    falling_head_figure,
    falling_head_spec,
)
from .style import (
    EFFORT_DASHES,
    EFFORT_SYMBOLS,
    FONT,
    GRID,
    HEIGHT,
    INK,
    MAX_TRACE_POINTS,
    MUTED,
    NO_EFFORT,
    SATURATION_DASHES,
    VERDICT_COLOURS,
    VERDICT_FILL,
    WIDTH,
    ZONE,
    add_caption,
    decimation_indices,
    memo_template,
)

__all__ = [
    "add_caption",
    "compaction_conductivity_figure",
    "compaction_conductivity_spec",
    "conductivity_trend_figure",
    "constant_head_figure",
    "decimation_indices",
    "EFFORT_DASHES",
    "EFFORT_SYMBOLS",
    "falling_head_figure",
    "falling_head_spec",
    "FONT",
    "GRID",
    "HEIGHT",
    "INK",
    "MAX_TRACE_POINTS",
    "memo_template",
    "MUTED",
    "NO_EFFORT",
    "SATURATION_DASHES",
    "VERDICT_COLOURS",
    "VERDICT_FILL",
    "WIDTH",
    "ZONE",
]
