"""kitchen — laboratory hydraulic conductivity of compacted soils.

The package reads a soil series (specimens, constant-head collections, falling-head
readings), works out each specimen's as-molded state, reduces each test to a hydraulic
conductivity corrected to a reference temperature, and relates conductivity to the
compaction state across the series.

The package follows the data's path, one subpackage per step; each subpackage's
``__init__`` is its public face, and the others import from it:

- :mod:`kitchen.io`: units at the file boundary, the raw tables, their checks, the
  validated series, and the files the tool writes (load);
- :mod:`kitchen.specimen`: phase relations, the as-molded state of each specimen;
- :mod:`kitchen.water`: water density, viscosity and the temperature ratio R_T;
- :mod:`kitchen.fits`: the least-squares fits the reductions share;
- :mod:`kitchen.uncertainty`: intervals after the GUM, from input quantities to k;
- :mod:`kitchen.validity`: termination criteria, fit diagnostics, the proposed window;
- :mod:`kitchen.settings`: the settings every result is computed with;
- :mod:`kitchen.reduction`: the constant-head and falling-head reductions and the
  per-specimen results table;
- :mod:`kitchen.revisions`: the append-only logs of corrections and of the reading
  windows chosen, and the effective data;
- :mod:`kitchen.workspace`: a series held open, recomputed specimen by specimen under
  digests of its inputs — the one way to open a series;
- :mod:`kitchen.analysis`: the series across compaction states, in one call;
- :mod:`kitchen.display_units`: the k and density units the charts and report show;
- :mod:`kitchen.charts`: the memo style, the series charts and the specimen charts;
- :mod:`kitchen.cautions`: the one wording of the cautions every exported item carries;
- :mod:`kitchen.memo`: the exported pack: charts, images, workbook, HTML pages, manifest;
- :mod:`kitchen.panels`: the notebooks' widgets; and the command line, :mod:`kitchen.cli`.

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
Every result carries the cautions of :data:`kitchen.cautions.CAUTIONS`: one wording, which
the README, the notebooks and every exported item quote as it is written there.
"""

from importlib.metadata import PackageNotFoundError, version

try:
    __version__ = version("kitchen")
except PackageNotFoundError:  # running from a source tree that is not installed
    __version__ = "0.0.0+unknown"
