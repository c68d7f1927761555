"""The criterion on k from the project specification, and each specimen's verdict against it.

A :class:`Criterion` is a limit on the hydraulic conductivity that knows its direction: the
largest k allowed (a liner, a cut-off) or the smallest required (a drainage layer, a
filter). :func:`classify_against_criterion` compares each k and its interval with it:
meets, does not meet, or not conclusive where the interval straddles the limit.
"""

from __future__ import annotations

import numpy as np

from ._checks import _conductivity, _like, _require, _same_length

__all__ = [
    "MEETS",
    "DOES_NOT_MEET",
    "NOT_CONCLUSIVE",
    "CRITERION_KINDS",
    "Criterion",
    "as_criterion",
    "classify_against_criterion",
]


MEETS = "meets"
DOES_NOT_MEET = "does not meet"
NOT_CONCLUSIVE = "not conclusive"


CRITERION_KINDS = ("maximum", "minimum")


class Criterion(float):
    """A limit on k from the project specification, in m/s, that knows its direction.

    A float (its value is the limit, so it multiplies, compares and formats as one) with a
    ``kind``: ``"maximum"``, the largest k allowed (a liner, a cut-off: k ≤ limit), or
    ``"minimum"``, the smallest k required (a drainage layer, a filter: k ≥ limit). A
    plain float given where a criterion is expected is a maximum.

    Examples
    --------
    >>> c = Criterion(1e-4, "minimum")
    >>> c.symbol, float(c) * 100
    ('≥', 0.01)
    """

    kind: str

    def __new__(cls, limit, kind: str = "maximum"):
        if kind not in CRITERION_KINDS:
            raise ValueError(
                f"criterion kind {kind!r}: expected 'maximum' (largest k allowed) or "
                "'minimum' (smallest k required)"
            )
        value = super().__new__(cls, limit)
        value.kind = kind
        return value

    def __reduce__(self):
        return (Criterion, (float(self), self.kind))

    def __repr__(self) -> str:
        return f"Criterion({float(self)!r}, {self.kind!r})"

    @property
    def symbol(self) -> str:
        """``≤`` for a maximum, ``≥`` for a minimum."""
        return "≤" if self.kind == "maximum" else "≥"

    @property
    def words(self) -> str:
        """The criterion's role in words: ``largest k allowed`` or ``smallest k required``."""
        return "largest k allowed" if self.kind == "maximum" else "smallest k required"


def as_criterion(value, kind: str | None = None) -> Criterion:
    """`value` as a :class:`Criterion`: a Criterion as it is (or with `kind`), a number as a
    limit of `kind` (default a maximum). The limit must be a positive conductivity.
    """
    if isinstance(value, Criterion) and kind is None:
        limit, kind = float(value), value.kind
    else:
        limit = _conductivity(value, "maximum" if (kind or "maximum") == "maximum" else kind)
        if np.ndim(limit) != 0:
            raise ValueError(f"criterion: expected one criterion value in m/s; got {value!r:.60}")
        limit = float(limit)
    return Criterion(limit, kind or "maximum")


def classify_against_criterion(k, k_low, k_high, criterion):
    """Compare each conductivity and its interval with the criterion of the specification.

    Parameters
    ----------
    k, k_low, k_high : float, array_like or pandas.Series
        Conductivity and the low and high ends of its interval, k_low ≤ k ≤ k_high. [m/s]
    criterion : float or Criterion
        The largest conductivity allowed (a number, or a ``Criterion`` of kind
        ``"maximum"``), or the smallest required (a ``Criterion`` of kind ``"minimum"``),
        from the project specification. [m/s]

    Returns
    -------
    str, numpy.ndarray of str or pandas.Series
        Against a maximum: ``"meets"`` where k_high ≤ maximum, ``"does not meet"`` where
        k_low > maximum. Against a minimum: ``"meets"`` where k_low ≥ minimum, ``"does not
        meet"`` where k_high < minimum. ``"not conclusive"`` where the interval straddles
        the criterion.

    Notes
    -----
    The criterion is an input: 1×10⁻⁹ m/s is common for compacted clay liners (US 40 CFR
    258.40; EU Directive 1999/31/EC, Annex I), and drainage layers are specified by a
    smallest k (1×10⁻⁴ m/s is often met in landfill leachate collection layers, from
    memory), but the governing value comes from local codes and the project
    specification. An interval that straddles the criterion is reported as such rather
    than decided on the central value (the tool's own rule).

    References
    ----------
    US 40 CFR 258.40 (design criteria for municipal solid waste landfills: compacted soil
    liner of k ≤ 1×10⁻⁷ cm/s); Council Directive 1999/31/EC on the landfill of waste,
    Annex I (geological barrier k ≤ 1×10⁻⁹ m/s).
    """
    values = _conductivity(k, "k")
    low, high = _conductivity(k_low, "k_low"), _conductivity(k_high, "k_high")
    if np.ndim(criterion) != 0:
        raise ValueError(f"maximum: expected one criterion value in m/s; got {criterion!r:.60}")
    limit = as_criterion(criterion)
    _same_length(k=values, k_low=low, k_high=high)
    _require(k_low, low, low <= values, "k_low", "the low end of the interval, k_low ≤ k")
    _require(k_high, high, high >= values, "k_high", "the high end of the interval, k_high ≥ k")
    if limit.kind == "maximum":
        meets, fails = high <= limit, low > limit
    else:
        meets, fails = low >= limit, high < limit
    verdict = np.where(meets, MEETS, np.where(fails, DOES_NOT_MEET, NOT_CONCLUSIVE))
    return _like(verdict.astype(object), k, k_low, k_high)
