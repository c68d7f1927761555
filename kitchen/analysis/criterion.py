"""The criterion on k from the project specification, and each specimen's verdict against it.

A :class:`Criterion` is a limit on the hydraulic conductivity that knows its direction: the
largest k allowed (a liner, a cut-off) or the smallest required (a drainage layer, a
filter). :func:`parse_criterion` reads one as a person types it (the notebook panels and
the command line). :func:`classify_against_criterion` compares each k and its interval with
it: meets, does not meet, or not conclusive where the interval straddles the limit. A test
that is not valid gets none of these: it is :data:`NOT_JUDGED` (see
:mod:`kitchen.analysis.result_selection`); where no criterion is given at all, a valid test
is :data:`NO_CRITERION`.
"""

from __future__ import annotations

import math
import re
from decimal import Decimal

import numpy as np

from kitchen.display_units import K_UNITS

from ._checks import conductivity_values, like_inputs, require_elements, require_same_length

__all__ = [
    "MEETS",
    "DOES_NOT_MEET",
    "NOT_CONCLUSIVE",
    "NOT_JUDGED",
    "NO_CRITERION",
    "CRITERION_KINDS",
    "Criterion",
    "as_criterion",
    "parse_criterion",
    "classify_against_criterion",
]


MEETS = "meets"
DOES_NOT_MEET = "does not meet"
NOT_CONCLUSIVE = "not conclusive"
NOT_JUDGED = "not judged (test not valid)"
"""The verdict of a test that failed a validity check and is not kept on record: its k is
not compared with the criterion, so it neither meets nor fails it (the tool's own rule)."""
NO_CRITERION = "no criterion given"
"""The verdict of a valid test when no criterion was given anywhere (not typed, and none in
the series' project table): its k is not compared with any limit, so it neither meets nor
fails one. A liner's limit is never assumed for a series that states none (the tool's own
rule)."""


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
    >>> c.symbol, c.bound, float(c) * 100
    ('≥', 'at least', 0.01)
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

    @property
    def bound(self) -> str:
        """The side of the limit that meets it, in words: ``at most`` for a maximum, ``at
        least`` for a minimum (for the acceptable zone: k at most, or at least, the limit)."""
        return "at most" if self.kind == "maximum" else "at least"


def as_criterion(value, kind: str | None = None) -> Criterion:
    """`value` as a :class:`Criterion`: a Criterion as it is (or with `kind`), a number as a
    limit of `kind` (default a maximum). The limit must be a positive conductivity.
    """
    if isinstance(value, Criterion) and kind is None:
        limit, kind = float(value), value.kind
    else:
        limit = conductivity_values(value, "maximum" if (kind or "maximum") == "maximum" else kind)
        if np.ndim(limit) != 0:
            raise ValueError(f"criterion: expected one criterion value in m/s; got {value!r:.60}")
        limit = float(limit)
    return Criterion(limit, kind or "maximum")


_CRITERION_TEXT = re.compile(
    r"^\s*(?:k\s*)?(?P<op><=|≤|>=|≥|max(?:imum)?|min(?:imum)?)?\s*"
    r"(?P<number>[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(?P<unit>\S*)\s*$",
    re.IGNORECASE,
)
_MINIMUM_WORDS = (">=", "≥", "min", "minimum")


def parse_criterion(text, kind: str | None = None, unit: str | None = None) -> Criterion:
    """A criterion as a person types it, in m/s with its direction.

    The one reading of a typed criterion, for the notebook panels and the command line:
    ``"1e-9 m/s"``, ``"≤ 1e-9 m/s"``, ``"k <= 1e-7 cm/s"`` or ``"max 1e-9 m/s"`` is a
    largest k allowed (a liner); ``"≥ 1e-4 m/s"``, ``">= 1e-2 cm/s"`` or ``"min 1e-4 m/s"``
    a smallest k required (a drainage layer).

    Parameters
    ----------
    text : str
        An optional ``k``, an optional direction (``≤``, ``<=``, ``max``, ``maximum``;
        ``≥``, ``>=``, ``min``, ``minimum``; in any case), a number and its unit, one of
        :data:`kitchen.display_units.K_UNITS` (``m/s``, ``cm/s``).
    kind : {"maximum", "minimum"}, optional
        The direction of a text that states none (the command line's ``--criterion-kind``);
        a text that states the other one is refused. Without it, a text that states no
        direction is a maximum.
    unit : {"m/s", "cm/s"}, optional
        The unit of a number typed without one (the command line's ``--criterion`` is in
        m/s). Without it the unit must be typed: ``1e-7`` alone could be m/s or cm/s.

    Returns
    -------
    Criterion
        A float in m/s with its ``kind``, ``"maximum"`` or ``"minimum"``.

    Raises
    ------
    ValueError
        Naming what was typed and what was expected.

    Examples
    --------
    >>> parse_criterion("1e-7 cm/s")
    Criterion(1e-09, 'maximum')
    >>> parse_criterion("1e-4", kind="minimum", unit="m/s")
    Criterion(0.0001, 'minimum')
    """
    if kind is not None and kind not in CRITERION_KINDS:
        raise ValueError(
            f"criterion kind {kind!r}: expected 'maximum' (largest k allowed) or "
            "'minimum' (smallest k required)"
        )
    match = _CRITERION_TEXT.match(str(text))
    if match is None:
        raise ValueError(
            f"criterion {text!r}: expected a number and its unit, for example 1e-9 m/s "
            "(largest k allowed) or ≥ 1e-4 m/s (smallest k required)"
        )
    typed = match.group("unit") or unit
    if typed not in K_UNITS:
        given = f"unit {typed!r}" if typed else "no unit"
        raise ValueError(
            f"criterion {text!r} has {given}; expected one of {', '.join(K_UNITS)}, "
            "for example 1e-9 m/s"
        )
    value = float(Decimal(match.group("number")) / Decimal(K_UNITS[typed].factor))
    if not (value > 0 and math.isfinite(value)):
        raise ValueError(f"criterion {text!r}: expected a positive, finite conductivity")
    op = (match.group("op") or "").lower()
    stated = ("minimum" if op in _MINIMUM_WORDS else "maximum") if op else None
    if stated is not None and kind is not None and stated != kind:
        raise ValueError(
            f"criterion {text!r} is a {Criterion(1.0, stated).words}, but its kind is given "
            f"as {kind!r}: expected the direction once, or the same in both"
        )
    return Criterion(value, stated or kind or "maximum")


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
    values = conductivity_values(k, "k")
    low, high = conductivity_values(k_low, "k_low"), conductivity_values(k_high, "k_high")
    if np.ndim(criterion) != 0:
        raise ValueError(f"maximum: expected one criterion value in m/s; got {criterion!r:.60}")
    limit = as_criterion(criterion)
    require_same_length(k=values, k_low=low, k_high=high)
    require_elements(k_low, low, low <= values, "k_low", "the low end of the interval, k_low ≤ k")
    require_elements(
        k_high, high, high >= values, "k_high", "the high end of the interval, k_high ≥ k"
    )
    if limit.kind == "maximum":
        meets, fails = high <= limit, low > limit
    else:
        meets, fails = low >= limit, high < limit
    verdict = np.where(meets, MEETS, np.where(fails, DOES_NOT_MEET, NOT_CONCLUSIVE))
    return like_inputs(verdict.astype(object), k, k_low, k_high)
