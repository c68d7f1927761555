"""The series across compaction states: the compaction plane, trends of k, the criterion.

Once each specimen is reduced, the series is read as a whole. One result is kept per
specimen, and, when the test is valid (or kept on record by the engineer with a reason),
its k and interval are judged against the project's criterion: meets, does not meet, or
not conclusive where the interval straddles it (where no criterion is given, no verdict is
drawn and no zone: a limit is never assumed); a test that is not valid is not judged,
and is left out of the zone and the fits. On the compaction plane
(molding water content across, dry density up) sit the zero-air-voids and
constant-saturation lines, one compaction curve per compactive effort, the line of
optimums, and the acceptable zone around the specimens that meet (Daniel & Benson 1990).
Log k is fitted against void ratio, dry density and water content relative to optimum,
the series is summarised by its geometric mean, and the predictions from grading are shown
beside the measurements, never as measurements. :func:`analyse_series` does all of it in
one call, leaving out, with the reason in its notes, what the data do not allow. Nothing
here draws: :mod:`kitchen.charts` does.

Modules, in the data's order:

- :mod:`.result_selection`: one result per specimen from the results table, k and verdict.
- :mod:`.criterion`: the :class:`Criterion` on k (largest allowed, smallest required).
- :mod:`.saturation_lines`: the zero-air-voids and constant-saturation lines.
- :mod:`.compaction`: each effort's compaction curve, and the line of optimums.
- :mod:`.compaction_zone`: the acceptable zone, the hull of the specimens that meet with no
  other specimen inside.
- :mod:`.fitted_zone`: log10 k20 fitted over the compaction plane, and the zone where its
  prediction bound meets the criterion.
- :mod:`.trends`: log k against void ratio, dry density and w − w_opt; the geometric mean.
- :mod:`.grading`: Hazen, Chapuis and Kozeny–Carman predictions, with their ranges.
- :mod:`.series_analysis`: all of them in one call, on the result chosen for each specimen.
- :mod:`._checks`: the input checks they share, bad values named by position or file row.

The public face, which other subpackages import from :mod:`kitchen.analysis` and never from
its modules: :data:`REQUIRED_COLUMNS`; :class:`Criterion`, :func:`as_criterion`,
:func:`parse_criterion`, :func:`classify_against_criterion`, :data:`CRITERION_KINDS`, :data:`MEETS`,
:data:`DOES_NOT_MEET`, :data:`NOT_CONCLUSIVE`, :data:`NOT_JUDGED` and
:data:`NO_CRITERION`;
:func:`zero_air_voids_dry_density` and :func:`constant_saturation_dry_density`;
:func:`fit_compaction_curve`, :func:`compaction_curves` (:class:`CompactionCurve`) and
:func:`line_of_optimums` (:class:`LineOfOptimums`); :func:`acceptable_zone`
(:class:`AcceptableZone`); :func:`fit_zone`
(:class:`FittedZone`, :class:`FittedParameter`, :class:`NextSpecimen`) and
:data:`FITTED_ZONE_ASSUMPTIONS`;
:func:`fit_log_conductivity` (:class:`ConductivityTrend`),
:func:`fit_log_conductivity_void_ratio` (:class:`VoidRatioTrend`) and
:func:`geometric_mean_conductivity` (:class:`GeometricMean`); :func:`hazen_conductivity`,
:func:`chapuis_conductivity`, :func:`kozeny_carman_ratio` and :func:`grading_predictions`
(:class:`GradingPrediction`), with the ranges they hold in, :data:`HAZEN_VALIDITY`,
:data:`CHAPUIS_VALIDITY` and :data:`KOZENY_CARMAN_VALIDITY`; :func:`analyse_series`
(:class:`SeriesAnalysis`), :data:`ANALYSIS_METHODS`, :data:`SATURATION_LINES`, :data:`VERDICTS`,
:data:`VERDICTS_WITHOUT_CRITERION` and :data:`NO_CRITERION_NOTE`.

References
----------
Daniel, D. E. and Benson, C. H. (1990). Water content–density criteria for compacted soil
liners. Journal of Geotechnical Engineering 116(12), 1811–1830 (the line of optimums and
the acceptable zone on the compaction plane; pages from memory).
ASTM D698 and ASTM D1557 (laboratory compaction characteristics of soil using standard and
modified effort): the compaction curve and its optimum (from memory).
Das, B. M. and Sobhan, K., *Principles of Geotechnical Engineering*: weight–volume
relationships (ρd = Gs·ρw/(1 + e) with S·e = w·Gs), the compaction chapter, and the
permeability chapter (Hazen's equation, the Kozeny–Carman ratio) (from memory); Holtz,
R. D. and Kovacs, W. D., *An Introduction to Geotechnical Engineering*, compaction chapter
(from memory).
Mitchell, J. K., Hooper, D. R. and Campanella, R. G. (1965). Permeability of compacted
clay. Journal of the Soil Mechanics and Foundations Division 91(SM4), 41–65 (pages from
memory).
Tavenas, F., Jean, P., Leblond, P. and Leroueil, S. (1983). The permeability of natural
soft clays. Part II: Permeability characteristics. Canadian Geotechnical Journal 20(4),
645–660 (title and pages from memory).
Hazen, A. (1892), as given in Das and Sobhan (from memory); its range of d10 as quoted
there and by Carrier, W. D. (2003), J. Geotech. Geoenviron. Eng. 129(11), 1054–1056 (from
memory).
Chapuis, R. P. (2004). Predicting the saturated hydraulic conductivity of sand and gravel
using effective diameter and void ratio. Canadian Geotechnical Journal 41(5), 787–795
(coefficients and range from memory).
Taylor, D. W. (1948). *Fundamentals of Soil Mechanics*, Wiley, permeability chapter
(Kozeny–Carman; from memory).
US 40 CFR 258.40 (design criteria for municipal solid waste landfills: compacted soil
liner of k ≤ 1×10⁻⁷ cm/s); Council Directive 1999/31/EC on the landfill of waste, Annex I
(geological barrier k ≤ 1×10⁻⁹ m/s): criteria a project may follow; the criterion is an
input.
The geometric mean of a series: k is roughly log-normal (common practice, no source).
"""

from kitchen import _lazy

__getattr__, __dir__ = _lazy.lazy_face(
    __name__,
    {
        "CompactionCurve": "compaction",
        "LineOfOptimums": "compaction",
        "compaction_curves": "compaction",
        "fit_compaction_curve": "compaction",
        "line_of_optimums": "compaction",
        "AcceptableZone": "compaction_zone",
        "acceptable_zone": "compaction_zone",
        "CRITERION_KINDS": "criterion",
        "DOES_NOT_MEET": "criterion",
        "MEETS": "criterion",
        "NO_CRITERION": "criterion",
        "NOT_CONCLUSIVE": "criterion",
        "NOT_JUDGED": "criterion",
        "Criterion": "criterion",
        "as_criterion": "criterion",
        "classify_against_criterion": "criterion",
        "parse_criterion": "criterion",
        "FITTED_ZONE_ASSUMPTIONS": "fitted_zone",
        "FittedParameter": "fitted_zone",
        "FittedZone": "fitted_zone",
        "NextSpecimen": "fitted_zone",
        "fit_zone": "fitted_zone",
        "CHAPUIS_VALIDITY": "grading",
        "HAZEN_VALIDITY": "grading",
        "KOZENY_CARMAN_VALIDITY": "grading",
        "GradingPrediction": "grading",
        "chapuis_conductivity": "grading",
        "grading_predictions": "grading",
        "hazen_conductivity": "grading",
        "kozeny_carman_ratio": "grading",
        "REQUIRED_COLUMNS": "result_selection",
        "constant_saturation_dry_density": "saturation_lines",
        "zero_air_voids_dry_density": "saturation_lines",
        "ANALYSIS_METHODS": "series_analysis",
        "NO_CRITERION_NOTE": "series_analysis",
        "SATURATION_LINES": "series_analysis",
        "VERDICTS": "series_analysis",
        "VERDICTS_WITHOUT_CRITERION": "series_analysis",
        "SeriesAnalysis": "series_analysis",
        "analyse_series": "series_analysis",
        "ConductivityTrend": "trends",
        "GeometricMean": "trends",
        "VoidRatioTrend": "trends",
        "fit_log_conductivity": "trends",
        "fit_log_conductivity_void_ratio": "trends",
        "geometric_mean_conductivity": "trends",
    },
)

__all__ = [
    "acceptable_zone",
    "AcceptableZone",
    "analyse_series",
    "ANALYSIS_METHODS",
    "as_criterion",
    "chapuis_conductivity",
    "CHAPUIS_VALIDITY",
    "classify_against_criterion",
    "compaction_curves",
    "CompactionCurve",
    "ConductivityTrend",
    "constant_saturation_dry_density",
    "Criterion",
    "CRITERION_KINDS",
    "DOES_NOT_MEET",
    "fit_compaction_curve",
    "fit_zone",
    "FITTED_ZONE_ASSUMPTIONS",
    "FittedParameter",
    "FittedZone",
    "fit_log_conductivity",
    "fit_log_conductivity_void_ratio",
    "geometric_mean_conductivity",
    "GeometricMean",
    "grading_predictions",
    "GradingPrediction",
    "hazen_conductivity",
    "HAZEN_VALIDITY",
    "KOZENY_CARMAN_VALIDITY",
    "kozeny_carman_ratio",
    "line_of_optimums",
    "LineOfOptimums",
    "MEETS",
    "NextSpecimen",
    "NOT_CONCLUSIVE",
    "NO_CRITERION",
    "NO_CRITERION_NOTE",
    "NOT_JUDGED",
    "parse_criterion",
    "REQUIRED_COLUMNS",
    "SATURATION_LINES",
    "SeriesAnalysis",
    "VERDICTS",
    "VERDICTS_WITHOUT_CRITERION",
    "VoidRatioTrend",
    "zero_air_voids_dry_density",
]
