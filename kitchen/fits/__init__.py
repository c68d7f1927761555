"""FACE-DOCSTRING"""

from .curvature import (
    CurvatureTest,
    RunsTest,
    curvature_test,
    runs_test,
    sign_runs_test,
)
from .decay import (
    DecayFit,
    fit_exponential_decay,
)
from .line import (
    LinearFit,
    ProportionalFit,
    fit_line,
    fit_through_origin,
)
from .windowed import (
    WindowedLineFit,
)

__all__ = [
    "curvature_test",
    "CurvatureTest",
    "DecayFit",
    "fit_exponential_decay",
    "fit_line",
    "fit_through_origin",
    "LinearFit",
    "ProportionalFit",
    "runs_test",
    "RunsTest",
    "sign_runs_test",
    "WindowedLineFit",
]
