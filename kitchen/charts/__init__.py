"""Figures for the series memo: plain plotly figures, drawn the same way in notebook and print.

Every builder returns a new :class:`plotly.graph_objects.Figure` and leaves its inputs
alone. Axis titles carry their units; the conductivity and density units are options
(:mod:`kitchen.display_units`). The look is the memo style of this package: a serif face,
a dark ink, and four verdict colours that are never the only cue — compactive effort is
told by marker shape and line dash, the verdict by marker fill — so a chart still reads in
greyscale print. The compaction chart and the falling-head chart also come as plain-dict
specs (``*_spec``) that a live figure is brought to without validating the whole figure
again. The core never imports plotly; this subpackage sits on top of it.

Modules:

- :mod:`.style`: the memo style (template, colours, markers, dashes), decimation, captions.
- :mod:`._series_parts`: the markers, hover texts, criterion line and k axis they share.
- :mod:`.compaction`: the compaction plane above log k against molding water content.
- :mod:`.conductivity_trend`: log k against void ratio, dry density or w − w_opt.
- :mod:`.specimen`: one specimen's charts: the falling-head record, the constant-head test.
- :mod:`.test_record`: one test over its course: k against time and pore volumes of flow,
  outflow/inflow against time.
- :mod:`.field_tests`: the field tests over the zone, and their distance from it by date.

The public face, which other subpackages import from :mod:`kitchen.charts` and never from
its modules: :func:`compaction_conductivity_figure`, :func:`compaction_conductivity_spec`,
:func:`conductivity_trend_figure`, :func:`falling_head_figure`, :func:`falling_head_spec`
and :func:`constant_head_figure`, :func:`flow_record_figure` (the figures);
:func:`field_plane_figure`,
:func:`field_distance_figure` and :data:`FIELD_FILLS` (the field check's); :func:`memo_template`,
:func:`decimation_indices`, :class:`WindowDecimation`, :func:`add_caption`, :func:`captioned_dict`,
:func:`label_specimens`, :data:`MAX_TRACE_POINTS`, :data:`WIDTH`, :data:`HEIGHT`,
:data:`PLOT_WIDTH`, :func:`cached_memo_template`, :data:`FONT`, :data:`INK`,
:data:`MUTED`, :data:`GRID`, :data:`ZONE`,
:data:`VERDICT_COLOURS`, :data:`VERDICT_FACE`, :data:`VERDICT_FILL`, :data:`EFFORT_SYMBOLS`,
:data:`EFFORT_DASHES`, :data:`NO_EFFORT`, :data:`SATURATION_DASHES`, :data:`OPTIMUM_DASH`,
:data:`DRAWN_ZONE_DASH`, :data:`FITTED_ZONE_DASH`, :data:`CRITERION_DASH` and
:data:`LINE_CODES` (the style).

References
----------
Daniel, D. E. and Benson, C. H. (1990), J. Geotech. Eng. 116(12), 1811–1830: the
acceptable zone drawn on the compaction plane from the specimens that meet the criterion.
Tavenas, F. et al. (1983), Can. Geotech. J. 20(4), 645–660 (e–log k); Chapuis, R. P.
(2004), Can. Geotech. J. 41(5), 787–795; Hazen (1892) and Kozeny–Carman as in
:mod:`kitchen.analysis`.
ASTM D5084, Methods B and C: ln h falls linearly with time (from memory).
Darcy's law v = k·i; ASTM D2434 (establish the laminar range, from memory).
"""

from kitchen import _lazy

__getattr__, __dir__ = _lazy.lazy_face(
    __name__,
    {
        "compaction_conductivity_figure": "compaction",
        "compaction_conductivity_spec": "compaction",
        "conductivity_trend_figure": "conductivity_trend",
        "constant_head_figure": "specimen",
        "FIELD_FILLS": "field_tests",
        "field_distance_figure": "field_tests",
        "field_plane_figure": "field_tests",
        "falling_head_figure": "specimen",
        "falling_head_spec": "specimen",
        "flow_record_figure": "test_record",
        "EFFORT_DASHES": "style",
        "EFFORT_SYMBOLS": "style",
        "FONT": "style",
        "GRID": "style",
        "HEIGHT": "style",
        "INK": "style",
        "MAX_TRACE_POINTS": "style",
        "MUTED": "style",
        "NO_EFFORT": "style",
        "SATURATION_DASHES": "style",
        "OPTIMUM_DASH": "style",
        "DRAWN_ZONE_DASH": "style",
        "FITTED_ZONE_DASH": "style",
        "CRITERION_DASH": "style",
        "LINE_CODES": "style",
        "VERDICT_COLOURS": "style",
        "VERDICT_FACE": "style",
        "VERDICT_FILL": "style",
        "WIDTH": "style",
        "PLOT_WIDTH": "style",
        "WindowDecimation": "style",
        "ZONE": "style",
        "add_caption": "style",
        "captioned_dict": "style",
        "label_specimens": "style",
        "decimation_indices": "style",
        "memo_template": "style",
        "cached_memo_template": "style",
    },
)

__all__ = [
    "flow_record_figure",
    "add_caption",
    "captioned_dict",
    "label_specimens",
    "compaction_conductivity_figure",
    "compaction_conductivity_spec",
    "conductivity_trend_figure",
    "constant_head_figure",
    "decimation_indices",
    "EFFORT_DASHES",
    "EFFORT_SYMBOLS",
    "falling_head_figure",
    "FIELD_FILLS",
    "field_distance_figure",
    "field_plane_figure",
    "falling_head_spec",
    "FONT",
    "GRID",
    "HEIGHT",
    "INK",
    "MAX_TRACE_POINTS",
    "memo_template",
    "cached_memo_template",
    "MUTED",
    "NO_EFFORT",
    "SATURATION_DASHES",
    "OPTIMUM_DASH",
    "DRAWN_ZONE_DASH",
    "FITTED_ZONE_DASH",
    "CRITERION_DASH",
    "LINE_CODES",
    "VERDICT_COLOURS",
    "VERDICT_FACE",
    "VERDICT_FILL",
    "WIDTH",
    "PLOT_WIDTH",
    "WindowDecimation",
    "ZONE",
]
