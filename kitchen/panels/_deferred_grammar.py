"""The URI grammar jsonschema loads, built when it is first used instead of at import.

The first live figure of a kernel imports plotly's renderers, which import nbformat, which
imports jsonschema; jsonschema imports ``rfc3987_syntax`` for its optional ``iri`` format
check, and that module compiles a few dozen grammars when imported: about 2 s on a quiet
machine, most of a panel cell's time in a fresh kernel, for a check no panel makes.
:func:`defer_iri_grammar` puts a stand-in for the module in ``sys.modules`` that imports
the real one the first time anything of it is used, so the check works as before (the same
answers: ``tests/panels/test_deferred_grammar.py``) and costs its time only if it is made.
"""

from __future__ import annotations

import importlib
import importlib.util
import sys
import types

__all__ = ["GRAMMAR_MODULE", "defer_iri_grammar"]

GRAMMAR_MODULE = "rfc3987_syntax"
"""The module whose import is deferred."""


def defer_iri_grammar() -> bool:
    """Defer the import of the URI grammar module until it is first used.

    Does nothing when the module or jsonschema is already imported, or the module is not
    installed. Returns whether the stand-in was put in place.
    """
    if GRAMMAR_MODULE in sys.modules or "jsonschema" in sys.modules:
        return False
    try:
        if importlib.util.find_spec(GRAMMAR_MODULE) is None:
            return False
    except (ImportError, ValueError):
        return False
    stand_in = types.ModuleType(
        GRAMMAR_MODULE, f"Stand-in for {GRAMMAR_MODULE}, imported on first use (kitchen.panels)."
    )

    def real() -> types.ModuleType:
        if sys.modules.get(GRAMMAR_MODULE) is stand_in:
            del sys.modules[GRAMMAR_MODULE]
        return importlib.import_module(GRAMMAR_MODULE)

    def is_valid_syntax(*args, **kwargs):
        return real().is_valid_syntax(*args, **kwargs)

    def attribute(name: str):
        if name.startswith("__"):  # asked by the import system itself (``__path__``)
            raise AttributeError(name)
        return getattr(real(), name)

    stand_in.is_valid_syntax = is_valid_syntax
    stand_in.__getattr__ = attribute
    sys.modules[GRAMMAR_MODULE] = stand_in
    return True
