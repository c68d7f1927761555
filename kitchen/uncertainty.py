"""Measurement uncertainty: from input quantities to a 95 % interval on k.

A measurement model ``y = f(x1, x2, …)`` and its input quantities (each a best estimate,
a standard uncertainty and a distribution) give the output's standard uncertainty and an
interval, either by the GUM's law of propagation of uncertainty (first order, with the
Welch–Satterthwaite effective degrees of freedom) or by Monte Carlo propagation of the
distributions. The conductivity models of the reductions are built from these pieces:
the fit's own uncertainty (Type A) combined with the resolutions of the caliper, balance,
timer, head scale, volume scale and thermometer (Type B).

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
from dataclasses import dataclass

import numpy as np
from scipy import special

from .water import viscosity_ratio

__all__ = [
    "DISTRIBUTIONS",
    "PROPAGATION_METHODS",
    "Resolutions",
    "InputQuantity",
    "Contribution",
    "UncertaintyResult",
    "resolution_uncertainty",
    "rectangular_quantity",
    "fit_quantity",
    "temperature_sensitivity",
    "propagate_first_order",
    "propagate_monte_carlo",
    "propagate",
    "conductivity_interval",
]

DISTRIBUTIONS = ("normal", "rectangular", "t")
PROPAGATION_METHODS = ("first_order", "monte_carlo")


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


@dataclass(frozen=True)
class Contribution:
    """One line of an uncertainty budget: u_i(y) = |c_i|·u(x_i)."""

    name: str
    value: float
    standard_uncertainty: float
    sensitivity: float
    contribution: float
    degrees_of_freedom: float


@dataclass(frozen=True)
class UncertaintyResult:
    """An output quantity with its standard uncertainty and coverage interval.

    ``low``/``high`` bound the interval at ``confidence``; ``method`` names how it was
    obtained. For Monte Carlo the interval is probabilistically symmetric and
    ``coverage_factor`` is the half-width divided by the standard uncertainty.
    """

    value: float
    standard_uncertainty: float
    low: float
    high: float
    confidence: float
    coverage_factor: float
    effective_degrees_of_freedom: float
    method: str
    contributions: tuple[Contribution, ...]
    trials: int = 0

    @property
    def relative_standard_uncertainty(self) -> float:
        """u(y)/|y|. [-]"""
        return self.standard_uncertainty / abs(self.value) if self.value else math.inf

    def describe(self) -> str:
        """The method in words, with its source."""
        if self.trials:
            return (
                f"Monte Carlo propagation of distributions, {self.trials} trials, "
                "probabilistically symmetric 95 % interval (JCGM 101:2008)"
            )
        return (
            "first-order propagation of uncertainty with effective degrees of freedom "
            f"(JCGM 100:2008), coverage factor {self.coverage_factor:.2f}"
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


def _coverage_factor(confidence, dof):
    if math.isinf(dof):
        return float(special.ndtri(0.5 + 0.5 * confidence))
    return float(special.stdtrit(dof, 0.5 + 0.5 * confidence))


def _check_inputs(quantities, confidence):
    if not 0.0 < confidence < 1.0:
        raise ValueError(f"confidence must be a fraction between 0 and 1, got {confidence!r}")
    quantities = tuple(quantities)
    if not quantities:
        raise ValueError("a measurement model needs at least one input quantity")
    names = [q.name for q in quantities]
    if len(set(names)) != len(names):
        twice = sorted({n for n in names if names.count(n) > 1})
        raise ValueError(f"input quantities given twice: {', '.join(twice)}")
    return quantities


def _evaluate(model, columns: Mapping[str, np.ndarray]) -> np.ndarray:
    values = np.asarray(model(columns), dtype=float)
    if not np.all(np.isfinite(values)):
        raise ValueError("the measurement model gave a non-finite value for these inputs")
    return values


def propagate_first_order(
    model: Callable[[Mapping[str, np.ndarray]], np.ndarray],
    quantities,
    confidence: float = 0.95,
) -> UncertaintyResult:
    """Propagate standard uncertainties through a model by the GUM's first-order law.

    Parameters
    ----------
    model : callable
        ``model(values)`` with ``values`` a mapping of quantity name to a numpy array;
        returns an array of the same length (vectorised over the arrays).
    quantities : sequence of InputQuantity
        The input quantities, taken as uncorrelated.
    confidence : float
        Coverage probability of the interval. [-]

    Returns
    -------
    UncertaintyResult
        ``value = f(x)``; ``u(y)² = Σ (c_i u(x_i))²`` with sensitivities ``c_i = ∂f/∂x_i``
        by central differences (step 1e-3·u(x_i)); effective degrees of freedom by the
        Welch–Satterthwaite formula; coverage factor from the t distribution; interval
        ``y ± k·u(y)``.

    References
    ----------
    JCGM 100:2008, 5.1.2 eq. (10), G.4.1 eq. (G.2b) and G.3 (from memory for the clauses).
    """
    quantities = _check_inputs(quantities, confidence)
    m = len(quantities)
    columns = {q.name: np.full(2 * m + 1, q.value) for q in quantities}
    steps = np.array([1e-3 * q.standard_uncertainty for q in quantities])
    for index, q in enumerate(quantities):
        columns[q.name][1 + 2 * index] += steps[index]
        columns[q.name][2 + 2 * index] -= steps[index]
    values = _evaluate(model, columns)
    value = float(values[0])
    contributions = []
    for index, q in enumerate(quantities):
        if steps[index] > 0:
            sensitivity = (values[1 + 2 * index] - values[2 + 2 * index]) / (2 * steps[index])
        else:
            sensitivity = 0.0
        contributions.append(
            Contribution(
                q.name,
                q.value,
                q.standard_uncertainty,
                float(sensitivity),
                float(abs(sensitivity) * q.standard_uncertainty),
                q.degrees_of_freedom,
            )
        )
    u = math.sqrt(sum(c.contribution**2 for c in contributions))
    finite = [c for c in contributions if math.isfinite(c.degrees_of_freedom) and c.contribution]
    denominator = sum(c.contribution**4 / c.degrees_of_freedom for c in finite)
    dof = u**4 / denominator if denominator > 0 else math.inf
    factor = _coverage_factor(confidence, dof)
    return UncertaintyResult(
        value=value,
        standard_uncertainty=u,
        low=value - factor * u,
        high=value + factor * u,
        confidence=confidence,
        coverage_factor=factor,
        effective_degrees_of_freedom=dof,
        method="first_order",
        contributions=tuple(contributions),
    )


def _draw(quantity: InputQuantity, trials: int, rng: np.random.Generator) -> np.ndarray:
    u = quantity.standard_uncertainty
    if u == 0:
        return np.full(trials, quantity.value)
    if quantity.distribution == "normal":
        return quantity.value + u * rng.standard_normal(trials)
    if quantity.distribution == "rectangular":
        half = math.sqrt(3.0) * u
        return quantity.value + rng.uniform(-half, half, trials)
    if math.isinf(quantity.degrees_of_freedom):
        return quantity.value + u * rng.standard_normal(trials)
    return quantity.value + u * rng.standard_t(quantity.degrees_of_freedom, trials)


def propagate_monte_carlo(
    model: Callable[[Mapping[str, np.ndarray]], np.ndarray],
    quantities,
    confidence: float = 0.95,
    trials: int = 200_000,
    seed: int = 0,
) -> UncertaintyResult:
    """Propagate the input distributions through a model by Monte Carlo.

    Parameters
    ----------
    model : callable
        As for :func:`propagate_first_order`, vectorised over ``trials`` values.
    quantities : sequence of InputQuantity
        The input quantities, independent, each drawn from its ``distribution``.
    confidence : float
        Coverage probability of the interval. [-]
    trials : int
        Number of Monte Carlo trials (at least 1000). [-]
    seed : int
        Seed of the random generator; fixed by default so that a report is reproducible.

    Returns
    -------
    UncertaintyResult
        ``value = f(x)`` at the best estimates; standard uncertainty the standard deviation
        of the trials; the probabilistically symmetric interval between the (1 − p)/2 and
        (1 + p)/2 quantiles; ``contributions`` from a first-order budget, for reading.

    References
    ----------
    JCGM 101:2008, 6.4 (distributions), 7.6 and 7.7 (estimate, standard uncertainty and
    probabilistically symmetric coverage interval), from memory for the clauses.
    """
    quantities = _check_inputs(quantities, confidence)
    if not isinstance(trials, (int, np.integer)) or trials < 1000:
        raise ValueError(
            f"Monte Carlo needs an integer number of trials of at least 1000, got {trials!r}"
        )
    rng = np.random.default_rng(seed)
    columns = {q.name: _draw(q, int(trials), rng) for q in quantities}
    outputs = _evaluate(model, columns)
    budget = propagate_first_order(model, quantities, confidence)
    low, high = np.quantile(outputs, [0.5 - 0.5 * confidence, 0.5 + 0.5 * confidence])
    u = float(np.std(outputs, ddof=1))
    return UncertaintyResult(
        value=budget.value,
        standard_uncertainty=u,
        low=float(low),
        high=float(high),
        confidence=confidence,
        coverage_factor=float((high - low) / (2 * u)) if u > 0 else math.nan,
        effective_degrees_of_freedom=math.inf,
        method="monte_carlo",
        contributions=budget.contributions,
        trials=int(trials),
    )


def propagate(model, quantities, method="first_order", confidence=0.95, trials=200_000, seed=0):
    """Propagate by ``method`` (``"first_order"`` or ``"monte_carlo"``); see both functions."""
    if method == "first_order":
        return propagate_first_order(model, quantities, confidence)
    if method == "monte_carlo":
        return propagate_monte_carlo(model, quantities, confidence, trials, seed)
    raise ValueError(
        f"unknown uncertainty method {method!r}; choose one of {', '.join(PROPAGATION_METHODS)}"
    )


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
    (``reading_factor``, 1 at the best estimates; used when there is no fit), ``L`` the flow
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
        The fitted factor (:func:`fit_quantity`).
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
