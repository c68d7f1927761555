"""Seeded populations of compaction series with a known log k surface, for the zone tests.

Each series has one to three compactive efforts. The specimens of an effort are spread over
its optimum water content ± 4 percentage points and lie near its compaction curve, a
parabola ρd = ρd,max − c·(w − w_opt)² (the shape of a Proctor curve near its peak, ASTM
D698 and D1557; common practice, no source), with a normal scatter of dry density. Their
log10 k20 follows a known plane over the compaction plane,

    log10 k20 = a + b_w·(w − w0) + b_ρ·(ρd − ρ0) + δ_effort + ε,   ε ~ N(0, σ²),

falling with water content and with dry density (Mitchell, Hooper & Campanella 1965, J. Soil
Mech. Found. Div. 91(SM4); from memory for the trend), with an offset per effort; the
criterion is a largest k allowed drawn among the specimens' true values, so that some meet
and some do not. A share of the specimens is marked not judged (a test not valid).
:func:`held_out` draws more specimens of the same series, from the same law, to test what a
fit of the series predicts.

The code does not use the package, so that a fault in the package cannot hide in the
series it is tested on.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

EFFORTS = {  # optimum water content [-], maximum dry density [kg/m3], curvature [kg/m3]
    "reduced": (0.205, 1655.0, 45000.0),
    "standard": (0.185, 1725.0, 45000.0),
    "modified": (0.160, 1805.0, 50000.0),
}
W0, RHO0 = 0.185, 1725.0  # the plane's reference state


@dataclass(frozen=True)
class CompactionSeries:
    """One simulated series: its specimens and the law that made them.

    Attributes
    ----------
    water_content, dry_density, log10_k : numpy.ndarray
        Each specimen's state (a fraction, kg/m3) and log10 k20 [log10 m/s].
    effort : numpy.ndarray of str
    judged : numpy.ndarray of bool
        False for a specimen whose test is marked not valid.
    criterion : float
        Largest k20 allowed. [m/s]
    law : dict
        ``a``, ``b_w``, ``b_rho``, ``sigma`` and ``offsets`` (per effort) of the plane.
    scatter : float
        Standard deviation of dry density about the compaction curve. [kg/m3]
    """

    water_content: np.ndarray
    dry_density: np.ndarray
    log10_k: np.ndarray
    effort: np.ndarray
    judged: np.ndarray
    criterion: float
    law: dict
    scatter: float

    @property
    def meets(self) -> np.ndarray:
        """Judged and at or below the criterion (the point value of k)."""
        return self.judged & (self.log10_k <= np.log10(self.criterion))

    @property
    def judged_specimens(self):
        """(w, ρd, k20 [m/s], effort) of the judged specimens: what a fit of the series takes."""
        judged = self.judged
        return (
            self.water_content[judged],
            self.dry_density[judged],
            10.0 ** self.log10_k[judged],
            self.effort[judged],
        )


def _states(rng, efforts, counts, scatter):
    w, rho, effort = [], [], []
    for name, count in zip(efforts, counts, strict=True):
        w_opt, rho_max, curvature = EFFORTS[name]
        x = np.sort(rng.uniform(w_opt - 0.04, w_opt + 0.04, count))
        w.append(x)
        rho.append(rho_max - curvature * (x - w_opt) ** 2 + rng.normal(0.0, scatter, count))
        effort += [name] * count
    return np.concatenate(w), np.concatenate(rho), np.array(effort, dtype=object)


def _log10_k(rng, law, w, rho, effort):
    offsets = np.array([law["offsets"][e] for e in effort])
    centre = law["a"] + law["b_w"] * (w - W0) + law["b_rho"] * (rho - RHO0) + offsets
    return centre + rng.normal(0.0, law["sigma"], w.size)


def compaction_series(seed: int, not_judged: float = 0.1) -> CompactionSeries:
    """One seeded series: 1–3 efforts of 5–8 specimens (6–9 for a single effort)."""
    rng = np.random.default_rng(seed)
    n_efforts = int(rng.integers(1, 4))
    efforts = list(rng.choice(list(EFFORTS), size=n_efforts, replace=False))
    counts = rng.integers(5, 9, n_efforts) + (1 if n_efforts == 1 else 0)
    scatter = float(rng.uniform(8.0, 25.0))
    law = dict(
        a=float(rng.uniform(-9.6, -8.6)),
        b_w=float(rng.uniform(-40.0, -12.0)),
        b_rho=float(rng.uniform(-0.012, -0.002)),
        sigma=float(rng.uniform(0.05, 0.35)),
        offsets={e: float(rng.uniform(-0.3, 0.3)) for e in EFFORTS},
    )
    w, rho, effort = _states(rng, efforts, counts, scatter)
    log_k = _log10_k(rng, law, w, rho, effort)
    criterion = 10.0 ** float(np.quantile(log_k, rng.uniform(0.3, 0.7)))
    judged = rng.random(w.size) >= not_judged
    return CompactionSeries(w, rho, log_k, effort, judged, criterion, law, scatter)


def held_out(series: CompactionSeries, seed: int, per_effort: int = 10):
    """More specimens of `series`' efforts from the same law: (w, ρd, log10 k20, effort)."""
    rng = np.random.default_rng(seed)
    efforts = list(dict.fromkeys(series.effort))
    w, rho, effort = _states(rng, efforts, [per_effort] * len(efforts), series.scatter)
    return w, rho, _log10_k(rng, series.law, w, rho, effort), effort


def new_specimen_tally(fitted, series: CompactionSeries, seed: int) -> tuple[int, int, int, int]:
    """New specimens of `series` (:func:`held_out` with `seed`) held to a fitted zone of it.

    Returns (held by their 95 % prediction interval, drawn, inside their effort's zone (the
    one zone, without an effort factor), of those inside failing the criterion).
    """
    w, rho, log_k, effort = held_out(series, seed)
    covered = total = in_zone = failing = 0
    for name in fitted.efforts or (None,):
        rows = effort == name if name is not None else np.ones(w.size, dtype=bool)
        _, low, high = fitted.predict(w[rows], rho[rows], name)
        covered += int(np.sum((low <= log_k[rows]) & (log_k[rows] <= high)))
        total += int(rows.sum())
        inside = np.asarray(fitted.contains(w[rows], rho[rows], name))
        in_zone += int(inside.sum())
        failing += int(np.sum(inside & (log_k[rows] > np.log10(series.criterion))))
    return covered, total, in_zone, failing
