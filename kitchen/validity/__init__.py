"""Is the test valid: termination criteria, fit diagnostics, and their verdicts in words.

Each reduction is judged before its k is used. The criteria follow ASTM D5084's
termination criteria (from memory, high confidence): at least four consecutive k values
within ±25 % of their mean (±50 % below 1×10⁻¹⁰ m/s), no significant trend, outflow/inflow
between 0.75 and 1.25 where both are measured; the hydraulic gradient against the
standard's recommended maximum for the measured k; the Reynolds number on d10 below 1 for
Darcy's law to hold (Bear 1972); k independent of the gradient in a constant-head test;
and the datum of a decay fit against the datum read. Every limit is a field of
:class:`Criteria`, with the standard's value as default, so that a project specification
with other limits can be followed; each check returns a :class:`Verdict` in words. The
standard gives no numeric test for a trend: the tests here are the tool's own, and every
sentence that uses one says so. For a falling-head record the tool also proposes a reading
window, the longest ending at the last reading that meets every criterion.

Modules:

- :mod:`.criteria`: the limits (:class:`Criteria`), the D5084 gradient table, :class:`Verdict`.
- :mod:`.checks`: steady values, trend, outflow/inflow, gradient, Reynolds number, datum.
- :mod:`.window_proposal`: the trend of every trial window at once, and the window proposed.

The public face, which other subpackages import from :mod:`kitchen.validity` and never from
its modules: :class:`Criteria`, :class:`Verdict`, :data:`GRADIENT_TABLE` and
:func:`recommended_maximum_gradient`, :func:`percent_text` (a fraction in words);
:func:`steady_values_check`, :func:`trend_check`,
:func:`flow_ratio_check`, :func:`gradient_check`, :func:`reynolds_number`,
:func:`reynolds_check`, :func:`datum_check`, :func:`gradient_independence_check` and
:func:`is_valid`; :func:`window_trends` (:class:`WindowTrends`) and :func:`propose_window`
(:class:`WindowProposal`). The curvature and runs tests the trend criterion uses are in
:mod:`kitchen.fits`.

References
----------
ASTM D5084, Standard Test Methods for Measurement of Hydraulic Conductivity of Saturated
Porous Materials Using a Flexible Wall Permeameter: termination criteria and the table of
recommended maximum hydraulic gradients (from memory for the clauses and the table).
Bear, J. (1972). *Dynamics of Fluids in Porous Media*, Elsevier, §5.11 (Darcy's law holds
for a Reynolds number on a grain diameter below about 1). From memory.
Draper, N. R. & Smith, H. *Applied Regression Analysis*, 3rd ed., ch. 2 (t-test of an
added regression term). From memory.
"""

from kitchen import _lazy

__getattr__, __dir__ = _lazy.lazy_face(
    __name__,
    {
        "datum_check": "checks",
        "flow_ratio_check": "checks",
        "gradient_check": "checks",
        "gradient_independence_check": "checks",
        "is_valid": "checks",
        "reynolds_check": "checks",
        "reynolds_number": "checks",
        "steady_values_check": "checks",
        "trend_check": "checks",
        "GRADIENT_TABLE": "criteria",
        "Criteria": "criteria",
        "Verdict": "criteria",
        "percent_text": "criteria",
        "recommended_maximum_gradient": "criteria",
        "WindowProposal": "window_proposal",
        "WindowTrends": "window_proposal",
        "propose_window": "window_proposal",
        "window_trends": "window_proposal",
    },
)

__all__ = [
    "Criteria",
    "datum_check",
    "flow_ratio_check",
    "gradient_check",
    "gradient_independence_check",
    "GRADIENT_TABLE",
    "is_valid",
    "percent_text",
    "propose_window",
    "recommended_maximum_gradient",
    "reynolds_check",
    "reynolds_number",
    "steady_values_check",
    "trend_check",
    "Verdict",
    "window_trends",
    "WindowProposal",
    "WindowTrends",
]
