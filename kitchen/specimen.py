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


def pore_volume(dry_mass, specific_gravity, volume, water_density=WATER_DENSITY_PHASE):
    """Volume of the voids of a specimen: Vv = V − Ms/(Gs·ρw). [m3]

    Parameters
    ----------
    dry_mass : float or array_like
        Ms. [kg]
    specific_gravity : float or array_like
        Gs. [-]
    volume : float or array_like
        Total volume V. [m3]

    References
    ----------
    Das & Sobhan, *Principles of Geotechnical Engineering*, weight-volume relationships:
    Vs = Ms/(Gs·ρw), Vv = V − Vs. The pore volume of flow (flow over Vv) as ASTM D5084
    and ASTM D7100 report it (from memory).

    Examples
    --------
    >>> round(pore_volume(1.35, 2.70, 1.0e-3) * 1e6, 6)
    500.0
    """
    solids = np.asarray(dry_mass, dtype=float) / (
        np.asarray(specific_gravity, dtype=float) * water_density
    )
    out = np.asarray(volume, dtype=float) - solids
    return float(out) if out.ndim == 0 else out


VOLUME_CHANGE_FLAG = 0.01
"""A specimen whose volume after the test differs from its volume as prepared by more than
this fraction is flagged as swelled or consolidated. Common practice, no source. [-]"""


def final_state(specimens: pd.DataFrame) -> pd.DataFrame:
    """The specimen's state after the test beside its state as prepared, where recorded.

    Parameters
    ----------
    specimens : pandas.DataFrame
        As for :func:`specimen_state`, with ``final_height``, ``final_diameter`` [m],
        ``final_mass`` (moist mass after the test) [kg] and ``final_water_content``
        (fraction) where they were recorded; a missing final dimension is taken as
        unchanged only when the other is given.

    Returns
    -------
    pandas.DataFrame
        One row per specimen: ``specimen``, ``final_volume`` [m3], ``final_dry_density``
        [kg/m3], ``final_void_ratio``, ``final_water_content`` (recorded, else
        (Mf − Ms)/Ms from the final mass), ``final_saturation``, ``volume_change`` (fraction
        of the volume as prepared, positive for a swelling) and ``change`` in words
        (``swelled 3.1 %``, ``consolidated 2.0 %``, ``unchanged (within 1 %)``,
        ``not recorded``). NaN where the values needed were not recorded.

    References
    ----------
    Das & Sobhan, *Principles of Geotechnical Engineering*, weight-volume relationships:
    ρd = Ms/V, e = Gs·ρw/ρd − 1, w = Mw/Ms, S = w·Gs/e. ASTM D5084 and ISO 17892-11 ask
    for the final dimensions, water content and dry density (from memory).

    Examples
    --------
    >>> import pandas as pd
    >>> frame = pd.DataFrame({"specimen": ["A"], "diameter": [0.1], "height": [0.1],
    ...     "dry_mass": [1.4], "specific_gravity": [2.7], "final_height": [0.102],
    ...     "final_diameter": [0.1], "final_mass": [1.75], "final_water_content": [float("nan")]})
    >>> row = final_state(frame).iloc[0]
    >>> round(float(row["final_water_content"]), 4), row["change"]
    (0.25, 'swelled 2 %')
    """
    state = specimen_state(specimens)

    def column(name):
        if name in state.columns:
            return state[name].to_numpy(float)
        return np.full(len(state), np.nan)

    height, diameter = column("height"), column("diameter")
    final_height, final_diameter = column("final_height"), column("final_diameter")
    recorded = np.isfinite(final_height) | np.isfinite(final_diameter)
    final_height = np.where(np.isfinite(final_height), final_height, height)
    final_diameter = np.where(np.isfinite(final_diameter), final_diameter, diameter)
    final_volume = np.where(recorded, circle_area(final_diameter) * final_height, np.nan)
    dry_mass, gs = column("dry_mass"), column("specific_gravity")
    with np.errstate(invalid="ignore", divide="ignore"):
        final_density = dry_mass / final_volume
        final_e = void_ratio(final_density, gs)
        water = column("final_water_content")
        from_mass = (column("final_mass") - dry_mass) / dry_mass
        water = np.where(np.isfinite(water), water, from_mass)
        saturation = degree_of_saturation(water, gs, final_e)
        change = final_volume / state["volume"].to_numpy(float) - 1.0
    words = []
    for value in change:
        if not np.isfinite(value):
            words.append("not recorded")
        elif value > VOLUME_CHANGE_FLAG:
            words.append(f"swelled {value * 100:.2g} %")
        elif value < -VOLUME_CHANGE_FLAG:
            words.append(f"consolidated {-value * 100:.2g} %")
        else:
            words.append(f"unchanged (within {VOLUME_CHANGE_FLAG * 100:g} %)")
    return pd.DataFrame(
        {
            "specimen": state["specimen"].to_numpy(object),
            "final_volume": final_volume,
            "final_dry_density": final_density,
            "final_void_ratio": final_e,
            "final_water_content": water,
            "final_saturation": saturation,
            "volume_change": change,
            "change": words,
        }
    )
