"""The series analysis in one call: everything the charts and the memo draw on.

:func:`analyse_series` takes the results table (:func:`kitchen.reduction.series_results`)
and the criterion, keeps one result per specimen, marks each against the criterion, and
runs the analyses of :mod:`kitchen.analysis.compaction` and :mod:`kitchen.analysis.trends` that
the data allow: compaction curves and the line of optimums, the saturation lines, the acceptable
zone, log k against void ratio, dry density and water content relative to optimum, the
geometric mean, and the predictions from grading. An analysis the data do not allow (too
few specimens, no water contents) is left out, with the reason in ``notes``. Which result
of each specimen is used, its k and interval, and its verdict are worked out in
:mod:`kitchen.analysis.result_selection`.
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass
from functools import partial
from types import MappingProxyType

import numpy as np
import pandas as pd

from .compaction import LineOfOptimums, compaction_curves, line_of_optimums
from .compaction_zone import AcceptableZone, acceptable_zone
from .criterion import (
    DOES_NOT_MEET,
    MEETS,
    NO_CRITERION,
    NOT_CONCLUSIVE,
    NOT_JUDGED,
    Criterion,
)
from .fitted_zone import FITTED_ZONE_ASSUMPTIONS, FITTED_ZONE_METHOD, FittedZone, fit_zone
from .grading import KOZENY_CARMAN_VALIDITY, grading_predictions, kozeny_carman_ratio
from .result_selection import REQUIRED_COLUMNS as REQUIRED_COLUMNS
from .result_selection import (
    criterion_verdicts,
    median_specific_gravity,
    one_result_per_specimen,
    require_results_table,
    usable_conductivity,
    validity_on_record,
)
from .saturation_lines import constant_saturation_dry_density
from .trends import (
    ConductivityTrend,
    GeometricMean,
    VoidRatioTrend,
    fit_log_conductivity,
    fit_log_conductivity_void_ratio,
    geometric_mean_conductivity,
)

__all__ = [
    "ANALYSIS_METHODS",
    "NO_CRITERION_NOTE",
    "SeriesAnalysis",
    "analyse_series",
    "VERDICTS",
    "VERDICTS_WITHOUT_CRITERION",
    "SATURATION_LINES",
]

VERDICTS = (MEETS, DOES_NOT_MEET, NOT_CONCLUSIVE, NOT_JUDGED)
"""The verdicts, in the order the charts list them: the three against the criterion, then
that of a test not valid, which is not judged against it."""

VERDICTS_WITHOUT_CRITERION = (NO_CRITERION, NOT_JUDGED)
"""The verdicts of an analysis without a criterion: a valid test (or one kept on record) is
"no criterion given", one not valid is not judged; the specimens differ by validity only."""

NO_CRITERION_NOTE = (
    "no criterion given: no verdicts and no acceptable zone; give one in the series' project "
    "table (project.csv, or a sheet 'project' of a workbook), with --criterion, or in the "
    "panel's criterion box"
)
"""The note of an analysis run without a criterion."""

ANALYSIS_METHODS = (
    (
        "one result per specimen",
        "the first result that passed every check, in the order of the results table "
        "(constant head before falling head); the first result when none passed",
        "the tool's own rule",
    ),
    (
        "validity before the verdict",
        "a test that failed a validity check is not judged against the criterion (neither "
        "meets nor does not meet), counted apart, and not used to draw the acceptable zone "
        "or to fit the compaction curves, the trends and the geometric mean, unless the "
        "engineer keeps it on record with a reason (an append-only log beside the series, "
        "listed in the memo)",
        "the tool's own rule; the validity checks are those of each test (ASTM D5084 "
        "termination criteria and the tool's own trend tests)",
    ),
    (
        "verdict against the criterion",
        "against a largest k allowed: meets where the upper end of the 95 % interval of k "
        "is at or below it, does not meet where the lower end is above it; against a "
        "smallest k required: meets where the lower end is at or above it, does not meet "
        "where the upper end is below it; not conclusive where the interval straddles the "
        "criterion (or there is no interval)",
        "the tool's own rule; criterion from the project specification (1×10⁻⁹ m/s is "
        "common for liners: US 40 CFR 258.40, EU Directive 1999/31/EC Annex I)",
    ),
    (
        "the criterion in force",
        "a criterion typed for the analysis (command line, panel) overrides the series' own "
        "(its project table); where none is given anywhere, no verdict is drawn and no "
        "acceptable zone: each specimen is 'no criterion given', or not judged when its test "
        "is not valid; the fits are drawn as usual",
        "the tool's own rule: no limit is assumed for a series that states none",
    ),
    (
        "compaction curve",
        "least-squares quadratic ρd(w) per compactive effort; optimum at its peak",
        "ASTM D698 / D1557 (peak of the compaction curve); the least-squares polynomial is "
        "common practice, no source",
    ),
    (
        "zero-air-voids and constant-saturation lines",
        "ρd = Gs·ρw/(1 + w·Gs/S), ρw = 1.000 Mg/m³",
        "Das & Sobhan, Principles of Geotechnical Engineering; Holtz & Kovacs",
    ),
    (
        "line of optimums",
        "straight line through the optimums of the efforts (least squares with three or more)",
        "Daniel & Benson (1990), J. Geotech. Eng. 116(12):1811",
    ),
    (
        "acceptable zone",
        "convex hull of the largest set of specimens that meet the criterion whose hull holds "
        "no other specimen (no specimen that does not meet, or is not judged, lies in it), on "
        "the w–ρd plane; the specimens that prevent a larger zone are named",
        "Daniel & Benson (1990), J. Geotech. Eng. 116(12):1811; the hull is the tool's own "
        "construction of the zone they draw by judgement",
    ),
    (
        "fitted zone",
        f"{FITTED_ZONE_METHOD}. {FITTED_ZONE_ASSUMPTIONS}",
        "least squares and the prediction interval: Montgomery & Runger, Applied Statistics "
        "and Probability for Engineers (from memory); regressions of k on compaction "
        "variables: Benson, Zhai & Wang (1994), J. Geotech. Eng. 120(2):366 (from memory); "
        "the zone is the tool's own construction",
    ),
    (
        "log k against void ratio",
        "least squares of log10 k on e, Ck = 1/slope, 95 % interval and band",
        "Tavenas, Jean, Leblond & Leroueil (1983), Can. Geotech. J. 20(4):645",
    ),
    (
        "log k against dry density and water content relative to optimum",
        "least squares of log10 k, 95 % interval and band",
        "Mitchell, Hooper & Campanella (1965), JSMFD 91(SM4); log-normal k is common "
        "practice, no source",
    ),
    (
        "geometric mean",
        "10^mean(log10 k), Student-t interval on mean log10 k",
        "common practice, no source",
    ),
    (
        "predictions from grading",
        "Hazen k = C·d10² (C = 100 cm⁻¹s⁻¹); Chapuis (2004) from d10 and e; Kozeny–Carman "
        "k ∝ e³/(1+e) through the geometric mean; predictions, not measurements",
        "Hazen (1892) in Das & Sobhan; Chapuis (2004), Can. Geotech. J. 41(5):787; "
        "Taylor (1948), Fundamentals of Soil Mechanics",
    ),
)
"""(step, method, source) of every analysis :func:`analyse_series` runs."""

SATURATION_LINES = (1.0, 0.9, 0.8)
"""Degrees of saturation of the lines drawn on the compaction plane (1.0 is zero-air-voids)."""


@dataclass(frozen=True)
class SeriesAnalysis:
    """Everything the series charts and the memo need, from one results table.

    Attributes
    ----------
    criterion : Criterion or None
        Largest conductivity allowed (kind ``"maximum"``) or smallest required (kind
        ``"minimum"``); a float in m/s. None when no criterion was given: then no verdict
        is drawn (every judged specimen is :data:`NO_CRITERION`) and there is no acceptable
        zone, drawn or fitted. [m/s]
    reference_temperature : float
        Temperature the conductivities are corrected to, for labels. [degC]
    confidence : float
        Confidence level of the fits' intervals and bands.
    specimens : pandas.DataFrame
        One row per specimen with a usable conductivity: the columns of the results table
        for the result kept, plus ``k``, ``k_low``, ``k_high`` [m/s] (the corrected k and
        its interval), ``valid`` (bool), ``kept_on_record`` (the engineer's record, in
        words, of a test kept despite a failed check; "" otherwise), ``judged`` (bool: valid
        or kept on record; only judged specimens enter the zone, the compaction curves, the
        trends and the geometric mean), ``verdict`` (one of :attr:`verdicts`: not judged
        where ``judged`` is False), ``meets`` (bool),
        ``water_content_from_optimum`` [-] (NaN where the effort has no optimum),
        ``on_compaction_plane`` (bool: has a water content) and ``in_zone`` (bool).
    specific_gravity : float or None
        Gs of the saturation lines; None when the results carry none. [-]
    compaction_curves : mapping of effort to CompactionCurve
    line_of_optimums : LineOfOptimums or None
    acceptable_zone : AcceptableZone or None
        None when no specimen has a water content, or no criterion was given.
    void_ratio_trend : VoidRatioTrend or None
    dry_density_trend : ConductivityTrend or None
        Fitted on dry density in kg/m3.
    water_content_trend : ConductivityTrend or None
        Fitted on w − w_opt (a fraction) of the specimens whose effort has an optimum.
    geometric_mean : GeometricMean or None
    grading : pandas.DataFrame or None
        :func:`kitchen.analysis.grading.grading_predictions` for the specimens with a d10.
    kozeny_carman_reference : (float, float) or None
        (void ratio, k [m/s]) the Kozeny–Carman curve passes through: the mean void ratio
        and the geometric mean of the specimens with a d10.
    notes : tuple of str
        What was left out and why, and cautions raised by the analyses.
    fitted_zone : FittedZone or None
        log10 k20 fitted over the compaction plane on the judged specimens, and where its
        prediction bound meets the criterion (:func:`kitchen.analysis.fit_zone`); None
        when the data do not allow it, or no criterion was given (the reason is in
        ``notes``).
    """

    criterion: Criterion | None
    reference_temperature: float
    confidence: float
    specimens: pd.DataFrame
    specific_gravity: float | None
    compaction_curves: MappingProxyType
    line_of_optimums: LineOfOptimums | None
    acceptable_zone: AcceptableZone | None
    void_ratio_trend: VoidRatioTrend | None
    dry_density_trend: ConductivityTrend | None
    water_content_trend: ConductivityTrend | None
    geometric_mean: GeometricMean | None
    grading: pd.DataFrame | None
    kozeny_carman_reference: tuple[float, float] | None
    notes: tuple[str, ...]
    fitted_zone: FittedZone | None = None

    @property
    def verdicts(self) -> tuple[str, ...]:
        """The verdicts a specimen may get here, in the order the charts list them:
        :data:`VERDICTS` against a criterion, :data:`VERDICTS_WITHOUT_CRITERION` without."""
        return VERDICTS if self.criterion is not None else VERDICTS_WITHOUT_CRITERION

    @property
    def zone_drawn(self) -> bool:
        """Whether there is an acceptable zone to lie in: a criterion was given and the
        specimens have water contents (``in_zone`` is False for every specimen otherwise,
        which says nothing about a zone that is not drawn)."""
        return self.acceptable_zone is not None

    def zone_membership(self) -> pd.Series:
        """Whether each specimen lies in the acceptable zone, as the tables show it: True
        or False where a zone is drawn and the specimen is on the compaction plane, ``<NA>``
        where there is no zone for it to lie in (no criterion given, no water contents).
        A nullable boolean Series aligned with :attr:`specimens`."""
        rows = self.specimens
        shown = rows["on_compaction_plane"].to_numpy(dtype=bool) & self.zone_drawn
        values = pd.array(rows["in_zone"].to_numpy(dtype=bool), dtype="boolean")
        values[~shown] = pd.NA
        return pd.Series(values, index=rows.index, name="in_zone")

    @property
    def counts(self) -> dict[str, int]:
        """Number of specimens per verdict, in the order of :attr:`verdicts`."""
        verdicts = self.specimens["verdict"]
        return {verdict: int((verdicts == verdict).sum()) for verdict in self.verdicts}

    def saturation_line(self, water_content, saturation):
        """Dry density on the constant-saturation line of the series' Gs. [kg/m3]

        `water_content` and `saturation` are fractions [-]; see
        :func:`kitchen.analysis.saturation_lines.constant_saturation_dry_density`.
        """
        if self.specific_gravity is None:
            raise ValueError("the series has no specific gravity: no saturation lines")
        return constant_saturation_dry_density(water_content, self.specific_gravity, saturation)

    def kozeny_carman_conductivity(self, void_ratio):
        """k on the Kozeny–Carman curve through ``kozeny_carman_reference``. [m/s]

        A prediction of how k changes with e for one sand (Taylor 1948), not a measurement.
        """
        if self.kozeny_carman_reference is None:
            raise ValueError("no specimen has a d10: no Kozeny–Carman curve")
        e_ref, k_ref = self.kozeny_carman_reference
        return k_ref * np.asarray(kozeny_carman_ratio(e_ref, void_ratio))


def _recorded(call, notes: list[str], prefix: str = ""):
    """Run `call`, turning its warnings and a ValueError into notes; None on error."""
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        try:
            value = call()
        except ValueError as error:
            notes.append(f"{prefix}{error}")
            value = None
    notes.extend(f"{prefix}{warning.message}" for warning in caught)
    return value


def _trend(frame, column, name, notes, confidence, label):
    values = frame[column].to_numpy(dtype=float)
    rows = ~np.isnan(values)
    if rows.sum() < 3:
        notes.append(f"{label}: fewer than 3 specimens with a value, no trend fitted")
        return None
    values, k = values[rows], frame["k"].to_numpy(dtype=float)[rows]
    if name == "void_ratio":
        return _recorded(
            lambda: fit_log_conductivity_void_ratio(values, k, confidence=confidence),
            notes,
            f"{label}: ",
        )
    return _recorded(
        lambda: fit_log_conductivity(values, k, name, confidence=confidence), notes, f"{label}: "
    )


def analyse_series(
    results: pd.DataFrame,
    criterion: float | None = None,
    reference_temperature: float = 20.0,
    confidence: float = 0.95,
    curve_method: str = "quadratic",
    kept=None,
) -> SeriesAnalysis:
    """Run the series analyses that the results allow.

    Parameters
    ----------
    results : pandas.DataFrame
        The results table of :func:`kitchen.reduction.results.series_results` (extra columns are
        carried along): ``specimen``, ``method``, ``effort``, ``water_content`` [-],
        ``dry_density`` [kg/m3], ``void_ratio`` [-], ``saturation`` [-],
        ``specific_gravity`` [-], ``d10`` [m], ``k_reference``, ``k_reference_low``,
        ``k_reference_high`` [m/s], and ``valid`` when present.
    criterion : float or Criterion, optional
        Largest conductivity allowed (a number), or a :class:`kitchen.analysis.criterion.Criterion`
        of either kind (a drainage layer's smallest k required), from the project
        specification. [m/s] None (the default) when none was given: no verdict is drawn
        (each judged specimen is :data:`~kitchen.analysis.criterion.NO_CRITERION`), no
        acceptable zone, drawn or fitted, and a note says so; the compaction curves, the
        trends and the geometric mean are computed as with one. No limit is ever assumed.
    reference_temperature : float, default 20.0
        Temperature the results are corrected to, carried for labels. [degC]
    confidence : float, default 0.95
        Confidence level of the trends and the geometric mean.
    curve_method : {"quadratic", "cubic"}, default "quadratic"
        Compaction curve, see :func:`kitchen.analysis.fit_compaction_curve`.
    kept : mapping of (str, str) to str, optional
        The tests not valid that the engineer keeps on record, ``{(specimen, method): the
        record in words (who, when, why)}`` (:attr:`kitchen.workspace.Workspace.kept`):
        judged against the criterion and used in the zone and the trends. Every other test
        that is not valid is not judged.

    Returns
    -------
    SeriesAnalysis

    Raises
    ------
    ValueError
        When the results table lacks a column, has no rows, or the criterion is not a
        positive conductivity.

    Notes
    -----
    The rules of this function (one result per specimen, a missing interval gives a
    verdict of not conclusive) are the tool's own; they are listed in
    :data:`ANALYSIS_METHODS` with the sources of the analyses it calls.

    References
    ----------
    Daniel, D. E. and Benson, C. H. (1990). Water content–density criteria for compacted
    soil liners. J. Geotech. Eng. 116(12), 1811–1830. See also the References of
    :mod:`kitchen.analysis.compaction` and :mod:`kitchen.analysis.trends`.
    """
    require_results_table(results)
    if criterion is not None:
        kind = criterion.kind if isinstance(criterion, Criterion) else "maximum"
        try:
            limit = float(criterion)
        except (TypeError, ValueError):
            raise ValueError(
                f"criterion: expected a conductivity in m/s, got {criterion!r}"
            ) from None
        if not np.isfinite(limit) or limit <= 0:
            raise ValueError(
                f"criterion: expected a positive conductivity in m/s, got {criterion!r}"
            )
        criterion = Criterion(limit, kind)
    notes: list[str] = [] if criterion is not None else [NO_CRITERION_NOTE]
    chosen = one_result_per_specimen(results, notes, kept)
    frame = usable_conductivity(
        validity_on_record(chosen, kept, notes), notes, criterion is not None
    )
    if frame.empty:
        raise ValueError("results table: no specimen has a usable conductivity")
    # every column is formed as an array and set in two passes: a dozen specimens make
    # the pandas overhead of setting one column at a time the larger part of the cost
    verdict = criterion_verdicts(frame, criterion)

    def numbers(column):
        return pd.to_numeric(frame[column], errors="coerce").to_numpy(dtype=float)

    water = numbers("water_content")
    on_plane = ~np.isnan(water)
    frame = frame.assign(
        verdict=verdict,
        meets=verdict == MEETS,
        water_content=water,
        on_compaction_plane=on_plane,
        **{column: numbers(column) for column in ("dry_density", "void_ratio", "d10")},
    )
    plane = frame.iloc[np.flatnonzero(on_plane)]
    gs = median_specific_gravity(frame, notes if not plane.empty else [])
    # validity before compliance: the fits see only the tests judged (valid, or kept on record)
    judged_plane = plane.iloc[np.flatnonzero(plane["judged"].to_numpy(dtype=bool))]

    curves: dict = {}
    optimums = zone = fitted = None
    if plane.empty:
        notes.append("no specimen has a molding water content: no compaction plane")
    else:
        if judged_plane["effort"].notna().any():
            fit = partial(compaction_curves, judged_plane, method=curve_method)
            curves = _recorded(fit, notes) or {}
        elif plane["effort"].notna().any():
            notes.append("no judged specimen has a compactive effort: no compaction curves")
        else:
            notes.append("no specimen has a compactive effort: no compaction curves")
        if curves:
            optimums = _recorded(lambda: line_of_optimums(curves), notes)
            if optimums is not None and optimums.message:
                notes.append(optimums.message)
        if criterion is not None:  # without one there is no zone to draw or fit
            zone = _recorded(
                lambda: acceptable_zone(
                    plane["water_content"],
                    plane["dry_density"],
                    plane["meets"],
                    names=plane["specimen"],
                    verdicts=plane["verdict"].to_numpy(),
                ),
                notes,
            )
            if zone is not None and zone.message:
                notes.append(f"acceptable zone: {zone.message}")
            fitted = _recorded(
                lambda: fit_zone(
                    judged_plane["water_content"],
                    judged_plane["dry_density"],
                    judged_plane["k"],
                    criterion,
                    judged_plane["effort"],
                    confidence,
                ),
                notes,
            )
        if fitted is not None:
            notes.append(fitted.summary)
    in_zone = np.zeros(len(frame), dtype=bool)
    if zone is not None:
        inside = zone.contains(water[on_plane], frame["dry_density"].to_numpy()[on_plane])
        in_zone[on_plane] = np.asarray(inside, dtype=bool)

    optimum_of = {
        effort: curve.optimum_water_content
        for effort, curve in curves.items()
        if curve.peak_found and curve.peak_within_range
    }
    w_opt = np.array(
        [np.nan if pd.isna(e) else optimum_of.get(e, np.nan) for e in frame["effort"]],
        dtype=float,
    )
    frame = frame.assign(in_zone=in_zone, water_content_from_optimum=water - w_opt)
    judged = frame.iloc[np.flatnonzero(frame["judged"].to_numpy(dtype=bool))]

    void_trend = _trend(judged, "void_ratio", "void_ratio", notes, confidence, "k against e")
    if void_trend is not None and void_trend.message:
        notes.append(f"k against e: {void_trend.message}")
    density_trend = _trend(judged, "dry_density", "dry_density", notes, confidence, "k against ρd")
    water_trend = None
    if judged["water_content_from_optimum"].notna().any():
        water_trend = _trend(
            judged,
            "water_content_from_optimum",
            "water_content_from_optimum",
            notes,
            confidence,
            "k against w − w_opt",
        )
    mean = _recorded(
        lambda: geometric_mean_conductivity(judged["k"].to_numpy(), confidence),
        notes,
        "geometric mean: ",
    )

    grading = kc_reference = None
    graded = frame[frame["d10"].notna()]
    if not graded.empty:
        grading = grading_predictions(graded).reset_index(drop=True)
        graded = graded[graded["judged"]]  # the Kozeny–Carman curve runs through judged k
        e = graded["void_ratio"].dropna()
        if not e.empty:
            log_k = np.log10(graded.loc[e.index, "k"].to_numpy())
            kc_reference = (float(e.mean()), float(10.0 ** log_k.mean()))
            notes.append(
                "Kozeny–Carman curve: a prediction through the geometric mean of the judged "
                f"specimens with a d10, drawn over e = {e.min():.3g} to {e.max():.3g}; it "
                f"holds for {KOZENY_CARMAN_VALIDITY}"
            )
    return SeriesAnalysis(
        criterion=criterion,
        reference_temperature=float(reference_temperature),
        confidence=float(confidence),
        specimens=frame,
        specific_gravity=gs,
        compaction_curves=MappingProxyType(dict(curves)),
        line_of_optimums=optimums,
        acceptable_zone=zone,
        void_ratio_trend=void_trend,
        dry_density_trend=density_trend,
        water_content_trend=water_trend,
        geometric_mean=mean,
        grading=grading,
        kozeny_carman_reference=kc_reference,
        notes=tuple(dict.fromkeys(notes)),
        fitted_zone=fitted,
    )
