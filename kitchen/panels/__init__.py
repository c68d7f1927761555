"""Widget panels for the notebooks, one factory per notebook, built on the core.

Each factory returns an object exposing its controls, figures and views, so that a test can
set a control's ``value`` and assert on the figure data and the results without a browser:

- :func:`series_panel` (``01_open_a_series``): load a series, see its results and checks.
- :func:`falling_head_panel` (``02_falling_head``): the reading window of one specimen.
- :func:`constant_head_panel` (``03_constant_head``): v against i for one specimen.
- :func:`series_chart_panel` (``04_series_chart``): the series charts and the memo pack.
- :func:`revise_panel` (``05_revise``): revise a value, see what moved.
- :func:`record_panel` (``06_test_record``): one test's report items, stated or marked
  "not recorded", and its course: k against time and pore volumes, outflow/inflow.
- :func:`field_checks_panel` (``07_field_checks``): field tests judged against the zone.

:func:`workbook_panel` puts a series chooser above any of them (no code to edit): the
series opened is remembered for the other notebooks, and a sample is worked on in a
working copy (:func:`working_copy`), never where it lies.
:func:`scratch_copy` copies a series to a scratch folder, to try revisions on.
The panels need the ``lab`` extra (ipywidgets, plotly, anywidget); the core does not.
Importing the panels defers the URI grammar jsonschema would build when the first live
figure of a kernel is drawn (:mod:`._deferred_grammar`): about 2 s of a fresh kernel's
first panel.
"""

from kitchen import _lazy

from . import _deferred_grammar

_deferred_grammar.defer_iri_grammar()

__getattr__, __dir__ = _lazy.lazy_face(
    __name__,
    {
        "scratch_copy": "common",
        "ConstantHeadPanel": "constant_head",
        "constant_head_panel": "constant_head",
        "FallingHeadPanel": "falling_head",
        "FieldChecksPanel": "field_checks",
        "field_checks_panel": "field_checks",
        "falling_head_panel": "falling_head",
        "SeriesPanel": "open_series",
        "series_panel": "open_series",
        "RevisePanel": "revise",
        "revise_panel": "revise",
        "SeriesChartPanel": "series_chart",
        "SeriesChooser": "series_choice",
        "WorkbookPanel": "series_choice",
        "forget_series": "series_choice",
        "remember_series": "series_choice",
        "remembered_series": "series_choice",
        "series_chooser": "series_choice",
        "workbook_panel": "series_choice",
        "working_copy": "series_choice",
        "working_folder": "series_choice",
        "series_chart_panel": "series_chart",
        "RecordPanel": "test_record",
        "record_panel": "test_record",
    },
)

__all__ = [
    "RecordPanel",
    "record_panel",
    "ConstantHeadPanel",
    "FallingHeadPanel",
    "FieldChecksPanel",
    "RevisePanel",
    "SeriesChartPanel",
    "SeriesChooser",
    "SeriesPanel",
    "WorkbookPanel",
    "constant_head_panel",
    "falling_head_panel",
    "field_checks_panel",
    "forget_series",
    "remember_series",
    "remembered_series",
    "revise_panel",
    "scratch_copy",
    "series_chart_panel",
    "series_chooser",
    "series_panel",
    "workbook_panel",
    "working_copy",
    "working_folder",
]
