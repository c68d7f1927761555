"""Saturation lines on the compaction plane: zero-air-voids and constant degree of saturation.

Dry density against molding water content at a given degree of saturation, from the phase
relations ρd = Gs·ρw/(1 + e) with S·e = w·Gs; at S = 1 the zero-air-voids line, the upper
bound of every compaction curve.
"""

from __future__ import annotations

from kitchen.specimen import WATER_DENSITY_PHASE

from ._checks import finite_numbers, like_inputs, require_elements, require_same_length

__all__ = ["zero_air_voids_dry_density", "constant_saturation_dry_density"]


def constant_saturation_dry_density(
    water_content, specific_gravity, saturation, water_density=WATER_DENSITY_PHASE
):
    """Dry density at a given water content and degree of saturation.

    Parameters
    ----------
    water_content : float, array_like or pandas.Series
        Water content, a fraction (0.20 for 20 %). [-]
    specific_gravity : float, array_like or pandas.Series
        Specific gravity of the solids Gs. [-]
    saturation : float, array_like or pandas.Series
        Degree of saturation S, a fraction, 0 < S ≤ 1. [-]
    water_density : float, default kitchen.specimen.WATER_DENSITY_PHASE (1000.0)
        Density of water ρw used in the phase relations. [kg/m3]

    Returns
    -------
    float, numpy.ndarray or pandas.Series
        ρd = Gs·ρw / (1 + w·Gs/S), in the kind of the inputs. [kg/m3]

    References
    ----------
    Das, B. M. and Sobhan, K., *Principles of Geotechnical Engineering*, weight–volume
    relationships (ρd = Gs·ρw/(1 + e) with S·e = w·Gs) and the compaction chapter (from
    memory); Holtz, R. D. and Kovacs, W. D., *An Introduction to Geotechnical Engineering*,
    compaction chapter (from memory).

    Examples
    --------
    >>> round(constant_saturation_dry_density(0.20, 2.70, 0.90))
    1688
    """
    w = finite_numbers(water_content, "water_content")
    gs = finite_numbers(specific_gravity, "specific_gravity")
    s = finite_numbers(saturation, "saturation")
    rho_w = finite_numbers(water_density, "water_density")
    require_elements(water_content, w, w >= 0, "water_content", "a fraction ≥ 0")
    require_elements(
        specific_gravity,
        gs,
        (gs > 1) & (gs <= 10),
        "specific_gravity",
        "a specific gravity of solids between 1 and 10 (dimensionless; most soils 2.6–2.8)",
    )
    require_elements(
        saturation,
        s,
        (s > 0) & (s <= 1),
        "saturation",
        "a fraction 0 < S ≤ 1 (0.90 for 90 %, not 90)",
    )
    require_elements(
        water_density, rho_w, rho_w > 0, "water_density", "a positive density in kg/m3"
    )
    require_same_length(water_content=w, specific_gravity=gs, saturation=s)
    rho_d = gs * rho_w / (1.0 + w * gs / s)
    return like_inputs(rho_d, water_content, specific_gravity, saturation)


def zero_air_voids_dry_density(water_content, specific_gravity, water_density=WATER_DENSITY_PHASE):
    """Dry density on the zero-air-voids line (full saturation, S = 1).

    Parameters
    ----------
    water_content : float, array_like or pandas.Series
        Water content, a fraction. [-]
    specific_gravity : float, array_like or pandas.Series
        Specific gravity of the solids Gs. [-]
    water_density : float, default kitchen.specimen.WATER_DENSITY_PHASE (1000.0)
        Density of water ρw used in the phase relations. [kg/m3]

    Returns
    -------
    float, numpy.ndarray or pandas.Series
        ρd = Gs·ρw / (1 + w·Gs), in the kind of the inputs. [kg/m3]

    References
    ----------
    Das, B. M. and Sobhan, K., *Principles of Geotechnical Engineering*, compaction
    chapter, zero-air-void unit weight (from memory); Holtz, R. D. and Kovacs, W. D.,
    *An Introduction to Geotechnical Engineering*, compaction chapter (from memory).

    Examples
    --------
    >>> round(zero_air_voids_dry_density(0.20, 2.70))
    1753
    """
    return constant_saturation_dry_density(water_content, specific_gravity, 1.0, water_density)
