"""What the least-squares fits share: input checks, a blocked dot product, the t quantile.

The checks turn bad input into a plain ``ValueError`` that names the offending value (its
position, or the argument); the dot product runs in blocks short enough to stay on one
thread; the Student-t quantile gives every interval. The module is private to
:mod:`kitchen.fits`: its names are shared by the fits of :mod:`kitchen.fits.line`,
:mod:`kitchen.fits.windowed` and :mod:`kitchen.fits.decay`, which import them from here.
Pure numpy/scipy.
"""

from __future__ import annotations

import math

import numpy as np
from scipy import special

MACHINE_EPSILON = np.finfo(np.float64).eps


# --------------------------------------------------------------------------- input checks
def checked_confidence(confidence):
    if not isinstance(confidence, (int, float, np.floating)) or not 0.0 < confidence < 1.0:
        raise ValueError(f"confidence must be a fraction between 0 and 1, got {confidence!r}")
    return float(confidence)


def _as_vector(values, name):
    try:
        array = np.asarray(values, dtype=np.float64)
    except (TypeError, ValueError) as error:
        raise ValueError(f"{name} must hold numbers only ({error})") from None
    if array.ndim != 1:
        raise ValueError(f"{name} must be one-dimensional, got an array of shape {array.shape}")
    return array


def paired_vectors(x, y, names, minimum, what):
    x, y = _as_vector(x, names[0]), _as_vector(y, names[1])
    if x.size != y.size:
        raise ValueError(
            f"{names[0]} and {names[1]} must have the same length, got {x.size} and {y.size}"
        )
    if x.size < minimum:
        raise ValueError(f"{what} needs at least {minimum} points, got {x.size}")
    return x, y


def finite_sum(array, name):
    """Sum of `array`; a non-finite sum is traced to the first offending value."""
    total = float(array.sum())
    if math.isfinite(total):
        return total
    bad = np.flatnonzero(~np.isfinite(array))
    if bad.size:
        i = int(bad[0])
        raise ValueError(f"{name}[{i}] is {array[i]}; every value must be a finite number")
    raise ValueError(f"{name} holds values too large to fit in double precision")


def refuse_overflow(*values):
    if not all(math.isfinite(v) for v in values):
        raise ValueError("the values are too large to fit in double precision; rescale them")


DOT_BLOCK = 8192  # dot products run in blocks this long (see blocked_dot)


def blocked_dot(a, b):
    """Dot product of two long vectors, in blocks of `DOT_BLOCK` summed in Python.

    Blocks stay below the length at which OpenBLAS hands a dot product to several threads;
    on a busy machine that hand-off can stall for milliseconds to seconds, while the blocked
    single-thread loop costs about the same as one call on an idle one.
    """
    if a.size <= DOT_BLOCK:
        return float(np.dot(a, b))
    return float(
        sum(np.dot(a[i : i + DOT_BLOCK], b[i : i + DOT_BLOCK]) for i in range(0, a.size, DOT_BLOCK))
    )


def student_t_quantile(confidence, dof):
    """Two-sided Student-t quantile t_{(1+confidence)/2, dof}: ``scipy.special.stdtrit``,
    the inverse of Student's t distribution function, the numbers ``scipy.stats.t.ppf``
    gives to the bit (checked on 32 pairs of degrees of freedom and levels).

    References
    ----------
    Draper, N. R. and Smith, H., *Applied Regression Analysis*, 3rd ed., ch. 1 (the t
    quantile of a confidence interval on a regression coefficient; from memory).
    """
    return float(special.stdtrit(dof, 0.5 + 0.5 * confidence))
