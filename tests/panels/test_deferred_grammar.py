"""The URI grammar jsonschema loads is built on first use, not by a kernel's first figure."""

import json
import subprocess
import sys

import pytest

from kitchen.panels._deferred_grammar import GRAMMAR_MODULE

pytest.importorskip(GRAMMAR_MODULE)

IRIS = ["http://example.com/ä", "https://example.org/a b", "http://[bad", "no scheme", "mailto:x@y"]


def _python(code: str) -> dict:
    done = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, check=True, timeout=300
    )
    return json.loads(done.stdout.splitlines()[-1])


def test_a_first_live_figure_does_not_build_the_grammar():
    shown = _python(
        "import json, sys; import kitchen.panels; import plotly.graph_objects as go; "
        "go.FigureWidget(); import jsonschema; "
        f"print(json.dumps({{'built': {GRAMMAR_MODULE + '.syntax_helpers'!r} in sys.modules, "
        "'jsonschema': 'jsonschema' in sys.modules}))"
    )
    assert shown == {"built": False, "jsonschema": True}


def test_the_iri_check_answers_as_without_the_stand_in():
    check = (
        "import json, jsonschema; checker = jsonschema.FormatChecker(); "
        f"print(json.dumps([checker.conforms(text, 'iri') for text in {IRIS!r}]))"
    )
    deferred = _python("import kitchen.panels; " + check)
    plain = _python(check)
    assert deferred == plain
    assert True in plain and False in plain  # both answers occur: the check was made
