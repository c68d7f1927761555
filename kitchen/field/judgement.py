"""Field tests judged against the acceptable zone of the series' laboratory specimens.

Each field test of water content and dry density is placed on the compaction plane of the
series (:meth:`kitchen.workspace.Workspace.analysis`): inside the acceptable zone or not (a
test on the zone's edge counts as inside), how far from the zone's edge in water content
(at its dry density) and in dry density (at its water content), how far wet or dry of the
line of optimums, its degree of saturation against the zero-air-voids and constant
saturation lines, and the k20 the fitted zone predicts for a specimen compacted to that
state, with its prediction interval. Per lift and overall: how many tests, how many
inside, the share, the tests outside. A later test at the same location of the same lift
is a retest: it is linked to the test it replaces, which stays in the table, marked as
replaced.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from kitchen.analysis import MEETS, SATURATION_LINES
from kitchen.specimen import degree_of_saturation, void_ratio

from .outline import ZoneOutline, outline_of_acceptable_zone, outline_of_fitted_zone
from .records import FieldTests

__all__ = [
    "FIELD_METHODS",
    "INSIDE",
    "OUTSIDE",
    "NO_ZONE",
    "SAME_LOCATION",
    "ZONES",
    "FieldCheck",
    "check_field_tests",
]

INSIDE = "inside the zone"
OUTSIDE = "outside the zone"
NO_ZONE = "not judged: no zone"

SAME_LOCATION = 1.5
"""Two tests of one lift this close (station and offset, or x and y) are at the same
location: the later one is a retest of the earlier. [m] A retest is taken beside the test
it replaces, within a stride or so; common practice, no source."""

ZONES = ("drawn", "fitted")
"""The zones a field test may be judged against: the acceptable zone drawn around the
specimens that meet (the memo's), or the fitted zone (where the prediction bound meets
the criterion)."""

FIELD_METHODS = (
    (
        "dry density from a wet density",
        "ρd = ρ/(1 + w)",
        "Das & Sobhan, Principles of Geotechnical Engineering, weight–volume relationships "
        "(from memory)",
    ),
    (
        "inside the zone",
        "a test is inside when its state (w, ρd) lies in the zone or on its edge (a test on "
        "the edge counts as inside); the zone is the memo's acceptable zone (Daniel & Benson "
        "1990, J. Geotech. Eng. 116(12):1811), drawn or fitted",
        "point in polygon by the even–odd rule (O'Rourke, Computational Geometry in C, "
        "ch. 7; from memory); the rule for the edge is the tool's own",
    ),
    (
        "distance from the zone",
        "along each axis: the change of water content at the test's dry density, and the "
        "change of dry density at its water content, that brings it to the zone's edge "
        "(positive outside; inside, minus the margin to the nearest edge)",
        "the tool's own measure",
    ),
    (
        "line of optimums",
        "w − w on the line of optimums at the test's dry density (positive: wet of it)",
        "Daniel & Benson (1990), J. Geotech. Eng. 116(12):1811",
    ),
    (
        "degree of saturation",
        "S = w·Gs/e, e = Gs·ρw/ρd − 1, Gs of the series, ρw = 1.000 Mg/m³",
        "Das & Sobhan, Principles of Geotechnical Engineering; Holtz & Kovacs",
    ),
    (
        "predicted k20",
        "the fitted zone's least-squares prediction of log10 k20 at the test's state, with "
        "its 95 % prediction interval; where the fit has an offset per effort and the test "
        "names none, the least favourable (the highest upper end against a largest k "
        "allowed) of the efforts whose tested states hold the test, of all where none does",
        "Montgomery & Runger, Applied Statistics and Probability for Engineers (from "
        "memory); the choice of effort is the tool's own",
    ),
    (
        "retests",
        f"a later test of the same lift within {SAME_LOCATION:g} m of an earlier one "
        "replaces it; the earlier test stays in the table, marked as replaced",
        "common practice, no source",
    ),
)
"""(step, method, source) of the field check, for the report's methods table."""


@dataclass(frozen=True)
class FieldCheck:
    """Field tests judged against a series' acceptable zone.

    Attributes
    ----------
    field_tests : FieldTests
    series : str
        The series whose zone is used.
    zone : ZoneOutline or None
        The zone judged against; None where there is none (no criterion, no water
        contents), and every test is :data:`NO_ZONE`.
    zone_kind : str
        ``"drawn"`` or ``"fitted"``.
    tests : pandas.DataFrame
        The tests in order of date (then file row), with the columns of
        :attr:`FieldTests.tests` and ``verdict`` (:data:`INSIDE`, :data:`OUTSIDE` or
        :data:`NO_ZONE`), ``inside`` and ``on_edge`` (bool), ``water_content_distance``
        [-] and ``dry_density_distance`` [kg/m3] (positive outside, minus the margin
        inside), ``water_content_change`` [-] and ``dry_density_change`` [kg/m3] (the move
        that brings a test outside to the edge), ``side`` (in words), ``from_optimum_line``
        [-] (w less w on the line of optimums at its ρd; positive wet of it),
        ``saturation`` [-], ``saturation_band`` (in words), ``k_predicted``,
        ``k_predicted_low``, ``k_predicted_high`` [m/s], ``prediction_effort``,
        ``within_tested_states`` (bool: inside the hull of the specimens the fit used),
        ``in_fitted_zone`` (bool), ``retest_of`` and ``replaced_by`` (test ids, "" where
        none) and ``standing`` (bool: not replaced by a retest).
    lifts : pandas.DataFrame
        Per lift, in order of first test, then ``all lifts``: ``lift``, ``tests``,
        ``inside``, ``share_inside`` [-], ``outside`` (ids), ``standing``,
        ``standing_inside``, ``share_standing_inside`` [-], ``standing_outside`` (ids: the
        tests outside not replaced by a retest).
    notes : tuple of str
    methods : tuple
        (step, method, source) of the check.
    """

    field_tests: FieldTests
    series: str
    zone: ZoneOutline | None
    zone_kind: str
    tests: pd.DataFrame
    lifts: pd.DataFrame
    notes: tuple[str, ...]
    methods: tuple = FIELD_METHODS

    @property
    def summary(self) -> str:
        """The check in a sentence."""
        overall = self.lifts.iloc[-1]
        if self.zone is None:
            return (
                f"{int(overall['tests'])} field test(s) of {len(self.lifts) - 1} lift(s): "
                "not judged, the series has no acceptable zone"
            )
        text = (
            f"{int(overall['inside'])} of {int(overall['tests'])} field test(s) inside the "
            f"{self.zone.name} ({100 * overall['share_inside']:.0f} %); of the "
            f"{int(overall['standing'])} standing (not replaced by a retest), "
            f"{int(overall['standing_inside'])} inside"
        )
        if overall["standing_outside"]:
            text += f"; outside and not retested: {overall['standing_outside']}"
        return text


def _retests(tests: pd.DataFrame, location: tuple[str, str], same: float):
    """(retest_of, replaced_by) of each test, ids or ""; `tests` in date order."""
    retest_of = [""] * len(tests)
    replaced_by = [""] * len(tests)
    xy = tests[list(location)].to_numpy(dtype=float)
    lifts = tests["lift"].to_numpy(dtype=object)
    ids = tests["test"].to_numpy(dtype=object)
    for later in range(len(tests)):
        for earlier in range(later - 1, -1, -1):
            if lifts[earlier] != lifts[later] or replaced_by[earlier]:
                continue
            if np.hypot(*(xy[later] - xy[earlier])) <= same:
                retest_of[later], replaced_by[earlier] = ids[earlier], ids[later]
                break
    return retest_of, replaced_by


def _saturation_band(s: float) -> str:
    if not np.isfinite(s):
        return ""
    lines = sorted(SATURATION_LINES, reverse=True)
    if s > lines[0]:
        return "above the zero-air-voids line (S > 100 %: check Gs and the test)"
    for upper, lower in zip(lines, lines[1:], strict=False):
        if s >= lower:
            return f"between the {100 * lower:.0f} % and {100 * upper:.0f} % saturation lines"
    return f"below the {100 * lines[-1]:.0f} % saturation line"


def _side(change_w: float, change_rho: float, inside: bool) -> str:
    if inside:
        return ""
    words = []
    if np.isfinite(change_w):
        words.append("dry of the zone" if change_w > 0 else "wet of the zone")
    if np.isfinite(change_rho):
        words.append("below the zone" if change_rho > 0 else "above the zone")
    return ", ".join(words) or "beside the zone (no change of w or ρd alone reaches it)"


def _predictions(fitted, tests: pd.DataFrame, effort, notes: list[str]) -> dict:
    """The fitted zone's prediction at each test: k20 and its interval, and the effort."""
    n = len(tests)
    out = {
        "k_predicted": np.full(n, np.nan),
        "k_predicted_low": np.full(n, np.nan),
        "k_predicted_high": np.full(n, np.nan),
        "prediction_effort": [""] * n,
        "within_tested_states": np.zeros(n, dtype=bool),
        "in_fitted_zone": np.zeros(n, dtype=bool),
    }
    if fitted is None:
        return out
    w = tests["water_content"].to_numpy(dtype=float)
    rho = tests["dry_density"].to_numpy(dtype=float)
    if not fitted.efforts:
        choices = [[None]] * n
    else:
        named = [e if e is not None else effort for e in tests["effort"]]
        unknown = sorted({e for e in named if e is not None and e not in fitted.efforts})
        if unknown:
            raise ValueError(
                f"effort: {', '.join(map(str, unknown))} is not an effort of the series' "
                f"fitted zone; expected one of {', '.join(map(str, fitted.efforts))}"
            )
        choices = [[e] if e is not None else list(fitted.efforts) for e in named]
        if any(e is None for e in named):
            notes.append(
                "predicted k20: the fit has an offset per compactive effort and some tests "
                "name none; each shows the least favourable prediction of the efforts whose "
                "tested states hold it (of all efforts where none does)"
            )
    upper = fitted.criterion.kind == "maximum"

    def tested_at(e, i) -> bool:
        own = fitted.zones[fitted.efforts.index(e)].extent if e is not None else fitted.extent
        return bool(len(own)) and bool(
            ZoneOutline((np.asarray(own),), "tested states").contains(w[i], rho[i])[0]
        )

    for i in range(n):
        covered = [e for e in choices[i] if tested_at(e, i)]
        best = None
        for e in covered or choices[i]:
            centre, low, high = fitted.predict(w[i], rho[i], e)
            if best is None or (high > best[3] if upper else low < best[2]):
                best = (e, centre, low, high)
        e, centre, low, high = best
        out["k_predicted"][i] = 10.0**centre
        out["k_predicted_low"][i] = 10.0**low
        out["k_predicted_high"][i] = 10.0**high
        out["prediction_effort"][i] = "" if e is None else str(e)
        out["within_tested_states"][i] = bool(covered)
        out["in_fitted_zone"][i] = bool(fitted.contains(w[i], rho[i], e))
    if not out["within_tested_states"].all():
        notes.append(
            "predicted k20: some tests lie outside the states the laboratory specimens "
            "cover; their prediction is an extrapolation of the fit"
        )
    return out


def _lift_rows(tests: pd.DataFrame) -> pd.DataFrame:
    rows = []
    groups = [(lift, tests[tests["lift"] == lift]) for lift in dict.fromkeys(tests["lift"])]
    for lift, part in [*groups, ("all lifts", tests)]:
        inside = part["inside"].to_numpy(dtype=bool)
        standing = part["standing"].to_numpy(dtype=bool)
        n, n_standing = len(part), int(standing.sum())
        rows.append(
            {
                "lift": str(lift),
                "tests": n,
                "inside": int(inside.sum()),
                "share_inside": inside.sum() / n if n else np.nan,
                "outside": ", ".join(part["test"][~inside]),
                "standing": n_standing,
                "standing_inside": int((inside & standing).sum()),
                "share_standing_inside": (
                    (inside & standing).sum() / n_standing if n_standing else np.nan
                ),
                "standing_outside": ", ".join(part["test"][~inside & standing]),
            }
        )
    return pd.DataFrame(rows)


def check_field_tests(
    field_tests: FieldTests,
    analysis,
    *,
    series: str = "",
    zone: str = "drawn",
    effort: str | None = None,
    same_location: float = SAME_LOCATION,
) -> FieldCheck:
    """Judge field tests against a series' acceptable zone.

    Parameters
    ----------
    field_tests : FieldTests
        From :func:`kitchen.field.read_field_tests`.
    analysis : kitchen.analysis.SeriesAnalysis
        The series' analysis (:meth:`kitchen.workspace.Workspace.analysis`), with its
        criterion: its zone, line of optimums, Gs and fitted zone are used.
    series : str, optional
        The series' name, for the report.
    zone : {"drawn", "fitted"}, default "drawn"
        The zone to judge against: the acceptable zone drawn around the specimens that
        meet, or the fitted zone (the union of every effort's, or `effort`'s alone).
    effort : str, optional
        The laboratory compactive effort whose fitted prediction applies to tests that
        name none (and whose fitted zone is used with ``zone="fitted"``).
    same_location : float, default :data:`SAME_LOCATION`
        How close two tests of a lift are to be at the same location. [m]

    Returns
    -------
    FieldCheck

    Raises
    ------
    ValueError
        An unknown zone or effort, or a negative `same_location`.

    Notes
    -----
    The rules are listed, with their sources, in :data:`FIELD_METHODS`. A test inside the
    zone says that the liner was compacted to a state where the laboratory specimens met
    the criterion; it does not measure the field k (see :data:`kitchen.cautions.FIELD_CAUTIONS`).

    References
    ----------
    Daniel, D. E. and Benson, C. H. (1990). Water content–density criteria for compacted
    soil liners. Journal of Geotechnical Engineering 116(12), 1811–1830 (the acceptable
    zone as the specification field tests are held to; from memory).
    """
    if zone not in ZONES:
        raise ValueError(f"zone: expected one of {', '.join(ZONES)}, got {zone!r}")
    if not np.isfinite(same_location) or same_location < 0:
        raise ValueError(f"same_location: expected a distance ≥ 0 in m, got {same_location!r}")
    notes: list[str] = []
    tests = field_tests.tests.sort_values(["date", "source_row"], kind="stable").reset_index(
        drop=True
    )
    w = tests["water_content"].to_numpy(dtype=float)
    rho = tests["dry_density"].to_numpy(dtype=float)
    fitted = analysis.fitted_zone
    outline = None
    if analysis.criterion is None:
        notes.append("the series has no criterion: no acceptable zone to judge against")
    elif zone == "drawn":
        if analysis.acceptable_zone is not None:
            outline = outline_of_acceptable_zone(analysis.acceptable_zone)
            if analysis.acceptable_zone.message:
                notes.append(f"acceptable zone: {analysis.acceptable_zone.message}")
        else:
            notes.append("the series' specimens have no water contents: no acceptable zone")
    elif fitted is None:
        notes.append("the series has no fitted zone (see the memo's notes)")
    else:
        outline = outline_of_fitted_zone(fitted, effort)
    if outline is not None and outline.empty:
        notes.append(f"the {outline.name} is empty: no test can be inside it")
    if outline is not None:
        where = outline.distances(w, rho)
    else:
        where = {
            "inside": np.zeros(len(tests), dtype=bool),
            "on_edge": np.zeros(len(tests), dtype=bool),
            **{
                name: np.full(len(tests), np.nan)
                for name in (
                    "water_content_distance",
                    "water_content_change",
                    "dry_density_distance",
                    "dry_density_change",
                )
            },
        }
    inside = where["inside"]
    verdict = np.where(inside, INSIDE, OUTSIDE) if outline is not None else NO_ZONE
    optimums = analysis.line_of_optimums
    from_line = np.full(len(tests), np.nan)
    if optimums is not None and optimums.slope not in (None, 0.0):
        from_line = w - (rho - optimums.intercept) / optimums.slope
    else:
        notes.append("no line of optimums for the series: no position against it")
    gs = analysis.specific_gravity
    if gs is not None:
        e = np.asarray(void_ratio(rho, gs), dtype=float)
        saturation = np.asarray(degree_of_saturation(w, gs, e), dtype=float)
    else:
        saturation = np.full(len(tests), np.nan)
        notes.append("the series has no specific gravity: no degree of saturation")
    predicted = _predictions(fitted, tests, effort, notes)
    if fitted is None and analysis.criterion is not None:
        notes.append("no fitted zone for the series: no predicted k20")
    retest_of, replaced_by = _retests(tests, field_tests.location, same_location)
    tests = tests.assign(
        verdict=verdict,
        inside=inside,
        on_edge=where["on_edge"],
        water_content_distance=where["water_content_distance"],
        dry_density_distance=where["dry_density_distance"],
        water_content_change=where["water_content_change"],
        dry_density_change=where["dry_density_change"],
        side=[
            _side(cw, cr, bool(i)) if outline is not None else ""
            for cw, cr, i in zip(
                where["water_content_change"], where["dry_density_change"], inside, strict=True
            )
        ],
        from_optimum_line=from_line,
        saturation=saturation,
        saturation_band=[_saturation_band(s) for s in saturation],
        **predicted,
        retest_of=retest_of,
        replaced_by=replaced_by,
        standing=[not r for r in replaced_by],
    )
    if where["on_edge"].any():
        notes.append(
            "tests on the zone's edge ("
            + ", ".join(tests["test"][where["on_edge"]])
            + ") count as inside"
        )
    name = series or "the series"
    if analysis.criterion is not None and not (analysis.specimens["verdict"] == MEETS).any():
        notes.append(f"no specimen of {name} meets the criterion")
    return FieldCheck(
        field_tests=field_tests,
        series=series,
        zone=outline,
        zone_kind=zone,
        tests=tests,
        lifts=_lift_rows(tests),
        notes=tuple(dict.fromkeys(notes)),
    )
