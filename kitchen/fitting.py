"""Least-squares fits shared by the test reductions, in one place to import them from.

Straight lines with Student-t intervals (:func:`fit_line`) and lines through the origin
(:func:`fit_through_origin`) live in :mod:`kitchen.line_fit`; line fits over moving windows
of one record in constant time per window (:class:`WindowedLineFit`) in
:mod:`kitchen.windowed_fit`; the three-parameter exponential decay of a head record
(:func:`fit_exponential_decay`) in :mod:`kitchen.decay_fit`. Every fit returns a small
frozen dataclass; each of those modules names its sources in its References. The input
checks they share are in :mod:`kitchen.fit_common`. Pure numpy/scipy.
"""

from .decay_fit import DecayFit, fit_exponential_decay
from .line_fit import LinearFit, ProportionalFit, fit_line, fit_through_origin
from .windowed_fit import WindowedLineFit

__all__ = [
    "DecayFit",
    "LinearFit",
    "ProportionalFit",
    "WindowedLineFit",
    "fit_exponential_decay",
    "fit_line",
    "fit_through_origin",
]
