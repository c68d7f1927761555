"""The least-squares fits the reductions share: lines, windowed lines, the decay, curvature.

Every reduction rests on a regression: ln h on time for a falling-head record, Darcy
velocity on gradient through the origin for a constant-head test, the three-parameter
exponential decay where the tailwater datum is uncertain; the trend criterion tests the
fitted line for curvature. The fits take plain arrays, refuse what is not a finite number
with a ``ValueError`` that names it, and return small frozen dataclasses with Student-t
intervals. They know nothing of soils. Pure numpy/scipy.

Modules:

- :mod:`.line`: the straight line and the line through the origin, with Student-t intervals.
- :mod:`.windowed`: line fits over moving windows of one record, in constant time per window.
- :mod:`.decay`: the exponential decay of a head record, by separable least squares.
- :mod:`.curvature`: the t-test of an added quadratic term, and the runs test on residuals.
- :mod:`._common`: the input checks, blocked dot product and t quantile the fits share.

The public face, which other subpackages import from :mod:`kitchen.fits` and never from its
modules: :func:`fit_line` (:class:`LinearFit`), :func:`fit_through_origin`
(:class:`ProportionalFit`), :class:`WindowedLineFit`, :func:`fit_exponential_decay`
(:class:`DecayFit`), :func:`curvature_test` (:class:`CurvatureTest`), :func:`runs_test` and
:func:`sign_runs_test` (:class:`RunsTest`).

References
----------
Draper, N. R. & Smith, H. *Applied Regression Analysis*, 3rd ed., Wiley, 1998: ch. 1
(straight line: estimates, standard errors, t intervals, confidence band of the mean
response), ch. 2 (t-test of an added regression term), ch. 7 (runs test on residuals),
ch. 24 (nonlinear least squares, linearised covariance). From memory.
Montgomery, D. C. & Runger, G. C. *Applied Statistics and Probability for Engineers*,
ch. 11 (simple linear regression, regression through the origin). From memory.
Golub, G. H. & Pereyra, V. (1973). The differentiation of pseudo-inverses and nonlinear
least squares problems whose variables separate. SIAM J. Numer. Anal. 10(2), 413-432.
Ogita, T., Rump, S. M. & Oishi, S. (2005). Accurate sum and dot product. SIAM J. Sci.
Comput. 26(6), 1955-1988 (error-free TwoSum and TwoProduct). From memory.
Wald, A. & Wolfowitz, J. (1940). On a test whether two samples are from the same
population. Ann. Math. Statist. 11(2), 147-162 (number of runs, its mean and variance).
"""

from kitchen import _lazy

__getattr__, __dir__ = _lazy.lazy_face(
    __name__,
    {
        "CurvatureTest": "curvature",
        "RunsTest": "curvature",
        "curvature_test": "curvature",
        "runs_test": "curvature",
        "sign_runs_test": "curvature",
        "DecayFit": "decay",
        "fit_exponential_decay": "decay",
        "LinearFit": "line",
        "ProportionalFit": "line",
        "fit_line": "line",
        "fit_through_origin": "line",
        "WindowedLineFit": "windowed",
        "student_t_quantile": "_common",
    },
)

__all__ = [
    "curvature_test",
    "CurvatureTest",
    "DecayFit",
    "fit_exponential_decay",
    "fit_line",
    "fit_through_origin",
    "LinearFit",
    "ProportionalFit",
    "runs_test",
    "RunsTest",
    "sign_runs_test",
    "student_t_quantile",
    "WindowedLineFit",
]
