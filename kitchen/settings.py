"""The settings every result is computed with, and the names of their options.

Every layer that reduces or reports reads :class:`Settings`; this module imports no layer
above the water properties, the validity limits and the uncertainty inputs, so that none
of them needs an import hidden inside a function to reach it.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

from kitchen.uncertainty import PROPAGATION_METHODS, Resolutions
from kitchen.validity import Criteria
from kitchen.water import VISCOSITY_METHODS

__all__ = [
    "CAPILLARY_RISE_OPTIONS",
    "FALLING_HEAD_FITS",
    "Settings",
    "reference_label",
]

FALLING_HEAD_FITS = ("log_linear", "datum")
"""Fits of a falling-head record: ln h on time, or the decay to a fitted datum."""

CAPILLARY_RISE_OPTIONS = ("off", "jurin")


@dataclass(frozen=True)
class Settings:
    """Choices that change the results; every report records them.

    Parameters
    ----------
    reference_temperature : float
        Temperature the conductivity is corrected to (20 °C in ASTM D5084). [degC]
    viscosity : str
        Water viscosity method: ``"kestin"`` (Kestin et al. 1978, default), ``"iapws"``
        (IAPWS 2008) or ``"d5084"`` (the ASTM D5084 equation for R_T).
    criteria : kitchen.validity.criteria.Criteria
        Limits of the validity criteria; defaults from ASTM D5084 (4 consecutive values
        within ±25 %, ±50 % below 1e-10 m/s, outflow/inflow 0.75–1.25, the gradient
        table, Reynolds number 1), for example
        ``Settings(criteria=Criteria(steady_tolerance=0.2))``.
    resolutions : kitchen.uncertainty.input_quantities.Resolutions
        Resolutions of caliper, balance, timer, head scale, volume scale and thermometer
        that enter every interval (defaults 0.01 mm, 0.1 g, 1 s, 1 mm, 1 mL, 0.1 °C).
    uncertainty_method : str
        ``"first_order"`` (the GUM's law of propagation, JCGM 100:2008; default) or
        ``"monte_carlo"`` (JCGM 101:2008).
    monte_carlo_trials : int
        Trials of the Monte Carlo method. [-]
    monte_carlo_seed : int
        Seed of the Monte Carlo method, fixed so that a report is reproducible.
    falling_head_fit : str
        ``"log_linear"`` (ln h on time; default) or ``"datum"`` (decay to a fitted
        tailwater datum h∞).
    capillary_rise : str
        ``"off"`` (default: heads as read) or ``"jurin"`` (heads less the capillary rise
        in the standpipe by Jurin's law from its bore; a measured value per specimen is
        passed to :func:`~kitchen.reduction.series_results` instead).
    datum_uncertainty : float
        How far the falling-head tailwater datum (the level every head is measured from)
        may be off, as the half-width of a rectangular distribution. Default 20 mm: the
        level of a tailwater reservoir read by eye across the cell against the standpipe's
        scale (common practice, no source); a surveyed datum warrants less. It widens the
        interval of k under the log-linear fit (a record of a few hundred readings cannot
        show a datum 20 mm off as curvature); the datum-fitted decay fits the datum
        instead and does not use it. [m]
    """

    reference_temperature: float = 20.0
    viscosity: str = "kestin"
    criteria: Criteria = Criteria()
    resolutions: Resolutions = Resolutions()
    uncertainty_method: str = "first_order"
    monte_carlo_trials: int = 200_000
    monte_carlo_seed: int = 0
    falling_head_fit: str = "log_linear"
    capillary_rise: str = "off"
    datum_uncertainty: float = 0.020

    def __post_init__(self):
        if self.viscosity not in VISCOSITY_METHODS:
            names = ", ".join(VISCOSITY_METHODS)
            raise ValueError(f"unknown viscosity method {self.viscosity!r}; choose {names}")
        choices = (
            ("uncertainty_method", PROPAGATION_METHODS),
            ("falling_head_fit", FALLING_HEAD_FITS),
            ("capillary_rise", CAPILLARY_RISE_OPTIONS),
        )
        for name, allowed in choices:
            if getattr(self, name) not in allowed:
                raise ValueError(
                    f"unknown {name.replace('_', ' ')} {getattr(self, name)!r}; choose one of "
                    f"{', '.join(allowed)}"
                )
        if not isinstance(self.criteria, Criteria) or not isinstance(self.resolutions, Resolutions):
            raise ValueError(
                "criteria must be a kitchen.validity.criteria.Criteria and resolutions a "
                "kitchen.uncertainty.input_quantities.Resolutions"
            )
        if not isinstance(self.monte_carlo_trials, int) or self.monte_carlo_trials < 1000:
            raise ValueError(
                f"monte_carlo_trials must be a whole number of at least 1000, got "
                f"{self.monte_carlo_trials!r}"
            )
        tolerance = self.datum_uncertainty
        if (
            isinstance(tolerance, bool)
            or not isinstance(tolerance, (int, float))
            or not (0.0 <= tolerance < 1.0)
        ):
            raise ValueError(
                f"datum uncertainty must be a length from 0 to below 1 m, got {tolerance!r}"
            )
        if not 0.0 < self.reference_temperature < 100.0:
            raise ValueError(
                f"reference temperature {self.reference_temperature:g} degC is outside "
                "liquid water (0 to 100 degC)"
            )

    def with_changes(self, **changes) -> Settings:
        return replace(self, **changes)


def reference_label(reference: Settings | float) -> str:
    """Name of the corrected k, after the reference temperature: ``k20``, ``k10``, ``k27_5``.

    Parameters
    ----------
    reference : Settings or float
        Settings, or the reference temperature itself. [degC]
    """
    temperature = (
        reference.reference_temperature if isinstance(reference, Settings) else float(reference)
    )
    return f"k{temperature:g}".replace(".", "_")
