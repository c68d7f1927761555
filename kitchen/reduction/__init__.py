"""The test reductions: each specimen's tests reduced to k at the reference temperature.

A constant-head test gives k = Q·L/(A·h·t) for each timed collection, and per specimen
from the Darcy velocity against the gradient of all of them. A falling-head record gives
k from the slope of ln h on the reference-equivalent time over a reading window (the
window the engineer chose, or the one the tool proposes), with a rising tailwater or, where
the tailwater datum is uncertain, the three-parameter decay instead. Each reduction comes
with its 95 % interval, its fit diagnostics and the verdicts of :mod:`kitchen.validity`,
and the results table gathers one row per specimen and test method.

Modules, in the data's order:

- :mod:`.constant_head_collections`: each collection's k, gradient and Darcy velocity.
- :mod:`.constant_head`: a specimen's constant-head reduction, with its interval and verdicts.
- :mod:`.falling_head_formulas`: the falling-head equations in closed form, two-reading k.
- :mod:`.falling_head_record`: a specimen's readings prepared once; each window reduced to k.
- :mod:`.falling_head_evidence`: one window's :class:`FallingHeadAnalysis` and its evidence.
- :mod:`.falling_head`: the falling-head analysis of one specimen in one call.
- :mod:`.flexible_wall`: a flexible-wall test: the specimen's dimensions after
  consolidation, B = Δu/Δσ3, the effective stresses across it, their criteria.
- :mod:`.test_record`: the flow through a specimen over its test: pore volumes of flow, k
  and outflow/inflow against time.
- :mod:`.results`: the results table, one row per specimen and method (SI, and exported).

The public face, which other subpackages import from :mod:`kitchen.reduction` and never
from its modules: :func:`collection_table`, :func:`constant_head_conductivity`,
:func:`hydraulic_gradient`, :func:`darcy_velocity`, :func:`reduce_constant_head`
(:class:`ConstantHeadResult`) and :func:`constant_head_analysis`
(:class:`ConstantHeadAnalysis`); :func:`falling_head_conductivity`,
:func:`effective_standpipe_area`, :func:`rising_tailwater_conductivity`,
:func:`reference_elapsed_time`, :func:`jurin_capillary_rise`,
:func:`incremental_conductivity` and :func:`reading_window`; :class:`FallingHeadRecord`,
:class:`FallingHeadAnalysis` and :func:`falling_head_analysis`; :func:`series_results`,
:func:`results_table` and :func:`result_row`; the flexible-wall test:
:func:`consolidated_dimensions` (:class:`PermeationDimensions`), :func:`permeation_state`,
:func:`b_value`, :func:`effective_stresses` (:class:`EffectiveStresses`),
:func:`saturation_verdict`, :func:`flexible_wall_verdicts` and :func:`condition_result`;
the flow over a test, in pore volumes: :class:`FlowRecord`, :func:`falling_head_flow`,
:func:`constant_head_flow`, :func:`spans_conductivity`.

References
----------
ASTM D2434, Standard Test Method for Permeability of Granular Soils (Constant Head):
k = Q·L/(A·h·t) (from memory for the clause).
ASTM D5084, Methods A (constant head), B (falling head, constant tailwater) and C (falling
head, rising tailwater), calculation section and termination criteria (from memory for the
clauses). ASTM D5856 and ISO 17892-11 (constant-head and falling-head tests).
Das, B. M. and Sobhan, K., *Principles of Geotechnical Engineering*, chapter on
permeability: k = Q·L/(A·h·t), k = (a·L/(A·t))·ln(h1/h2), Darcy's law v = k·i.
Head, K. H., *Manual of Soil Laboratory Testing*, Vol. 2, permeability tests: capillary
rise in standpipes (from memory).
Golub, G. H. & Pereyra, V. (1973), for the separable decay fit of :mod:`kitchen.fits`.
JCGM 100:2008 (GUM), for the interval of :mod:`kitchen.uncertainty`.
"""

from kitchen import _lazy

__getattr__, __dir__ = _lazy.lazy_face(
    __name__,
    {
        "ConstantHeadAnalysis": "constant_head",
        "ConstantHeadResult": "constant_head",
        "constant_head_analysis": "constant_head",
        "reduce_constant_head": "constant_head",
        "collection_table": "constant_head_collections",
        "constant_head_conductivity": "constant_head_collections",
        "darcy_velocity": "constant_head_collections",
        "hydraulic_gradient": "constant_head_collections",
        "falling_head_analysis": "falling_head",
        "FallingHeadAnalysis": "falling_head_evidence",
        "effective_standpipe_area": "falling_head_formulas",
        "falling_head_conductivity": "falling_head_formulas",
        "incremental_conductivity": "falling_head_formulas",
        "jurin_capillary_rise": "falling_head_formulas",
        "reading_window": "falling_head_formulas",
        "reference_elapsed_time": "falling_head_formulas",
        "rising_tailwater_conductivity": "falling_head_formulas",
        "FallingHeadRecord": "falling_head_record",
        "EffectiveStresses": "flexible_wall",
        "PermeationDimensions": "flexible_wall",
        "b_value": "flexible_wall",
        "condition_result": "flexible_wall",
        "consolidated_dimensions": "flexible_wall",
        "effective_stresses": "flexible_wall",
        "flexible_wall_verdicts": "flexible_wall",
        "permeation_state": "flexible_wall",
        "saturation_verdict": "flexible_wall",
        "FlowRecord": "test_record",
        "constant_head_flow": "test_record",
        "falling_head_flow": "test_record",
        "spans_conductivity": "test_record",
        "result_row": "results",
        "results_table": "results",
        "series_results": "results",
    },
)

__all__ = [
    "collection_table",
    "constant_head_analysis",
    "constant_head_conductivity",
    "ConstantHeadAnalysis",
    "ConstantHeadResult",
    "darcy_velocity",
    "effective_standpipe_area",
    "falling_head_analysis",
    "falling_head_conductivity",
    "FallingHeadAnalysis",
    "FallingHeadRecord",
    "EffectiveStresses",
    "PermeationDimensions",
    "b_value",
    "condition_result",
    "consolidated_dimensions",
    "effective_stresses",
    "flexible_wall_verdicts",
    "permeation_state",
    "saturation_verdict",
    "FlowRecord",
    "constant_head_flow",
    "falling_head_flow",
    "spans_conductivity",
    "hydraulic_gradient",
    "incremental_conductivity",
    "jurin_capillary_rise",
    "reading_window",
    "reduce_constant_head",
    "reference_elapsed_time",
    "result_row",
    "results_table",
    "rising_tailwater_conductivity",
    "series_results",
]
