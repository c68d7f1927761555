"""The subpackages' public faces import their modules on first use."""

import importlib
import subprocess
import sys
import types

import pytest

FACES = (
    "analysis",
    "charts",
    "fits",
    "io",
    "memo",
    "panels",
    "reduction",
    "revisions",
    "uncertainty",
    "validity",
    "workspace",
)


@pytest.mark.parametrize("name", FACES)
def test_a_face_hands_on_exactly_its_public_names(name):
    face = importlib.import_module(f"kitchen.{name}")
    for public in face.__all__:
        assert getattr(face, public) is not None
        assert public in dir(face)
    listed = {
        entry
        for entry in dir(face)
        if not entry.startswith("_") and not isinstance(getattr(face, entry), types.ModuleType)
    }
    assert listed == set(face.__all__)


@pytest.mark.parametrize("name", FACES)
def test_an_unknown_name_is_refused_naming_the_face(name):
    face = importlib.import_module(f"kitchen.{name}")
    with pytest.raises(AttributeError, match=f"module 'kitchen.{name}' has no attribute 'nope'"):
        face.nope  # noqa: B018 - the look-up is what is tested


def test_a_name_from_the_face_is_the_module_s_own():
    from kitchen.fits import fit_line
    from kitchen.fits.line import fit_line as defined

    assert fit_line is defined


def test_the_command_line_starts_without_the_heavy_libraries():
    heavy = ("scipy.stats", "scipy.optimize", "scipy.spatial", "pint", "iapws", "plotly")
    script = f"import sys, kitchen.cli; print(' '.join(m for m in {heavy!r} if m in sys.modules))"
    loaded = subprocess.run(
        [sys.executable, "-c", script], capture_output=True, text=True, check=True
    ).stdout.split()
    assert loaded == []
