"""Propagation of uncertainty: from input quantities through a model to a 95 % interval.

A measurement model ``y = f(x1, x2, …)`` and its input quantities
(:class:`kitchen.uncertainty.InputQuantity`) give the output's standard uncertainty and
an interval, either by the GUM's law of propagation of uncertainty (first order, with the
Welch–Satterthwaite effective degrees of freedom, :func:`propagate_first_order`) or by
Monte Carlo propagation of the distributions (:func:`propagate_monte_carlo`). The result is
an :class:`UncertaintyResult` with its budget, one :class:`Contribution` per input.

References
----------
JCGM 100:2008, *Evaluation of measurement data — Guide to the expression of uncertainty in
measurement*: 5.1.2 (law of propagation, eq. 10), G.4 (effective degrees of freedom, eq.
G.2b), G.3 and G.6.4 (coverage factor from the t distribution). JCGM 101:2008, *Supplement 1
to the GUM — Propagation of distributions using a Monte Carlo method*: 6.4 (distributions),
7.7 (probabilistically symmetric coverage interval). From memory for the clause numbers.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping
from dataclasses import dataclass

import numpy as np

from .input_quantities import InputQuantity

__all__ = [
    "PROPAGATION_METHODS",
    "Contribution",
    "UncertaintyResult",
    "propagate_first_order",
    "propagate_monte_carlo",
    "propagate",
]

PROPAGATION_METHODS = ("first_order", "monte_carlo")


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


def _coverage_factor(confidence, dof):
    from scipy import special  # imported here: keeps start-up light (scipy loads slowly)

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
