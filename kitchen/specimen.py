"""Specimen state from phase relations: area, volume, dry density, void ratio, saturation.

References
----------
Das, B. M. and Sobhan, K., *Principles of Geotechnical Engineering*, chapter on weight-volume
relationships (ρd = Ms/V, e = Gs·ρw/ρd − 1, n = e/(1+e), S·e = w·Gs).
Holtz, R. D. and Kovacs, W. D., *An Introduction to Geotechnical Engineering*, chapter 2.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

__all__ = [
    "WATER_DENSITY_PHASE",
    "circle_area",
    "dry_density",
    "void_ratio",
    "porosity",
    "degree_of_saturation",
    "specimen_state",
]

WATER_DENSITY_PHASE = 1000.0
"""Water density used in phase relations, 1.000 Mg/m³ by convention. [kg/m3]"""


def circle_area(diameter):
    """Area of a circular cross-section, A = π·D²/4.

    Parameters
    ----------
    diameter : float or array_like
        Diameter. [m]

    Returns
    -------
    float or array_like
        Area. [m2]
    """
    return np.pi * np.square(diameter) / 4.0


def dry_density(dry_mass, diameter, height):
    """Dry density ρd = Ms / (A·L) of a cylindrical specimen.

    Parameters
    ----------
    dry_mass : float or array_like
        Mass of dry solids. [kg]
    diameter : float or array_like
        Specimen diameter. [m]
    height : float or array_like
        Specimen height (length along the flow path). [m]

    Returns
    -------
    float or array_like
        Dry density. [kg/m3]

    References
    ----------
    Das & Sobhan, *Principles of Geotechnical Engineering*, weight-volume relationships.
    """
    return dry_mass / (circle_area(diameter) * height)


def void_ratio(dry_density_value, specific_gravity, water_density=WATER_DENSITY_PHASE):
    """Void ratio e = Gs·ρw/ρd − 1.

    Parameters
    ----------
    dry_density_value : float or array_like
        Dry density. [kg/m3]
    specific_gravity : float or array_like
        Specific gravity of solids Gs. [-]
    water_density : float, optional
        ρw for phase relations. [kg/m3]

    Returns
    -------
    float or array_like
        Void ratio. [-]

    References
    ----------
    Das & Sobhan, *Principles of Geotechnical Engineering*, ρd = Gs·ρw/(1 + e).
    """
    return specific_gravity * water_density / dry_density_value - 1.0


def porosity(void_ratio_value):
    """Porosity n = e/(1 + e).

    Parameters
    ----------
    void_ratio_value : float or array_like
        Void ratio. [-]

    Returns
    -------
    float or array_like
        Porosity. [-]

    References
    ----------
    Das & Sobhan, *Principles of Geotechnical Engineering*, weight-volume relationships.
    """
    return void_ratio_value / (1.0 + void_ratio_value)


def degree_of_saturation(water_content, specific_gravity, void_ratio_value):
    """Degree of saturation S = w·Gs/e.

    Parameters
    ----------
    water_content : float or array_like
        Gravimetric water content, as a fraction. [-]
    specific_gravity : float or array_like
        Specific gravity of solids. [-]
    void_ratio_value : float or array_like
        Void ratio. [-]

    Returns
    -------
    float or array_like
        Degree of saturation, as a fraction. [-]

    References
    ----------
    Das & Sobhan, *Principles of Geotechnical Engineering*, S·e = w·Gs.
    """
    return water_content * specific_gravity / void_ratio_value


REQUIRED_COLUMNS = ("specimen", "diameter", "height", "dry_mass", "specific_gravity")


def specimen_state(specimens: pd.DataFrame) -> pd.DataFrame:
    """Add the as-molded state to a specimens table.

    Parameters
    ----------
    specimens : pandas.DataFrame
        Needs ``specimen``, ``diameter`` [m], ``height`` [m], ``dry_mass`` [kg] and
        ``specific_gravity``; uses ``water_content`` (fraction) when present.

    Returns
    -------
    pandas.DataFrame
        A new frame with ``area`` [m2], ``volume`` [m3], ``dry_density`` [kg/m3],
        ``void_ratio``, ``porosity`` and ``saturation`` (fraction; NaN where no water
        content was given, which the results table states in words).
    """
    missing = [c for c in REQUIRED_COLUMNS if c not in specimens.columns]
    if missing:
        raise KeyError(f"specimens table lacks column(s): {', '.join(missing)}")
    out = specimens.copy()
    out["area"] = circle_area(out["diameter"].to_numpy(float))
    out["volume"] = out["area"] * out["height"]
    out["dry_density"] = out["dry_mass"] / out["volume"]
    out["void_ratio"] = void_ratio(out["dry_density"], out["specific_gravity"])
    out["porosity"] = porosity(out["void_ratio"])
    if "water_content" in out.columns:
        out["saturation"] = degree_of_saturation(
            out["water_content"], out["specific_gravity"], out["void_ratio"]
        )
    else:
        out["saturation"] = np.nan
    return out
