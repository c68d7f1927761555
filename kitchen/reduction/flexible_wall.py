"""Flexible-wall tests: the specimen as it stood during permeation, its stresses and checks.

A specimen with a row in the ``flexible_wall`` table was tested in a flexible-wall cell:
saturated under back pressure (the B-value checks), consolidated to an effective stress,
then permeated. Its k is computed on the specimen as it stood during permeation — the
height and area after consolidation (:func:`consolidated_dimensions`,
:func:`permeation_state`) — and its result carries three more criteria
(:func:`flexible_wall_verdicts`): the B-value at the end of saturation, the effective stress
across the specimen within the project's limits and above zero at the inflow end, and
(with the other checks, where both are measured) outflow/inflow. A specimen without a row
is a rigid-wall test, reduced as before.

Pressures are gauge pressures. ``back_pressure`` is the pore-water pressure at the outflow
end during permeation; the inflow end is higher by the head across the specimen.

References
----------
ASTM D5084, flexible-wall permeameter: saturation by back pressure and the B-value,
consolidation before permeation, the effective stress and its report (from memory).
Skempton, A. W. (1954), The pore-pressure coefficients A and B, Géotechnique 4(4):143–147.
Terzaghi, K. (1936), the principle of effective stress, σ' = σ − u; Holtz & Kovacs,
*An Introduction to Geotechnical Engineering*, chapter on effective stress.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import pandas as pd

from kitchen.io import STANDARD_GRAVITY
from kitchen.specimen import circle_area
from kitchen.validity import Verdict

__all__ = [
    "MINIMUM_B_VALUE",
    "B_VALUE_STEADY",
    "PermeationDimensions",
    "EffectiveStresses",
    "b_value",
    "consolidated_dimensions",
    "effective_stresses",
    "permeation_state",
    "saturation_verdict",
    "effective_stress_verdicts",
    "flexible_wall_verdicts",
]

MINIMUM_B_VALUE = 0.95
"""The B-value at the end of saturation taken as saturated. [-] (ASTM D5084, from
memory.)"""

B_VALUE_STEADY = 0.01
"""For a stiff soil whose B-value stays below :data:`MINIMUM_B_VALUE`, the last two checks,
at increasing back pressure, that differ by at most this much count as saturated: the
exception ASTM D5084 allows for soils too stiff to reach 0.95 (from memory); the
tolerance is the tool's own. [-]"""


@dataclass(frozen=True)
class PermeationDimensions:
    """The specimen's height, diameter and area during permeation, and how they were got."""

    height: float
    diameter: float
    area: float
    how: str

    @property
    def volume(self) -> float:
        return self.area * self.height


def _given(value) -> bool:
    return value is not None and not pd.isna(value)


def consolidated_dimensions(
    height: float,
    diameter: float,
    consolidated_height=None,
    height_change=None,
    consolidated_diameter=None,
    volume_change=None,
) -> PermeationDimensions:
    """The specimen's dimensions after consolidation, from those measured or their changes.

    Parameters
    ----------
    height, diameter : float
        As prepared. [m]
    consolidated_height : float, optional
        Measured after consolidation. [m]
    height_change : float, optional
        Shortening during consolidation (positive; negative for a swelling). [m]
    consolidated_diameter : float, optional
        Measured after consolidation. [m]
    volume_change : float, optional
        Volume expelled during consolidation (the back-pressure burette's change). [m3]

    Returns
    -------
    PermeationDimensions
        Height Lc: as measured, or L0 − ΔL; with a volume change alone, L0·(1 − ΔV/V0)^(1/3)
        (equal strain in every direction). Area Ac: π·Dc²/4 from a measured diameter; with a
        volume change, (V0 − ΔV)/Lc; otherwise A0 (no radial strain known).

    References
    ----------
    Head, K. H., *Manual of Soil Laboratory Testing*, Vol. 3 (effective stress tests):
    the area after consolidation, Ac = Vc/Lc, and Lc = L0·(1 − εv/3) for isotropic
    consolidation to first order (from memory; the exact cube root is used here). ASTM
    D5084 asks for the dimensions after consolidation (from memory).

    Examples
    --------
    >>> d = consolidated_dimensions(0.1, 0.1, height_change=0.002, volume_change=1.0e-5)
    >>> round(d.height, 4), round(d.area * 1e4, 3)
    (0.098, 79.122)
    """
    area0 = float(circle_area(diameter))
    volume0 = area0 * height
    if _given(consolidated_height):
        new_height, how_height = float(consolidated_height), "height measured after consolidation"
    elif _given(height_change):
        new_height = height - float(height_change)
        how_height = "height from the change during consolidation"
    elif _given(volume_change):
        new_height = height * (1 - float(volume_change) / volume0) ** (1 / 3)
        how_height = "height from the volume change, strain equal in every direction"
    else:
        new_height, how_height = height, "height as prepared (no change recorded)"
    if _given(consolidated_diameter):
        new_area = float(circle_area(float(consolidated_diameter)))
        how_area = "diameter measured after consolidation"
    elif _given(volume_change):
        new_area = (volume0 - float(volume_change)) / new_height
        how_area = "area from the volume after consolidation over the height"
    else:
        new_area, how_area = area0, "area as prepared (no change recorded)"
    if not (new_height > 0 and new_area > 0):
        raise ValueError(
            f"the consolidated dimensions are not positive (height {new_height:g} m, area "
            f"{new_area:g} m²): check the changes recorded"
        )
    return PermeationDimensions(
        new_height, math.sqrt(4 * new_area / math.pi), new_area, f"{how_height}; {how_area}"
    )


def permeation_state(state: pd.DataFrame, flexible_wall: pd.DataFrame) -> pd.DataFrame:
    """The specimen state with each flexible-wall specimen's dimensions during permeation.

    Parameters
    ----------
    state : pandas.DataFrame
        :func:`kitchen.specimen.specimen_state` of the specimens table (as prepared).
    flexible_wall : pandas.DataFrame
        The series' ``flexible_wall`` table (SI).

    Returns
    -------
    pandas.DataFrame
        A new frame: ``height``, ``diameter``, ``area`` and ``volume`` are those during
        permeation (:func:`consolidated_dimensions`) for the specimens in
        `flexible_wall`, as prepared for the others; ``cell`` is ``flexible wall`` or
        ``rigid wall``, ``dimensions_note`` says how the dimensions were got. The state
        as prepared (dry density, void ratio…) is unchanged.
    """
    out = state.copy()
    out["cell"] = "rigid wall"
    out["dimensions_note"] = "dimensions as prepared"
    if flexible_wall is None or flexible_wall.empty:
        return out
    rows = flexible_wall.set_index("specimen")
    position = {specimen: index for index, specimen in enumerate(out["specimen"])}
    height, diameter = out["height"].to_numpy(float), out["diameter"].to_numpy(float)
    area, volume = out["area"].to_numpy(float).copy(), out["volume"].to_numpy(float).copy()
    height, diameter = height.copy(), diameter.copy()
    cell = out["cell"].to_numpy(object)
    note = out["dimensions_note"].to_numpy(object)
    for specimen, row in rows.iterrows():
        index = position.get(specimen)
        if index is None:
            continue
        dimensions = consolidated_dimensions(
            height[index],
            diameter[index],
            row.get("consolidated_height"),
            row.get("height_change"),
            row.get("consolidated_diameter"),
            row.get("volume_change"),
        )
        height[index], diameter[index] = dimensions.height, dimensions.diameter
        area[index], volume[index] = dimensions.area, dimensions.volume
        cell[index], note[index] = "flexible wall", dimensions.how
    out["height"], out["diameter"], out["area"], out["volume"] = height, diameter, area, volume
    out["cell"], out["dimensions_note"] = cell, note
    return out


def b_value(cell_pressure_increment, pore_pressure_increment):
    """Skempton's pore-pressure coefficient B = Δu/Δσ3 of an undrained isotropic increment.

    Parameters
    ----------
    cell_pressure_increment : float or array_like
        Δσ3, the increment of cell pressure, drainage closed. [Pa]
    pore_pressure_increment : float or array_like
        Δu, the rise of pore pressure it caused. [Pa]

    Returns
    -------
    float or numpy.ndarray
        B. [-]

    References
    ----------
    Skempton, A. W. (1954), Géotechnique 4(4):143, eq. (4) with Δσ1 = Δσ3:
    Δu = B·Δσ3. ASTM D5084, the B-value check during saturation (from memory).

    Examples
    --------
    >>> b_value(50e3, 48e3)
    0.96
    """
    cell = np.asarray(cell_pressure_increment, dtype=float)
    pore = np.asarray(pore_pressure_increment, dtype=float)
    out = pore / cell
    return float(out) if out.ndim == 0 else out


@dataclass(frozen=True)
class EffectiveStresses:
    """Effective stress across a specimen during permeation. [Pa]

    ``consolidation`` is σc − ub before any head is applied; ``inflow`` and ``outflow``
    are at the two ends with the head applied, ``mean`` their average (mid-height).
    ``top`` and ``bottom`` follow from the flow direction (None where it is not recorded
    or horizontal).
    """

    consolidation: float
    inflow: float
    outflow: float
    mean: float
    top: float | None
    bottom: float | None


def effective_stresses(
    cell_pressure, back_pressure, head, water_density=1000.0, flow_direction=None
) -> EffectiveStresses:
    """Effective stress at the ends and middle of a permeated flexible-wall specimen.

    Parameters
    ----------
    cell_pressure : float
        σc, the cell pressure. [Pa]
    back_pressure : float
        ub, the pore-water pressure at the outflow end. [Pa]
    head : float
        Head across the specimen. [m]
    water_density : float
        ρw. [kg/m3]
    flow_direction : str, optional
        ``upward`` (in at the bottom), ``downward`` or ``horizontal``.

    Returns
    -------
    EffectiveStresses
        σ'out = σc − ub; σ'in = σc − ub − ρw·g·h; mean (σ'in + σ'out)/2.

    References
    ----------
    Terzaghi's principle σ' = σ − u (Holtz & Kovacs, *An Introduction to Geotechnical
    Engineering*, effective stress); u at the inflow end ub + ρw·g·h by hydrostatics; ASTM
    D5084 asks for the effective stress to be reported and the head kept small beside it
    (from memory).

    Examples
    --------
    >>> s = effective_stresses(550e3, 515e3, 2.0, 1000.0, "upward")
    >>> round(s.inflow), round(s.outflow), round(s.mean), round(s.bottom)
    (15387, 35000, 25193, 15387)
    """
    consolidation = float(cell_pressure) - float(back_pressure)
    loss = float(water_density) * STANDARD_GRAVITY * float(head)
    inflow, outflow = consolidation - loss, consolidation
    top = bottom = None
    if flow_direction == "upward":
        bottom, top = inflow, outflow
    elif flow_direction == "downward":
        top, bottom = inflow, outflow
    return EffectiveStresses(consolidation, inflow, outflow, (inflow + outflow) / 2, top, bottom)


def saturation_verdict(
    b_values, back_pressures=None, minimum=MINIMUM_B_VALUE, steady=B_VALUE_STEADY
) -> Verdict:
    """Whether the specimen was saturated: the last B-value at least `minimum`, or, for a
    stiff soil, the last two at increasing back pressure within `steady` of each other.

    Parameters
    ----------
    b_values : sequence of float
        B-values of the checks during saturation, in order (the last is the end of
        saturation). Empty: not recorded.
    back_pressures : sequence of float, optional
        The back pressure at each check. [Pa]

    References
    ----------
    ASTM D5084, saturation: B ≥ 0.95, or for stiff soils B unchanged over successive
    increments of back pressure (from memory); Skempton (1954) for B.
    """
    values = [float(v) for v in b_values if not pd.isna(v)]
    if not values:
        return Verdict(
            "b_value", False, "B-value at the end of saturation not recorded: saturation unknown"
        )
    last = values[-1]
    if last >= minimum:
        return Verdict(
            "b_value", True, f"B-value at the end of saturation {last:.2f} ≥ {minimum:g}: yes"
        )
    pressures = [] if back_pressures is None else [float(p) for p in back_pressures]
    if len(values) >= 2 and len(pressures) == len(values):
        rising = pressures[-1] > pressures[-2]
        if rising and abs(values[-1] - values[-2]) <= steady:
            return Verdict(
                "b_value",
                True,
                f"B-value at the end of saturation {last:.2f} < {minimum:g}, but unchanged "
                f"(within {steady:g}) from {values[-2]:.2f} as the back pressure rose from "
                f"{pressures[-2] / 1e3:.4g} to {pressures[-1] / 1e3:.4g} kPa: taken as "
                "saturated, as for a stiff soil",
            )
    return Verdict(
        "b_value",
        False,
        f"B-value at the end of saturation {last:.2f} ≥ {minimum:g}: no — saturate further, "
        "or show it unchanged over two increments of back pressure (a stiff soil)",
    )


def effective_stress_verdicts(
    stresses: EffectiveStresses, minimum=None, maximum=None
) -> tuple[Verdict, Verdict]:
    """The effective stress above zero at the inflow end, and within the specification.

    Parameters
    ----------
    stresses : EffectiveStresses
    minimum, maximum : float, optional
        The effective stress the project specification asks for, lowest and highest
        (the project table's ``minimum_effective_stress``, ``maximum_effective_stress``).
        [Pa]

    References
    ----------
    ASTM D5084: the effective stress during permeation is the project's, and the head must
    not bring it to zero anywhere (from memory); σ' = σ − u (Terzaghi).
    """
    low, high = min(stresses.inflow, stresses.outflow), max(stresses.inflow, stresses.outflow)
    positive = Verdict(
        "effective_stress_positive",
        low > 0,
        f"effective stress at the inflow end {low / 1e3:.3g} kPa above zero: "
        + ("yes" if low > 0 else "no — the head lifts the membrane; lower the gradient"),
    )
    if minimum is None and maximum is None:
        within = Verdict(
            "effective_stress",
            None,
            f"effective stress {low / 1e3:.3g} to {high / 1e3:.3g} kPa; the project table "
            "gives no limits, so it is not judged",
        )
        return positive, within
    limits = []
    if minimum is not None:
        limits.append(f"≥ {minimum / 1e3:.4g} kPa")
    if maximum is not None:
        limits.append(f"≤ {maximum / 1e3:.4g} kPa")
    ok = (minimum is None or low >= minimum) and (maximum is None or high <= maximum)
    within = Verdict(
        "effective_stress",
        bool(ok),
        f"effective stress {low / 1e3:.3g} to {high / 1e3:.3g} kPa within the "
        f"specification ({' and '.join(limits)}): {'yes' if ok else 'no'}",
    )
    return positive, within


def flexible_wall_verdicts(
    flexible_row: pd.Series,
    b_checks: pd.DataFrame,
    largest_head: float,
    flow_direction=None,
    water_density: float = 1000.0,
    minimum_stress=None,
    maximum_stress=None,
    minimum_b_value: float = MINIMUM_B_VALUE,
) -> tuple[tuple[Verdict, ...], EffectiveStresses]:
    """The flexible-wall criteria of one test, and its effective stresses.

    Parameters
    ----------
    flexible_row : pandas.Series
        The specimen's row of ``flexible_wall`` (SI).
    b_checks : pandas.DataFrame
        Its rows of ``b_value_checks`` (may be empty); where there are none, the row's
        ``b_value``.
    largest_head : float
        The largest head of the readings used. [m]

    Returns
    -------
    verdicts : tuple of Verdict
        Saturation (B-value), effective stress above zero, effective stress within the
        specification.
    stresses : EffectiveStresses
        At the largest head used.
    """
    if b_checks is not None and len(b_checks):
        values = b_value(
            b_checks["cell_pressure_increment"].to_numpy(float),
            b_checks["pore_pressure_increment"].to_numpy(float),
        )
        pressures = b_checks["back_pressure"].to_numpy(float)
        saturation = saturation_verdict(
            np.atleast_1d(values),
            None if np.isnan(pressures).any() else pressures,
            minimum_b_value,
        )
    else:
        saturation = saturation_verdict([flexible_row.get("b_value")], None, minimum_b_value)
    stresses = effective_stresses(
        flexible_row["cell_pressure"],
        flexible_row["back_pressure"],
        largest_head,
        water_density,
        flow_direction,
    )
    positive, within = effective_stress_verdicts(stresses, minimum_stress, maximum_stress)
    return (saturation, positive, within), stresses


def condition_result(
    row: dict,
    permeation_row: pd.Series,
    flexible_wall: pd.DataFrame,
    b_value_checks: pd.DataFrame,
    flow_direction=None,
    stress_limits: tuple = (None, None),
    minimum_b_value: float = MINIMUM_B_VALUE,
    change: str | None = None,
) -> dict:
    """A result row with its cell, and a flexible-wall test's criteria and stresses.

    Parameters
    ----------
    row : dict
        One row of the results (:func:`kitchen.reduction.result_row`), not changed.
    permeation_row : pandas.Series
        The specimen's row of :func:`permeation_state`.
    flexible_wall, b_value_checks : pandas.DataFrame
        The series' tables of those names (SI).
    flow_direction : str, optional
        From the specimens table.
    stress_limits : tuple of (float or None, float or None)
        The effective stress the specification asks for, lowest and highest. [Pa]
    minimum_b_value : float
        The B-value taken as saturated.
    change : str, optional
        The specimen's change of volume over the test in words
        (:func:`kitchen.specimen.final_state`); a swelling or consolidation is noted in
        ``checks``.

    Returns
    -------
    dict
        A new row with ``cell``, ``permeation_height`` [m], ``permeation_area`` [m2],
        ``effective_stress``, ``effective_stress_inflow``, ``effective_stress_outflow``
        [Pa] (where the series has flexible-wall tests; NaN, with a note in ``checks``,
        for its rigid-wall tests); a flexible-wall test's verdicts joined to
        ``verdicts``, the failed ones to ``checks`` (first) and ``valid``.
    """
    out = dict(row)
    out["cell"] = permeation_row["cell"]
    if change is not None and change.startswith(("swelled", "consolidated")):
        out["checks"] = list(row.get("checks", [])) + [
            f"the specimen {change} during the test (its final volume against its volume "
            "as prepared)"
        ]
        row = out
    out["permeation_height"] = float(permeation_row["height"])
    out["permeation_area"] = float(permeation_row["area"])
    if flexible_wall is None or flexible_wall.empty:
        return out  # every test of the series is rigid-wall: no stress columns
    for name in ("effective_stress", "effective_stress_inflow", "effective_stress_outflow"):
        out[name] = np.nan
    specimen = row["specimen"]
    mine = flexible_wall[flexible_wall["specimen"] == specimen]
    if mine.empty:
        out["checks"] = list(row.get("checks", [])) + [
            "rigid-wall cell: no cell or back pressure, so no effective stress"
        ]
        return out
    checks = b_value_checks[b_value_checks["specimen"] == specimen] if len(b_value_checks) else None
    largest_head = float(row["gradient"]) * float(permeation_row["height"])
    verdicts, stresses = flexible_wall_verdicts(
        mine.iloc[0],
        checks,
        largest_head if math.isfinite(largest_head) else 0.0,
        flow_direction,
        minimum_stress=stress_limits[0],
        maximum_stress=stress_limits[1],
        minimum_b_value=minimum_b_value,
    )
    out["effective_stress"] = stresses.mean
    out["effective_stress_inflow"] = stresses.inflow
    out["effective_stress_outflow"] = stresses.outflow
    out["verdicts"] = tuple(row.get("verdicts", ())) + verdicts
    failed = [v.sentence for v in verdicts if v.passed is False]
    out["checks"] = failed + list(row.get("checks", []))
    out["valid"] = bool(row.get("valid")) and not failed
    return out
