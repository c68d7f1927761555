"""Water at laboratory temperatures: density, viscosity and the temperature ratio R_T.

Hydraulic conductivity depends on the permeant's viscosity; standards correct the
conductivity measured at the test temperature T to a reference temperature (20 °C in
ASTM D5084, D5856 and D2434) with R_T = μ_T / μ_ref, so that k_ref = R_T · k_T. Where a
formula is used outside the temperatures over which it holds,
:func:`viscosity_range_caution` says so in words, for the checks of a result.
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np

__all__ = [
    "VISCOSITY_METHODS",
    "water_density",
    "water_viscosity",
    "viscosity_ratio",
    "d5084_ratio",
    "water_surface_tension",
    "D5084_AGREEMENT_RANGE",
    "D5084_TOLERANCE",
    "viscosity_range_caution",
]

VISCOSITY_20C = 1.0016e-3
"""Viscosity of water at 20 °C and 0.1 MPa, IAPWS 2008 (Huber et al. 2009). [Pa s]"""

_LIQUID_RANGE = (0.0, 100.0)


def _checked_temperature(temperature) -> np.ndarray:
    t = np.asarray(temperature, dtype=float)
    if np.isnan(t).any():
        raise ValueError("temperature is missing (NaN); give a test temperature in degC")
    low, high = _LIQUID_RANGE
    if ((t <= low) | (t >= high)).any():
        bad = t[(t <= low) | (t >= high)].ravel()[0]
        raise ValueError(
            f"temperature {bad:g} degC is outside liquid water at atmospheric pressure "
            f"({low:g} to {high:g} degC); check the unit of the temperature column"
        )
    return t


def _same_kind(value: np.ndarray, like):
    return float(value) if np.ndim(like) == 0 else value


def water_density(temperature):
    """Density of air-free water at 101.325 kPa.

    Parameters
    ----------
    temperature : float or array_like
        Water temperature. [degC]

    Returns
    -------
    float or numpy.ndarray
        Density. [kg/m3]

    Notes
    -----
    The formula is fitted over 0 to 40 °C; outside that it is an extrapolation.

    References
    ----------
    Tanaka, M., Girard, G., Davis, R., Peuto, A. and Bignell, N. (2001). Recommended table
    for the density of water between 0 °C and 40 °C based on recent experimental reports.
    Metrologia 38(4), 301-309, Eq. 1 (coefficients from memory; checked in the tests
    against IAPWS-95 through the ``iapws`` package).

    Examples
    --------
    >>> round(water_density(20.0), 2)
    998.21
    """
    t = _checked_temperature(temperature)
    a1, a2, a3, a4, a5 = -3.983035, 301.797, 522528.9, 69.34881, 999.974950
    rho = a5 * (1.0 - (t + a1) ** 2 * (t + a2) / (a3 * (t + a4)))
    return _same_kind(rho, temperature)


def _kestin(t: np.ndarray) -> np.ndarray:
    d = 20.0 - t
    # d * d * d, not d**3: numpy's float power of 3 costs ~50 ns a value (a logger record
    # of 10^6 readings: 50 ms); the product differs by at most a rounding unit, which the
    # sum with 1.2378 almost always absorbs (measured: no change in 10^6 temperatures
    # within ±1 °C of 20 °C, one value in 10^5 by one rounding unit over 0-60 °C)
    log_ratio = d / (t + 96.0) * (1.2378 - 1.303e-3 * d + 3.06e-6 * d**2 + 2.55e-8 * (d * d * d))
    return VISCOSITY_20C * 10.0**log_ratio


def _iapws(t: np.ndarray) -> np.ndarray:
    try:
        from iapws import IAPWS95  # noqa: F401 - import checks availability
        from iapws._iapws import _Viscosity
        from iapws.iapws95 import IAPWS95 as _State
    except ImportError as error:  # pragma: no cover - iapws is a declared dependency
        raise ImportError("the 'iapws' viscosity method needs the iapws package") from error
    unique, inverse = np.unique(np.round(t, 4), return_inverse=True)
    values = np.empty(unique.shape)
    for index, temp in enumerate(unique):
        state = _State(T=temp + 273.15, P=0.101325)
        values[index] = _Viscosity(state.rho, temp + 273.15)
    return values[inverse].reshape(t.shape)


def water_viscosity(temperature, method: str = "kestin"):
    """Dynamic viscosity of liquid water at atmospheric pressure.

    Parameters
    ----------
    temperature : float or array_like
        Water temperature. [degC]
    method : {"kestin", "iapws"}
        ``"kestin"`` (default): the closed form of Kestin, Sokolov & Wakeham (1978),
        scaled to μ20 = 1.0016 mPa·s; within 0.1 % of IAPWS 2008 over 1–40 °C (measured in the
        tests).
        ``"iapws"``: IAPWS 2008 (Huber et al. 2009) evaluated by the ``iapws`` package with
        the IAPWS-95 density; slower (pure Python, once per distinct temperature).

    Returns
    -------
    float or numpy.ndarray
        Viscosity. [Pa s]

    References
    ----------
    Kestin, J., Sokolov, M. and Wakeham, W. A. (1978). Viscosity of liquid water in the
    range −8 °C to 150 °C. J. Phys. Chem. Ref. Data 7(3), 941-948 (correlation for the
    ratio μ_T/μ_20; coefficients from memory, checked in the tests against IAPWS 2008).
    Huber, M. L. et al. (2009). New international formulation for the viscosity of H2O.
    J. Phys. Chem. Ref. Data 38(2), 101-125.

    Examples
    --------
    >>> round(water_viscosity(20.0) * 1e3, 4)
    1.0016
    """
    t = _checked_temperature(temperature)
    if method == "kestin":
        values = _kestin(t)
    elif method == "iapws":
        values = _iapws(t)
    else:
        raise ValueError(f"unknown viscosity method {method!r}; choose 'kestin' or 'iapws'")
    return _same_kind(values, temperature)


def d5084_ratio(temperature):
    """The ASTM D5084 correction factor R_T to 20 °C.

    Parameters
    ----------
    temperature : float or array_like
        Test temperature. [degC]

    Returns
    -------
    float or numpy.ndarray
        R_T = 2.2902 · 0.9842^T / T^0.1702, the ratio μ_T/μ_20 as the standard
        approximates it. [-]

    Notes
    -----
    The standard's fit equals 1.0003 at 20 °C, not exactly 1; :func:`viscosity_ratio` with
    ``method="d5084"`` divides by its value at the reference temperature so the ratio is 1
    there. Against IAPWS 2008, as a ratio to 20 °C (measured in the tests): within about
    0.15 % over 15–30 °C, and within :data:`D5084_TOLERANCE` (0.5 %) for any test and
    reference temperature in :data:`D5084_AGREEMENT_RANGE` (14–34 °C); +1.2 % at 10 °C, +6 %
    at 5 °C, +30 % at 1 °C. The range the standard fitted it over is recalled, not read
    (from memory: the laboratory range, roughly 15–30 °C); the range used for the caution
    (:func:`viscosity_range_caution`) is the measured one.

    References
    ----------
    ASTM D5084 (Standard Test Methods for Measurement of Hydraulic Conductivity of
    Saturated Porous Materials Using a Flexible Wall Permeameter), calculation section,
    equation for R_T (from memory; verify the clause against a licensed copy).
    """
    t = _checked_temperature(temperature)
    return _same_kind(2.2902 * 0.9842**t / t**0.1702, temperature)


def water_surface_tension(temperature):
    """Surface tension of water against air.

    Parameters
    ----------
    temperature : float or array_like
        Water temperature. [degC]

    Returns
    -------
    float or numpy.ndarray
        σ = B·τ^μ·(1 + b·τ), τ = 1 − T/Tc, B = 235.8 mN/m, b = −0.625, μ = 1.256,
        Tc = 647.096 K. [N/m]

    References
    ----------
    IAPWS R1-76(2014), Revised Release on Surface Tension of Ordinary Water Substance
    (coefficients from memory; 72.74 mN/m at 20 °C).

    Examples
    --------
    >>> round(water_surface_tension(20.0) * 1e3, 2)
    72.74
    """
    t = np.asarray(temperature, dtype=float)
    tau = 1.0 - (t + 273.15) / 647.096
    sigma = 235.8e-3 * tau**1.256 * (1.0 - 0.625 * tau)
    return float(sigma) if sigma.ndim == 0 else sigma


D5084_TOLERANCE = 0.005
"""How far the ASTM D5084 ratio may depart from IAPWS 2008 before a result says so. [-]"""

D5084_AGREEMENT_RANGE = (14.0, 34.0)
"""Temperatures between which the ASTM D5084 R_T equation, as a ratio of any test
temperature to any reference temperature in the range, agrees with IAPWS 2008 within
:data:`D5084_TOLERANCE`: the widest range of whole degrees that does, measured against the
``iapws`` package in the tests. [degC]"""


def viscosity_range_caution(
    temperature, reference_temperature: float = 20.0, method: str = "kestin"
) -> str:
    """A caution in words where the viscosity method is used outside the range it holds in.

    Parameters
    ----------
    temperature : float or array_like
        The test temperature (a result's mean temperature, or its readings' temperatures);
        NaN values are ignored. [degC]
    reference_temperature : float, default 20.0
        The temperature k is corrected to. [degC]
    method : {"kestin", "iapws", "d5084"}
        The viscosity method (:func:`viscosity_ratio`).

    Returns
    -------
    str
        "" when the method holds at every temperature given and at the reference: always
        for ``"iapws"`` (the reference formulation) and ``"kestin"`` (its published range,
        −8 to 150 °C, covers liquid water at atmospheric pressure; within 0.1 % of IAPWS
        2008 over 1–40 °C, measured in the tests). For ``"d5084"``, a sentence when a
        temperature lies outside :data:`D5084_AGREEMENT_RANGE`, with the largest departure
        of its ratio from that of IAPWS 2008 (:func:`water_viscosity` with ``"iapws"``,
        evaluated only then).

    References
    ----------
    ASTM D5084, the R_T equation (from memory), and Huber, M. L. et al. (2009), J. Phys.
    Chem. Ref. Data 38(2), 101-125 (IAPWS 2008), as in :func:`d5084_ratio`; Kestin, Sokolov
    & Wakeham (1978), J. Phys. Chem. Ref. Data 7(3), 941-948 (published range −8 to 150 °C,
    from memory).

    Examples
    --------
    >>> viscosity_range_caution(21.3, method="d5084")
    ''
    >>> caution = viscosity_range_caution(5.0, method="d5084")
    >>> caution.split("; ")[1].split(",")[0]
    'here its R_T departs from IAPWS 2008 by +6.1 %'
    """
    _viscosity_method(method)
    t = np.asarray(temperature, dtype=float).ravel()
    t = t[np.isfinite(t)]
    if method != "d5084" or t.size == 0:  # no temperature: k is not corrected at all
        return ""
    reference = float(reference_temperature)
    low, high = D5084_AGREEMENT_RANGE
    used = np.append(t, reference)
    beyond = np.maximum(low - used, used - high)
    if not (beyond > 0).any():
        return ""
    farthest = int(np.argmax(beyond))
    where = "the reference temperature" if farthest == t.size else "the test temperature"
    exact = viscosity_ratio(t, reference, "iapws")  # only here, once outside the range
    ratio = np.asarray(viscosity_ratio(t, reference, "d5084") / exact).ravel()
    departure = float(ratio[np.argmax(np.abs(ratio - 1.0))] - 1.0)
    return (
        f"viscosity: the ASTM D5084 R_T equation is used at {used[farthest]:.1f} °C ({where}), "
        f"outside {low:g}–{high:g} °C where it agrees with IAPWS 2008 within "
        f"{100 * D5084_TOLERANCE:g} %; here its R_T departs from IAPWS 2008 by "
        f"{100 * departure:+.1f} %, and so does k at the reference temperature. Use the "
        "'kestin' or 'iapws' viscosity, or test nearer the reference temperature"
    )


VISCOSITY_METHODS: dict[str, Callable] = {
    "kestin": lambda t: water_viscosity(t, "kestin"),
    "iapws": lambda t: water_viscosity(t, "iapws"),
    "d5084": d5084_ratio,
}
"""Names accepted by :func:`viscosity_ratio` (and the command line's ``--viscosity``)."""


def _viscosity_method(method: str) -> Callable:
    """The viscosity function of a method's name; an unknown name is refused, naming the choices."""
    if method not in VISCOSITY_METHODS:
        names = ", ".join(VISCOSITY_METHODS)
        raise ValueError(f"unknown viscosity method {method!r}; choose one of {names}")
    return VISCOSITY_METHODS[method]


def viscosity_ratio(temperature, reference_temperature: float = 20.0, method: str = "kestin"):
    """Temperature ratio R_T = μ_T / μ_ref that corrects k_T to the reference temperature.

    Parameters
    ----------
    temperature : float or array_like
        Test temperature. [degC]
    reference_temperature : float, optional
        Temperature the conductivity is reported at; 20 °C in ASTM D5084, D5856 and D2434.
        [degC]
    method : {"kestin", "iapws", "d5084"}
        Viscosity formulation; see :func:`water_viscosity` and :func:`d5084_ratio`.

    Returns
    -------
    float or numpy.ndarray
        R_T, so that k_ref = R_T · k_T. [-]

    References
    ----------
    ASTM D5084, D5856 and D2434: correction of k to 20 °C by the ratio of viscosities
    (from memory for the clause numbers).

    Examples
    --------
    >>> viscosity_ratio(20.0)
    1.0
    """
    function = _viscosity_method(method)
    at_test = np.asarray(function(np.asarray(temperature, dtype=float)), dtype=float)
    at_reference = float(function(float(reference_temperature)))
    ratio = at_test / at_reference
    if np.ndim(temperature) == 0:
        return float(ratio)
    return np.where(np.asarray(temperature, dtype=float) == reference_temperature, 1.0, ratio)
