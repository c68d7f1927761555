"""Constant-head collections one at a time: k = Q·L/(A·h·t), the gradient and Darcy velocity.

:func:`collection_table` reduces every timed collection of a series: a weighed outflow
turned into volume with the water density at its temperature, the flow length (the
specimen height when none is given), the gradient, the Darcy velocity, k at the test
temperature and k corrected to the reference temperature.

References
----------
ASTM D2434, Standard Test Method for Permeability of Granular Soils (Constant Head):
k = Q·L/(A·h·t) (from memory for the clause).
ASTM D5084, Method A (constant head), and ISO 17892-11 (constant-head test).
Das, B. M. and Sobhan, K., *Principles of Geotechnical Engineering*, chapter on
permeability, constant-head test equation k = Q·L/(A·h·t); Darcy's law v = k·i.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from kitchen.water import viscosity_ratio, water_density

__all__ = [
    "constant_head_conductivity",
    "hydraulic_gradient",
    "darcy_velocity",
    "collection_table",
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
