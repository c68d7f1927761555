"""Input quantities of a measurement model, and the instrument resolutions they come from.

An :class:`InputQuantity` is a best estimate, a standard uncertainty and a distribution.
The readings of the reductions are Type B quantities from the resolution of the instrument
they were read on (:class:`Resolutions`, :func:`rectangular_quantity`); a fitted factor is a
Type A quantity from the fit's standard error (:func:`fit_quantity`); a thermometer error
reaches k through the sensitivity of the temperature ratio (:func:`temperature_sensitivity`).
They are propagated to an interval by :mod:`kitchen.uncertainty.propagation`.

References
----------
.. [GUM] JCGM 100:2008, *Evaluation of measurement data — Guide to the expression of
   uncertainty in measurement*: 4.3.7 and F.2.2.1 (resolution: rectangular distribution,
   u = δx/√12). From memory for the clause numbers.
.. [MC] JCGM 101:2008, *Supplement 1 to the GUM — Propagation of distributions using a
   Monte Carlo method*: 6.4.2 (rectangular), 6.4.7 (normal), 6.4.9 (scaled and shifted t
   for a Type A evaluation). From memory for the clause numbers.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from kitchen.water import viscosity_ratio

__all__ = [
    "DISTRIBUTIONS",
    "Resolutions",
    "InputQuantity",
    "resolution_uncertainty",
    "rectangular_quantity",
    "fit_quantity",
    "temperature_sensitivity",
]

DISTRIBUTIONS = ("normal", "rectangular", "t")


@dataclass(frozen=True)
class Resolutions:
    """Resolutions of the laboratory's instruments: the smallest step each one reads.

    Each resolution δx is taken as a rectangular distribution of half-width δx/2, standard
    uncertainty δx/√12 ([GUM]_ F.2.2.1). Where an instrument's calibration uncertainty is
    larger than its resolution, enter the step that gives the same standard uncertainty.
    The defaults are those of ordinary laboratory equipment (common practice, no source);
    a laboratory sets its own per series.

    Parameters
    ----------
    caliper : float
        Caliper or rule used for the specimen diameter and height, the manometer tap
        spacing and the standpipe bore. Default 0.01 mm. [m]
    balance : float
        Balance used for weighed outflow. Default 0.1 g. [kg]
    timer : float
        Timer or clock for durations and reading times. Default 1 s. [s]
    head_scale : float
        Scale the heads are read on. Default 1 mm. [m]
    volume_scale : float
        Graduated cylinder or burette for collected volumes. Default 1 mL. [m3]
    thermometer : float
        Thermometer. Default 0.1 °C. [degC]
    """

    caliper: float = 0.01e-3
    balance: float = 0.1e-3
    timer: float = 1.0
    head_scale: float = 1.0e-3
    volume_scale: float = 1.0e-6
    thermometer: float = 0.1

    def __post_init__(self):
        for name in ("caliper", "balance", "timer", "head_scale", "volume_scale", "thermometer"):
            value = getattr(self, name)
            if not isinstance(value, (int, float)) or not math.isfinite(value) or value < 0:
                raise ValueError(
                    f"resolution {name} must be a finite number, zero or positive, got {value!r}"
                )


@dataclass(frozen=True)
class InputQuantity:
    """One input quantity of a measurement model.

    Parameters
    ----------
    name : str
        Name used as the model's key and in the uncertainty budget.
    value : float
        Best estimate. [unit of the quantity]
    standard_uncertainty : float
        Standard uncertainty, zero or positive. [unit of the quantity]
    distribution : {"normal", "rectangular", "t"}
        Distribution for Monte Carlo: normal; rectangular of half-width √3·u; or, for a
        Type A evaluation, a t distribution with ``degrees_of_freedom`` scaled by u and
        shifted to the value (u is then the standard error, as in the GUM; the
        distribution's own standard deviation is larger, u·√(ν/(ν − 2))).
    degrees_of_freedom : float
        Degrees of freedom of u (infinite for a Type B evaluation). [-]
    """

    name: str
    value: float
    standard_uncertainty: float
    distribution: str = "normal"
    degrees_of_freedom: float = math.inf

    def __post_init__(self):
        if self.distribution not in DISTRIBUTIONS:
            raise ValueError(
                f"input quantity {self.name!r}: unknown distribution {self.distribution!r}; "
                f"choose one of {', '.join(DISTRIBUTIONS)}"
            )
        if not math.isfinite(self.value):
            raise ValueError(
                f"input quantity {self.name!r}: value must be finite, got {self.value}"
            )
        u = self.standard_uncertainty
        if not (math.isfinite(u) and u >= 0):
            raise ValueError(
                f"input quantity {self.name!r}: standard uncertainty must be finite and not "
                f"negative, got {u}"
            )
        if not self.degrees_of_freedom > 0:
            raise ValueError(
                f"input quantity {self.name!r}: degrees of freedom must be positive, got "
                f"{self.degrees_of_freedom}"
            )


def resolution_uncertainty(resolution):
    """Standard uncertainty of a reading from the resolution of its instrument.

    Parameters
    ----------
    resolution : float or array_like
        Smallest step the instrument reads. [any unit]

    Returns
    -------
    float or array_like
        δx/√12: a rectangular distribution of half-width δx/2. [same unit]

    References
    ----------
    JCGM 100:2008 (GUM) 4.3.7 and F.2.2.1 (from memory for the clauses).

    Examples
    --------
    >>> round(resolution_uncertainty(1.0), 4)
    0.2887
    """
    return resolution / math.sqrt(12.0)


def rectangular_quantity(name: str, value: float, resolution: float) -> InputQuantity:
    """An input quantity read on an instrument of the given resolution (Type B)."""
    return InputQuantity(
        name, float(value), resolution_uncertainty(float(resolution)), "rectangular"
    )


def fit_quantity(name: str, relative_standard_error: float, degrees_of_freedom: float):
    """A fitted factor of best estimate 1 and the fit's relative standard error (Type A).

    Parameters
    ----------
    name : str
        Name in the budget (for example ``"slope of ln h on time"``).
    relative_standard_error : float
        Standard error of the fitted parameter divided by its value. [-]
    degrees_of_freedom : float
        Residual degrees of freedom of the fit. [-]

    Returns
    -------
    InputQuantity
        Distributed for Monte Carlo as a t with the fit's degrees of freedom, scaled by
        the standard error and shifted to 1 (JCGM 101:2008, 6.4.9, from memory).
    """
    return InputQuantity(
        name, 1.0, float(abs(relative_standard_error)), "t", float(degrees_of_freedom)
    )


def temperature_sensitivity(temperature: float, reference_temperature: float, viscosity: str):
    """d ln R_T / dT at the test temperature, by central difference. [1/degC]

    A uniform error δT in every temperature reading scales k at the reference temperature
    by R_T(T + δT)/R_T(T) ≈ exp(c·δT), with c this sensitivity (about −0.024 per °C at
    20 °C). The linear form keeps Monte Carlo fast with any viscosity method.
    """
    step = 0.05
    ratios = viscosity_ratio(
        np.array([temperature - step, temperature + step]), reference_temperature, viscosity
    )
    return float(np.log(ratios[1] / ratios[0]) / (2 * step))
