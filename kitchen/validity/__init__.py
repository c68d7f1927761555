"""FACE-DOCSTRING"""

from .checks import (
    datum_check,
    flow_ratio_check,
    gradient_check,
    gradient_independence_check,
    is_valid,
    reynolds_check,
    reynolds_number,
    steady_values_check,
    trend_check,
)
from .criteria import (
    GRADIENT_TABLE,
    Criteria,
    Verdict,
    recommended_maximum_gradient,
)
from .window_proposal import (
    WindowProposal,
    WindowTrends,
    propose_window,
    window_trends,
)

__all__ = [
    "Criteria",
    "datum_check",
    "flow_ratio_check",
    "gradient_check",
    "gradient_independence_check",
    "GRADIENT_TABLE",
    "is_valid",
    "propose_window",
    "recommended_maximum_gradient",
    "reynolds_check",
    "reynolds_number",
    "steady_values_check",
    "trend_check",
    "Verdict",
    "window_trends",
    "WindowProposal",
    "WindowTrends",
]
