"""Measurement uncertainty: from input quantities to a 95 % interval on k.

A measurement model ``y = f(x1, x2, …)`` and its input quantities (each a best estimate,
a standard uncertainty and a distribution) give the output's standard uncertainty and an
interval, either by the GUM's law of propagation of uncertainty (first order, with the
Welch–Satterthwaite effective degrees of freedom) or by Monte Carlo propagation of the
distributions. The conductivity models of the reductions are built from these pieces:
the fit's own uncertainty (Type A) combined with the resolutions of the caliper, balance,
timer, head scale, volume scale and thermometer (Type B).

This module holds that conductivity model (:func:`conductivity_interval`). The input
quantities and the instrument resolutions are in :mod:`kitchen.uncertainty.input_quantities`,
the propagation in :mod:`kitchen.uncertainty.propagation`.

References
----------
.. [GUM] JCGM 100:2008, *Evaluation of measurement data — Guide to the expression of
   uncertainty in measurement*: 4.3.7 and F.2.2.1 (resolution: rectangular distribution,
   u = δx/√12), 5.1.2 (law of propagation, eq. 10), G.4 (effective degrees of freedom,
   eq. G.2b), G.3 and G.6.4 (coverage factor from the t distribution). From memory for the
   clause numbers.
.. [MC] JCGM 101:2008, *Supplement 1 to the GUM — Propagation of distributions using a
   Monte Carlo method*: 6.4.2 (rectangular), 6.4.7 (normal), 6.4.9 (scaled and shifted t
   for a Type A evaluation), 7.7 (probabilistically symmetric coverage interval). From
   memory for the clause numbers.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping

import numpy as np

from .input_quantities import DISTRIBUTIONS as DISTRIBUTIONS
from .input_quantities import (
    InputQuantity,
    Resolutions,
    rectangular_quantity,
    temperature_sensitivity,
)
from .propagation import PROPAGATION_METHODS as PROPAGATION_METHODS
from .propagation import UncertaintyResult, propagate

__all__ = ["conductivity_interval"]


def conductivity_interval(
    k_reference: float,
    *,
    diameter: float,
    flow_length: float,
    resolutions: Resolutions,
    fit: InputQuantity | None = None,
    readings: tuple[InputQuantity, ...] = (),
    reading_factor: Callable[[Mapping[str, np.ndarray]], np.ndarray] | None = None,
    standpipe_areas: tuple[float, float] | None = None,
    temperature: float = math.nan,
    reference_temperature: float = 20.0,
    viscosity: str = "kestin",
    method: str = "first_order",
    confidence: float = 0.95,
    trials: int = 200_000,
    seed: int = 0,
) -> UncertaintyResult:
    """Interval on a conductivity: the fit's uncertainty with the instruments' resolutions.

    The model is ``k = k_fit · F · R · (L'/L) · (D/D')² · (a'/a) · exp(c·δT)``: ``F`` the
    fitted factor (``fit``, best estimate 1), ``R`` the factor of the raw readings
    (``reading_factor``, 1 at the best estimates), ``L`` the flow
    length and ``D`` the specimen diameter read on the caliper, ``a`` the standpipe area
    from its bore read on the caliper (falling head), ``δT`` a thermometer error common to
    every reading and ``c`` = d ln R_T/dT.

    Parameters
    ----------
    k_reference : float
        Conductivity at the reference temperature from the reduction. [m/s]
    diameter, flow_length : float
        Specimen diameter and flow length. [m]
    resolutions : Resolutions
        Instrument resolutions.
    fit : InputQuantity, optional
        The fitted factor (:func:`~kitchen.uncertainty.fit_quantity`).
    readings : tuple of InputQuantity, optional
        Raw readings, used by ``reading_factor``.
    reading_factor : callable, optional
        ``reading_factor(values)`` → array, 1 at the best estimates.
    standpipe_areas : (float, float), optional
        Inflow and tailwater standpipe areas (NaN for a constant tailwater). [m2]
    temperature : float
        Mean test temperature; NaN when not recorded (no thermometer term). [degC]
    reference_temperature : float
        Reference temperature. [degC]
    viscosity : str
        Viscosity method of R_T.
    method : {"first_order", "monte_carlo"}
        Propagation method (:func:`propagate`).
    confidence : float
        Coverage probability. [-]
    trials, seed : int
        Monte Carlo trials and seed.

    Returns
    -------
    UncertaintyResult
        In m/s.

    Notes
    -----
    Random errors of the individual readings (head, time, volume) reach k through the
    fit's scatter when there is a fit, so they are not counted again; they enter through
    ``readings`` only when k comes from a single pair of readings or a single collection.
    An error common to every reading (the falling-head tailwater datum) is invisible to the
    fit like the dimensions, and enters through ``readings`` and ``reading_factor`` with a
    fit too.
    The dimensions and the thermometer act on every reading alike, so the fit cannot see
    them: they are always counted. Inputs are taken as uncorrelated ([GUM]_ 5.1).

    References
    ----------
    JCGM 100:2008 (GUM), 5.1.2 and F.2.2.1; JCGM 101:2008 (from memory for the clauses).
    """
    quantities = [
        rectangular_quantity("specimen diameter", diameter, resolutions.caliper),
        rectangular_quantity("flow length", flow_length, resolutions.caliper),
    ]
    if fit is not None:
        quantities.append(fit)
    quantities.extend(readings)
    bores = None
    if standpipe_areas is not None:
        inflow, outflow = (float(a) for a in standpipe_areas)
        bores = [math.sqrt(4 * inflow / math.pi)]
        quantities.append(rectangular_quantity("standpipe bore", bores[0], resolutions.caliper))
        if math.isfinite(outflow):
            bores.append(math.sqrt(4 * outflow / math.pi))
            quantities.append(
                rectangular_quantity("tailwater standpipe bore", bores[1], resolutions.caliper)
            )
    sensitivity = 0.0
    if math.isfinite(temperature):
        sensitivity = temperature_sensitivity(temperature, reference_temperature, viscosity)
        quantities.append(rectangular_quantity("thermometer", 0.0, resolutions.thermometer))

    def model(values):
        k = k_reference * (values["flow length"] / flow_length)
        k = k * (diameter / values["specimen diameter"]) ** 2
        if fit is not None:
            k = k * values[fit.name]
        if reading_factor is not None:
            k = k * reading_factor(values)
        if bores is not None:
            inflow_ratio = (values["standpipe bore"] / bores[0]) ** 2
            if len(bores) == 2:
                outflow_ratio = (values["tailwater standpipe bore"] / bores[1]) ** 2
                a_in, a_out = bores[0] ** 2, bores[1] ** 2
                combined = a_in * a_out / (a_in + a_out)
                new_in, new_out = a_in * inflow_ratio, a_out * outflow_ratio
                k = k * (new_in * new_out / (new_in + new_out)) / combined
            else:
                k = k * inflow_ratio
        if sensitivity:
            k = k * np.exp(sensitivity * values["thermometer"])
        return k

    return propagate(model, quantities, method, confidence, trials, seed)
