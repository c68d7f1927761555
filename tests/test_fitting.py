"""Tests for kitchen.fitting: every fit it offers is the one of the module that holds it.

The fits themselves are tested beside their modules: tests/test_line_fit.py,
tests/test_windowed_fit.py and tests/test_decay_fit.py.
"""

from kitchen import decay_fit, fitting, line_fit, windowed_fit


def test_each_name_is_the_object_of_its_home_module():
    # the project's own layout: kitchen.fitting gathers the fits of three modules
    homes = {
        "DecayFit": decay_fit,
        "fit_exponential_decay": decay_fit,
        "LinearFit": line_fit,
        "ProportionalFit": line_fit,
        "fit_line": line_fit,
        "fit_through_origin": line_fit,
        "WindowedLineFit": windowed_fit,
    }
    assert sorted(fitting.__all__) == sorted(homes)
    for name, home in homes.items():
        assert getattr(fitting, name) is getattr(home, name), name
