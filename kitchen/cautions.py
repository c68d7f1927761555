"""The cautions: one wording, quoted as it is by the README and the notebooks, and carried
by every exported item (the report page, each chart page and static image, the workbook).

References
----------
Daniel, D. E. (1984). Predicting hydraulic conductivity of clay liners. J. Geotech. Eng.
110(2):285. Benson, C. H., Daniel, D. E. and Boutwell, G. P. (1999). Field performance of
compacted clay liners. J. Geotech. Geoenviron. Eng. 125(5). ASTM D5084 (results apply to
the field "with caution and by qualified personnel"; from memory). Daniel, D. E. and
Benson, C. H. (1990). Water content–density criteria for compacted soil liners. J. Geotech.
Eng. 116(12):1811 (the acceptable zone comes from laboratory specimens of one soil).
"""

__all__ = ["CAUTIONS", "FIELD_CAUTIONS"]

CAUTIONS = (
    "Laboratory hydraulic conductivity can differ from the field value by orders of "
    "magnitude: for compacted clay liners the field value is often 10 to 1000 times "
    "higher (clods, desiccation cracks, lift interfaces; Daniel 1984; Benson, Daniel & "
    "Boutwell 1999).",
    "Rigid-wall permeameters can leak along the wall; air in the specimen lowers k; "
    "high gradients can consolidate soft specimens or move fines.",
    "The governing criterion, test method and reference temperature come from local codes "
    "and the project specification. These numbers support, and never replace, the "
    "judgement of the responsible licensed engineer.",
)
"""The cautions every report, notebook and exported memo item carries."""

FIELD_CAUTIONS = (
    "A field density test inside the acceptable zone does not prove the field hydraulic "
    "conductivity: it shows the lift was compacted to a state at which laboratory "
    "specimens met the criterion (Daniel & Benson 1990).",
    "The zone comes from laboratory specimens of one borrow source; soil from elsewhere, "
    "or of another grading or plasticity, is not covered by it.",
    "The project's QA plan sets the tests, their frequency and what is done with a test "
    "outside the zone; defer to it and to the responsible engineer.",
)
"""The cautions every field-check report, chart and notebook carries, after :data:`CAUTIONS`."""
