"""Public faces that import their modules on first use (PEP 562).

Each subpackage's ``__init__`` is its public face. Importing every module of a subpackage
whenever one name of it is used would bring in scipy, pint and plotly before the command
line has even read its options; a face instead maps each public name to the module that
defines it and imports that module when the name is first looked up.
"""

from __future__ import annotations

import sys
from collections.abc import Callable, Mapping
from importlib import import_module

__all__ = ["lazy_face"]


def lazy_face(
    package: str, names: Mapping[str, str]
) -> tuple[Callable[[str], object], Callable[[], list[str]]]:
    """The module ``__getattr__`` and ``__dir__`` of the face of ``package``.

    ``names`` maps each public name to the module of ``package`` that defines it (its name
    without the package). The first look-up of a name imports its module and keeps the
    value on the face, so that later look-ups are plain attribute reads; a name not in
    ``names`` raises ``AttributeError`` naming the face.

    >>> import kitchen.fits
    >>> kitchen.fits.no_such_name
    Traceback (most recent call last):
    ...
    AttributeError: module 'kitchen.fits' has no attribute 'no_such_name'
    """
    face = sys.modules[package]

    def __getattr__(name: str) -> object:
        try:
            module = names[name]
        except KeyError:
            raise AttributeError(f"module {package!r} has no attribute {name!r}") from None
        value = getattr(import_module(f".{module}", package), name)
        setattr(face, name, value)
        return value

    def __dir__() -> list[str]:
        return sorted(set(vars(face)) | set(names))

    return __getattr__, __dir__
