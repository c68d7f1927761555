"""kitchen — laboratory hydraulic conductivity of compacted soils.

The package reads a soil series (specimens, constant-head collections, falling-head
readings), works out each specimen's as-molded state, reduces each test to a hydraulic
conductivity corrected to a reference temperature, and relates conductivity to the
compaction state across the series.

The modules follow the data's path: :mod:`kitchen.io.units`, :mod:`kitchen.io.raw_tables`,
:mod:`kitchen.io.table_checks` and :mod:`kitchen.io.series` (load), :mod:`kitchen.specimen`
(phase relations), :mod:`kitchen.water` (density, viscosity), :mod:`kitchen.reduction.constant_head`
with its collections module and :mod:`kitchen.reduction.falling_head` with its record, window and
evidence modules (test reductions, sharing the fits gathered in :mod:`kitchen.fits`),
:mod:`kitchen.validity.checks` (termination criteria and fit diagnostics),
:mod:`kitchen.uncertainty.conductivity` (intervals after the GUM: its input quantities and their
propagation), :mod:`kitchen.reduction.results` (the per-specimen results table),
:mod:`kitchen.analysis.compaction` and :mod:`kitchen.analysis.trends` with the saturation lines, the
acceptable zone, the criterion and the grading predictions beside them (the series across
compaction states), :mod:`kitchen.analysis.series_analysis` (all of them in one call, on the result
chosen for each specimen), :mod:`kitchen.revisions` (the append-only log of corrections: its
log, the effective data, recording, history) and :mod:`kitchen.revisions.window_log` (the reading
windows chosen, with their reasons), :mod:`kitchen.workspace.workspace` (a series held open,
recomputed specimen by specimen, under digests of its inputs), :mod:`kitchen.charts` (the
memo style, the series charts and the specimen charts) and :mod:`kitchen.memo.pack` (the
exported pack: its charts, images, workbook and HTML pages), :mod:`kitchen.panels` (the
notebooks' widgets) and the command line in :mod:`kitchen.cli`.

Nomenclature
------------
Inside the package every quantity is SI; units are parsed once, at the file boundary.
Temperature is the one exception: it is carried in degrees Celsius, as every standard
states its reference temperature that way.

======================  ==========  ==========  =========================================
quantity                symbol      unit        column / argument name
======================  ==========  ==========  =========================================
specimen diameter       D           m           ``diameter``
specimen height         L           m           ``height`` (length along the flow path)
cross-section area      A           m²          ``area``
specimen volume         V           m³          ``volume``
dry mass of solids      Ms          kg          ``dry_mass``
specific gravity        Gs          –           ``specific_gravity``
water content           w           –           ``water_content`` (fraction, not percent)
dry density             ρd          kg/m³       ``dry_density``
void ratio              e           –           ``void_ratio``
porosity                n           –           ``porosity``
degree of saturation    S           –           ``saturation`` (fraction)
standpipe area          a           m²          ``standpipe_area``
head difference         h           m           ``head_difference``, ``head``
flow volume             Q           m³          ``volume``
time, duration          t           s           ``time``, ``duration``
hydraulic gradient      i           –           ``gradient``
Darcy velocity          v           m/s         ``darcy_velocity``
hydraulic conductivity  k           m/s         ``k``; ``k20`` at the reference temperature
temperature             T           °C          ``temperature``
water viscosity         μ           Pa·s        ``viscosity``
water density           ρw          kg/m³       ``water_density``
======================  ==========  ==========  =========================================

Cautions
--------
Laboratory conductivity of compacted clay is often 10 to 1000 times lower than the field
value of the liner built from it. The criterion, method and reference temperature come
from local codes and the project specification; the numbers support, and never replace,
the judgement of the responsible licensed engineer.
"""

from importlib.metadata import PackageNotFoundError, version

try:
    __version__ = version("kitchen")
except PackageNotFoundError:  # running from a source tree that is not installed
    __version__ = "0.0.0+unknown"
