"""Construction checks: field tests of the built liner judged against the acceptable zone.

The memo's acceptable zone is the specification the earthwork is built to: each lift is
tested in the field for water content and density, and every test is to fall inside the
zone. This step reads the field tests (a table beside the series, units in brackets,
every problem named by file, row, column and test) and places each on the series'
compaction plane: inside the zone or not, its distance from the zone's edge in water
content and in dry density, its place against the line of optimums and the saturation
lines, and the k20 the fitted zone predicts there with its interval; per lift and
overall, the counts and shares; retests linked to the tests they replace. Nothing here
draws or writes: :mod:`kitchen.charts` draws, :mod:`kitchen.memo` writes the report.

Modules, in the data's order:

- :mod:`.records`: the field-tests table read and checked (:func:`read_field_tests`).
- :mod:`.outline`: a zone's outline (a union of polygons, not necessarily convex) and where
  a state lies against it.
- :mod:`.judgement`: the tests judged against a series' zone (:func:`check_field_tests`).

The public face: :data:`FIELD_TESTS`, :data:`DENSITY_AGREEMENT`, :class:`FieldTests`,
:class:`FieldTestsError`, :func:`dry_density_from_wet`, :func:`field_tests_path`,
:func:`read_field_tests`; :class:`ZoneOutline`, :func:`outline_of_acceptable_zone`,
:func:`outline_of_fitted_zone`; :data:`FIELD_METHODS`, :data:`INSIDE`, :data:`OUTSIDE`,
:data:`NO_ZONE`, :data:`SAME_LOCATION`, :data:`ZONES`, :class:`FieldCheck` and
:func:`check_field_tests`.

References
----------
Daniel, D. E. and Benson, C. H. (1990). Water content–density criteria for compacted soil
liners. Journal of Geotechnical Engineering 116(12), 1811–1830 (from memory).
Das, B. M. and Sobhan, K., *Principles of Geotechnical Engineering*, weight–volume
relationships (from memory).
O'Rourke, J., *Computational Geometry in C*, 2nd ed., ch. 7 (point in polygon; from
memory).
"""

from kitchen import _lazy

__getattr__, __dir__ = _lazy.lazy_face(
    __name__,
    {
        "FIELD_METHODS": "judgement",
        "INSIDE": "judgement",
        "NO_ZONE": "judgement",
        "OUTSIDE": "judgement",
        "SAME_LOCATION": "judgement",
        "ZONES": "judgement",
        "FieldCheck": "judgement",
        "check_field_tests": "judgement",
        "ZoneOutline": "outline",
        "outline_of_acceptable_zone": "outline",
        "outline_of_fitted_zone": "outline",
        "DENSITY_AGREEMENT": "records",
        "FIELD_TESTS": "records",
        "FieldTests": "records",
        "FieldTestsError": "records",
        "dry_density_from_wet": "records",
        "field_tests_path": "records",
        "read_field_tests": "records",
    },
)

__all__ = [
    "check_field_tests",
    "DENSITY_AGREEMENT",
    "dry_density_from_wet",
    "FIELD_METHODS",
    "FIELD_TESTS",
    "field_tests_path",
    "FieldCheck",
    "FieldTests",
    "FieldTestsError",
    "INSIDE",
    "NO_ZONE",
    "outline_of_acceptable_zone",
    "outline_of_fitted_zone",
    "OUTSIDE",
    "read_field_tests",
    "SAME_LOCATION",
    "ZoneOutline",
    "ZONES",
]
