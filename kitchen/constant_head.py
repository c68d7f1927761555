"""Constant-head test reduction: k for each timed collection, and per specimen from all.

References
----------
ASTM D2434, Standard Test Method for Permeability of Granular Soils (Constant Head):
k = Q·L/(A·h·t) (from memory for the clause).
ASTM D5084, Method A (constant head), and ISO 17892-11 (constant-head test).
Das, B. M. and Sobhan, K., *Principles of Geotechnical Engineering*, chapter on
permeability, constant-head test equation k = Q·L/(A·h·t).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from .fitting import ProportionalFit, fit_through_origin
from .water import viscosity_ratio, water_density

__all__ = [
    "constant_head_conductivity",
    "hydraulic_gradient",
    "darcy_velocity",
    "collection_table",
    "ConstantHeadResult",
    "reduce_constant_head",
]


def constant_head_conductivity(volume, flow_length, area, head_difference, duration):
    """Hydraulic conductivity from one constant-head collection, k = Q·L/(A·h·t).

    Parameters
    ----------
    volume : float or array_like
        Volume of water collected. [m3]
    flow_length : float or array_like
        Length of the flow path between the points the head difference is measured
        across (the specimen height, or the manometer tap spacing). [m]
    area : float or array_like
        Specimen cross-section area. [m2]
    head_difference : float or array_like
        Head difference across ``flow_length``. [m]
    duration : float or array_like
        Collection time. [s]

    Returns
    -------
    float or array_like
        Hydraulic conductivity at the test temperature. [m/s]

    References
    ----------
    ASTM D2434, calculation of k (from memory for the clause); Das & Sobhan,
    *Principles of Geotechnical Engineering*, constant-head test equation.

    Examples
    --------
    A textbook case (Das, constant-head example; inputs and answer from memory):
    L = 30 cm, A = 177 cm², h = 50 cm, Q = 350 cm³ in 5 min.

    >>> k = constant_head_conductivity(350e-6, 0.30, 177e-4, 0.50, 300.0)
    >>> round(k * 100, 6)  # cm/s
    0.003955
    """
    return volume * flow_length / (area * head_difference * duration)


def hydraulic_gradient(head_difference, flow_length):
    """Hydraulic gradient i = h/L.

    Parameters
    ----------
    head_difference : float or array_like
        Head difference. [m]
    flow_length : float or array_like
        Flow path length. [m]

    Returns
    -------
    float or array_like
        Gradient. [-]

    References
    ----------
    Darcy's law as written in ASTM D2434 and D5084 (i = h/L).
    """
    return head_difference / flow_length


def darcy_velocity(volume, area, duration):
    """Darcy (discharge) velocity v = Q/(A·t).

    Parameters
    ----------
    volume : float or array_like
        Volume of water collected. [m3]
    area : float or array_like
        Specimen cross-section area. [m2]
    duration : float or array_like
        Collection time. [s]

    Returns
    -------
    float or array_like
        Darcy velocity. [m/s]

    References
    ----------
    Das & Sobhan, *Principles of Geotechnical Engineering*, Darcy's law v = k·i.
    """
    return volume / (area * duration)


def collection_table(
    collections: pd.DataFrame,
    state: pd.DataFrame,
    reference_temperature: float = 20.0,
    viscosity: str = "kestin",
) -> pd.DataFrame:
    """Reduce every constant-head collection.

    Parameters
    ----------
    collections : pandas.DataFrame
        The series' ``constant_head`` table: ``specimen``, ``head_difference`` [m],
        ``duration`` [s], ``volume`` [m3] or ``outflow_mass`` [kg], ``temperature`` [degC],
        ``flow_length`` [m] (NaN for the specimen height).
    state : pandas.DataFrame
        Specimen state (:func:`kitchen.specimen.specimen_state`): ``specimen``, ``area``,
        ``height``.
    reference_temperature : float
        Temperature k is corrected to. [degC]
    viscosity : str
        Viscosity method, see :func:`kitchen.water.viscosity_ratio`.

    Returns
    -------
    pandas.DataFrame
        A new frame, one row per collection, adding ``flow_volume`` [m3] (a weighed mass
        turned into volume with the water density at the collection's temperature, or at
        the reference temperature when none was recorded — flagged in
        ``temperature_missing``), ``gradient``, ``darcy_velocity`` [m/s], ``k`` [m/s],
        ``viscosity_ratio`` and ``k_reference`` [m/s].
    """
    out = collections.copy()
    geometry = state.set_index("specimen")[["area", "height"]]
    out["area"] = out["specimen"].map(geometry["area"]).to_numpy(float)
    length = out["flow_length"].to_numpy(float)
    height = out["specimen"].map(geometry["height"]).to_numpy(float)
    out["flow_length"] = np.where(np.isnan(length), height, length)
    temperature = out["temperature"].to_numpy(float)
    missing = np.isnan(temperature)
    out["temperature_missing"] = missing
    used = np.where(missing, reference_temperature, temperature)
    weighed = out["volume"].isna().to_numpy()
    volume = out["volume"].to_numpy(float).copy()
    volume[weighed] = out["outflow_mass"].to_numpy(float)[weighed] / water_density(used[weighed])
    out["flow_volume"] = volume
    out["gradient"] = hydraulic_gradient(out["head_difference"], out["flow_length"])
    out["darcy_velocity"] = darcy_velocity(volume, out["area"], out["duration"])
    out["k"] = constant_head_conductivity(
        volume, out["flow_length"], out["area"], out["head_difference"], out["duration"]
    )
    ratio = viscosity_ratio(used, reference_temperature, viscosity)
    out["viscosity_ratio"] = np.where(missing, 1.0, ratio)
    out["k_reference"] = out["k"] * out["viscosity_ratio"]
    return out


@dataclass(frozen=True)
class ConstantHeadResult:
    """The conductivity of one specimen from all its constant-head collections.

    ``fit`` is the fit of the temperature-corrected Darcy velocity against the gradient
    through the origin; its slope is ``k_reference``.
    """

    specimen: str
    n: int
    k: float
    k_reference: float
    k_reference_low: float
    k_reference_high: float
    gradient_min: float
    gradient_max: float
    temperature: float
    spread: float
    fit: ProportionalFit | None
    collections: pd.DataFrame
    notes: tuple[str, ...]


def reduce_constant_head(collections: pd.DataFrame, specimen: str) -> ConstantHeadResult:
    """Combine one specimen's reduced collections into its conductivity.

    Parameters
    ----------
    collections : pandas.DataFrame
        Rows of :func:`collection_table` for one specimen.
    specimen : str
        The specimen id.

    Returns
    -------
    ConstantHeadResult
        With k at the test temperature (fit of v on i), k at the reference temperature
        (fit of R_T·v on i) and its 95 % interval from the fit, the gradient range, the
        mean temperature, and ``spread`` — the largest deviation of a single collection's
        k from their mean, as a fraction of the mean.

    Notes
    -----
    In laminar flow v = k·i, so k is the slope of v against i through the origin
    (ASTM D2434 asks to establish the laminar range; D5856 suggests three gradients,
    from memory). With a single collection there is no interval: the bounds equal k and a
    note says so.
    """
    rows = collections[collections["specimen"] == specimen]
    if rows.empty:
        raise ValueError(f"specimen {specimen} has no constant-head collections")
    notes: list[str] = []
    gradient = rows["gradient"].to_numpy(float)
    velocity = rows["darcy_velocity"].to_numpy(float)
    corrected = velocity * rows["viscosity_ratio"].to_numpy(float)
    k_each = rows["k_reference"].to_numpy(float)
    if len(rows) >= 2:
        fit = fit_through_origin(gradient, corrected)
        k_test = fit_through_origin(gradient, velocity).slope
        k_reference, low, high = fit.slope, fit.slope_low, fit.slope_high
    else:
        fit = None
        k_test = float(rows["k"].iloc[0])
        k_reference = low = high = float(k_each[0])
        notes.append("one collection only: no interval from repeat collections")
    mean = float(np.mean(k_each))
    spread = float(np.max(np.abs(k_each - mean)) / mean)
    missing = int(rows["temperature_missing"].sum())
    if missing:
        notes.append(
            f"temperature not recorded for {missing} of {len(rows)} collection(s): "
            "k not corrected for those (about 2.5 % per degC)"
        )
    temperatures = rows["temperature"].to_numpy(float)
    temperature = float(np.nanmean(temperatures)) if missing < len(rows) else float("nan")
    return ConstantHeadResult(
        specimen=specimen,
        n=len(rows),
        k=float(k_test),
        k_reference=float(k_reference),
        k_reference_low=float(low),
        k_reference_high=float(high),
        gradient_min=float(gradient.min()),
        gradient_max=float(gradient.max()),
        temperature=temperature,
        spread=spread,
        fit=fit,
        collections=rows.reset_index(drop=True),
        notes=tuple(notes),
    )
