"""Measurement uncertainty: input quantities, their propagation, and the 95 % interval on k.

Every k the reductions give carries an interval. A measurement model ``y = f(x1, x2, …)``
and its input quantities (each a best estimate, a standard uncertainty and a distribution)
give the output's standard uncertainty and an interval, by the GUM's law of propagation of
uncertainty (first order, with the Welch–Satterthwaite effective degrees of freedom) or by
Monte Carlo propagation of the distributions. The conductivity model combines the fit's
own uncertainty (Type A) with the resolutions of the caliper, balance, timer, head scale,
volume scale and thermometer (Type B).

Modules:

- :mod:`.input_quantities`: input quantities, instrument resolutions, Type A and Type B.
- :mod:`.propagation`: first-order and Monte Carlo propagation to an interval with a budget.
- :mod:`.conductivity`: the conductivity model of the reductions, and its interval on k.

The public face, which other subpackages import from :mod:`kitchen.uncertainty` and never
from its modules: :class:`InputQuantity`, :data:`DISTRIBUTIONS`, :class:`Resolutions`,
:func:`resolution_uncertainty`, :func:`rectangular_quantity`, :func:`fit_quantity` and
:func:`temperature_sensitivity` (the inputs); :func:`propagate`,
:func:`propagate_first_order`, :func:`propagate_monte_carlo`, :data:`PROPAGATION_METHODS`,
:class:`UncertaintyResult` and :class:`Contribution` (the propagation);
:func:`conductivity_interval` (the interval on k).

References
----------
JCGM 100:2008, *Evaluation of measurement data — Guide to the expression of uncertainty
in measurement*: 4.3.7 and F.2.2.1 (resolution: rectangular distribution, u = δx/√12),
5.1.2 (law of propagation, eq. 10), G.4 (effective degrees of freedom, eq. G.2b), G.3 and
G.6.4 (coverage factor from the t distribution). From memory for the clause numbers.
JCGM 101:2008, *Supplement 1 to the GUM — Propagation of distributions using a Monte Carlo
method*: 6.4.2 (rectangular), 6.4.7 (normal), 6.4.9 (scaled and shifted t for a Type A
evaluation), 7.7 (probabilistically symmetric coverage interval). From memory for the
clause numbers.
"""

from kitchen import _lazy

__getattr__, __dir__ = _lazy.lazy_face(
    __name__,
    {
        "conductivity_interval": "conductivity",
        "DISTRIBUTIONS": "input_quantities",
        "InputQuantity": "input_quantities",
        "Resolutions": "input_quantities",
        "fit_quantity": "input_quantities",
        "rectangular_quantity": "input_quantities",
        "resolution_uncertainty": "input_quantities",
        "temperature_sensitivity": "input_quantities",
        "PROPAGATION_METHODS": "propagation",
        "Contribution": "propagation",
        "UncertaintyResult": "propagation",
        "propagate": "propagation",
        "propagate_first_order": "propagation",
        "propagate_monte_carlo": "propagation",
    },
)

__all__ = [
    "conductivity_interval",
    "Contribution",
    "DISTRIBUTIONS",
    "fit_quantity",
    "InputQuantity",
    "propagate",
    "propagate_first_order",
    "propagate_monte_carlo",
    "PROPAGATION_METHODS",
    "rectangular_quantity",
    "resolution_uncertainty",
    "Resolutions",
    "temperature_sensitivity",
    "UncertaintyResult",
]
