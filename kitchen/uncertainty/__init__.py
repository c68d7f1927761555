"""FACE-DOCSTRING"""

from .conductivity import (
    conductivity_interval,
)
from .input_quantities import (
    DISTRIBUTIONS,
    InputQuantity,
    Resolutions,
    fit_quantity,
    rectangular_quantity,
    resolution_uncertainty,
    temperature_sensitivity,
)
from .propagation import (
    PROPAGATION_METHODS,
    Contribution,
    UncertaintyResult,
    propagate,
    propagate_first_order,
    propagate_monte_carlo,
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
