"""FACE-DOCSTRING"""

from .compaction import (
    CompactionCurve,
    LineOfOptimums,
    compaction_curves,
    fit_compaction_curve,
    line_of_optimums,
)
from .compaction_zone import (
    AcceptableZone,
    acceptable_zone,
)
from .criterion import (
    CRITERION_KINDS,
    DOES_NOT_MEET,
    MEETS,
    NOT_CONCLUSIVE,
    Criterion,
    as_criterion,
    classify_against_criterion,
)
from .grading import (
    GradingPrediction,
    chapuis_conductivity,
    grading_predictions,
    hazen_conductivity,
    kozeny_carman_ratio,
)
from .result_selection import (
    REQUIRED_COLUMNS,
)
from .saturation_lines import (
    constant_saturation_dry_density,
    zero_air_voids_dry_density,
)
from .series_analysis import (
    ANALYSIS_METHODS,
    SATURATION_LINES,
    VERDICTS,
    SeriesAnalysis,
    analyse_series,
)
from .trends import (
    ConductivityTrend,
    GeometricMean,
    VoidRatioTrend,
    fit_log_conductivity,
    fit_log_conductivity_void_ratio,
    geometric_mean_conductivity,
)

__all__ = [
    "acceptable_zone",
    "AcceptableZone",
    "analyse_series",
    "ANALYSIS_METHODS",
    "as_criterion",
    "chapuis_conductivity",
    "classify_against_criterion",
    "compaction_curves",
    "CompactionCurve",
    "ConductivityTrend",
    "constant_saturation_dry_density",
    "Criterion",
    "CRITERION_KINDS",
    "DOES_NOT_MEET",
    "fit_compaction_curve",
    "fit_log_conductivity",
    "fit_log_conductivity_void_ratio",
    "geometric_mean_conductivity",
    "GeometricMean",
    "grading_predictions",
    "GradingPrediction",
    "hazen_conductivity",
    "kozeny_carman_ratio",
    "line_of_optimums",
    "LineOfOptimums",
    "MEETS",
    "NOT_CONCLUSIVE",
    "REQUIRED_COLUMNS",
    "SATURATION_LINES",
    "SeriesAnalysis",
    "VERDICTS",
    "VoidRatioTrend",
    "zero_air_voids_dry_density",
]
