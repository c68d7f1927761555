"""FACE-DOCSTRING"""

from .constant_head import (
    ConstantHeadAnalysis,
    ConstantHeadResult,
    constant_head_analysis,
    reduce_constant_head,
)
from .constant_head_collections import (
    collection_table,
    constant_head_conductivity,
    darcy_velocity,
    hydraulic_gradient,
)
from .falling_head import (
    FallingHeadResult,
    falling_head_analysis,
    reduce_falling_head,
)
from .falling_head_evidence import (
    FallingHeadAnalysis,
)
from .falling_head_formulas import (
    effective_standpipe_area,
    falling_head_conductivity,
    incremental_conductivity,
    jurin_capillary_rise,
    reading_window,
    reference_elapsed_time,
    rising_tailwater_conductivity,
)
from .falling_head_record import (
    FallingHeadRecord,
)
from .results import (
    result_row,
    results_table,
    series_results,
)

__all__ = [
    "collection_table",
    "constant_head_analysis",
    "constant_head_conductivity",
    "ConstantHeadAnalysis",
    "ConstantHeadResult",
    "darcy_velocity",
    "effective_standpipe_area",
    "falling_head_analysis",
    "falling_head_conductivity",
    "FallingHeadAnalysis",
    "FallingHeadRecord",
    "FallingHeadResult",
    "hydraulic_gradient",
    "incremental_conductivity",
    "jurin_capillary_rise",
    "reading_window",
    "reduce_constant_head",
    "reduce_falling_head",
    "reference_elapsed_time",
    "result_row",
    "results_table",
    "rising_tailwater_conductivity",
    "series_results",
]
