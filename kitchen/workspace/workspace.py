"""A series held open for interactive work: each specimen recomputed only when its inputs change.

In the workbook one series is revised, re-windowed and redrawn many times. A
:class:`Workspace` holds the series' tables as written, its revision log and its effective
data, and keeps every specimen's reduction under a digest of what it was computed from:
the specimen's row of the specimens table, its readings or collections, the settings, its
reading window and capillary rise. After a revision only the table the revision names is
validated again (:func:`kitchen.io.rebuild_series`), and only the specimens whose
inputs changed are reduced again; the others come from the cache. Revising one
specimen's height in a series of a dozen long logger records reduces that one specimen.

The results are those of :func:`kitchen.reduction.results.series_results` on the effective series,
row for row. Like the rest of the core, this module draws nothing: it says which
specimens changed (:meth:`Workspace.sync`) so that a panel redraws only their charts.
The digests, and where each specimen's rows lie, are in :mod:`kitchen.workspace.digests`.
"""

from __future__ import annotations

import time
from pathlib import Path
from typing import TYPE_CHECKING

import pandas as pd

from kitchen.analysis import Criterion, parse_criterion
from kitchen.io import (
    TABLE_NAMES,
    InputProblem,
    RawTable,
    Series,
    SeriesError,
    build_series,
    parse_value,
    project_settings_path,
    read_project_settings,
    read_tables,
    rebuild_series,
)
from kitchen.reduction import (
    ConstantHeadAnalysis,
    FallingHeadAnalysis,
    FallingHeadRecord,
    FlowRecord,
    collection_table,
    condition_result,
    constant_head_analysis,
    constant_head_flow,
    falling_head_flow,
    permeation_state,
    results_table,
)
from kitchen.reduction import result_row as results_row
from kitchen.revisions import (
    EffectiveSeries,
    HeldSeries,
    KeptTest,
    Revision,
    apply_revisions,
    chosen_windows,
    file_stamps,
    log_sha256,
    read_kept_tests,
    read_revisions,
    read_window_choices,
    revise,
    revisions_path,
    standing_kept,
    withdraw,
)
from kitchen.settings import Settings
from kitchen.specimen import final_state, specimen_state

from .digests import frame_digest, parts_digest, specimen_positions, specimen_spans

if TYPE_CHECKING:
    from kitchen.analysis import SeriesAnalysis

__all__ = ["Workspace"]

_UNKEYED = object()
"""The key of a reduction held without the digest of its inputs (see Workspace._cached)."""

READING_TABLES = ("constant_head", "falling_head")


class Workspace:
    """A series open for work: effective data, and results cached per specimen.

    This is the one way into a series: the command line, every panel, the revise summary
    and the memo pack open a series here, so that the same specimen shows the same k
    everywhere. It reads the raw tables, applies the standing revisions, takes the
    reading windows on record, and hands out the reductions (:meth:`falling_head`,
    :meth:`constant_head`), the results (:meth:`results`, :meth:`results_table`) and the
    series analysis (:meth:`analysis`), each specimen reduced once while its inputs stand.

    Parameters
    ----------
    series_path : str or pathlib.Path
        Series folder or ``.xlsx`` workbook; its revision log is applied
        (:func:`kitchen.revisions.load_effective_series` gives the same data).
    settings : Settings, optional
        Reference temperature, viscosity, criteria and the rest
        (:class:`kitchen.settings.Settings`).
    log_rows : int, optional
        Apply only the first `log_rows` rows of the revision log: the series as it stood
        before a later revision (what a revision changed is two workspaces, one row apart).
    windows_on_record : bool, default True
        Reduce each falling-head specimen with the reading window recorded in the window
        log (:mod:`kitchen.revisions.window_log`); False lets the tool propose every window.

    Raises
    ------
    SeriesError
        When the effective data do not load (every problem, by file, row and column).
    RevisionError
        When the log cannot be read or a revision no longer fits the raw data.
    KeptTestError
        When the log of tests kept on record cannot be read (naming its row and column).

    Notes
    -----
    The cache keeps, for each specimen and method, the last reduction and the digest of
    its inputs; a falling-head record (the prepared readings) is kept apart from its
    analysis, so that moving the reading window reuses the record, and a revised height or
    diameter reuses the record's reading arrays
    (:meth:`kitchen.reduction.FallingHeadRecord.with_specimen`). The digest of each
    specimen's readings is computed once, when its table is built.
    """

    def __init__(
        self,
        series_path: str | Path,
        settings: Settings | None = None,
        *,
        log_rows: int | None = None,
        windows_on_record: bool = True,
    ):
        self.path = Path(series_path)
        self._log_rows = log_rows
        self._windows_on_record = bool(windows_on_record)
        self._settings = settings or Settings()
        self._settings_digest = parts_digest(self._settings)
        self._windows: dict[str, tuple[int, int] | None] = {}
        self._rises: dict[str, float | None] = {}
        self._written, self._input_files = read_tables(self.path)
        self._project = read_project_settings(self.path)
        self._stamps = file_stamps(self._input_files)
        self._revisions: tuple[Revision, ...] = self._read_log()
        self._log_sha256 = log_sha256(self.path)
        self._tables = {name: self._effective_table(name) for name in self._written}
        self._series = build_series(self._tables, self.path, self._input_files)
        self._cache: dict[tuple[str, str], tuple[str, object]] = {}
        self._result_rows: dict[tuple[str, str], tuple[object, pd.Series, dict]] = {}
        self._records: dict[str, tuple[str, str, FallingHeadRecord]] = {}
        self._rows: dict[str, dict] = {}
        self._reading_digests: dict[str, dict[str, str]] = {}
        self._index_readings(READING_TABLES)
        self._index_specimens()
        self._window_choices: tuple = ()
        self._kept_tests: tuple[KeptTest, ...] = read_kept_tests(self.path)
        self._logged_windows: dict[str, tuple[int, int]] = {}
        self._apply_choices(self._read_choices())
        self.last_moved: tuple[str, ...] = ()
        """The specimens moved by the last :meth:`revise` or :meth:`withdraw`."""
        self.last_timings: dict[str, float] = {}
        """Seconds the last :meth:`revise` or :meth:`withdraw` spent recording the row and
        applying it."""

    # --- the effective data ----------------------------------------------------------------
    def _read_log(self) -> tuple[Revision, ...]:
        """The revision log's rows, up to ``log_rows`` when the workspace was opened so."""
        revisions = read_revisions(self.path)
        return revisions if self._log_rows is None else revisions[: self._log_rows]

    def _read_choices(self) -> tuple:
        """The window log's rows, or none when the workspace ignores the windows on record."""
        return read_window_choices(self.path) if self._windows_on_record else ()

    def _effective_table(self, name: str) -> RawTable:
        """The table as written with the standing revisions that name it applied."""
        own = [r for r in self._revisions if r.table == name]
        if not own:
            return self._written[name]  # never changed in place: revisions apply to copies
        tables, _ = apply_revisions({name: self._written[name]}, own)
        return tables[name]

    def _index_readings(self, names) -> None:
        """Each specimen's rows in the readings tables; the digests of those rows are formed
        when first asked for (:meth:`_reading_digest`)."""
        for name in names:
            frame = getattr(self._series, name)
            rows = specimen_spans(frame) if name == "falling_head" else specimen_positions(frame)
            self._rows[name] = rows
            self._reading_digests[name] = {}

    def _reading_digest(self, table: str, specimen: str) -> str:
        """The digest of one specimen's rows of a readings table, formed once a table."""
        digests = self._reading_digests[table]
        if specimen not in digests:
            digests[specimen] = frame_digest(self._slice(table, specimen), skip=("specimen",))
        return digests[specimen]

    def _index_specimens(self) -> None:
        """Each specimen's row of the state table (as series_results takes them) and its
        digest; the row of a specimen whose values did not change is kept as it was."""
        self._prepared = specimen_state(self._series.specimens)
        # the reductions take each specimen as it stood during permeation (a flexible-wall
        # specimen after consolidation); the results show it as prepared
        self._state = state = permeation_state(self._prepared, self._series.flexible_wall)
        self._changes = final_state(self._series.specimens).set_index("specimen")["change"]
        self._prepared_rows = {
            specimen: row
            for specimen, row in self._prepared.set_index("specimen", drop=False).iterrows()
        }
        columns = state.columns
        held_rows = getattr(self, "_state_rows", {})
        held_digests = getattr(self, "_specimen_digests", {})
        rows, digests = {}, {}
        for values in state.to_numpy(dtype=object):
            row = dict(zip(columns, values, strict=True))
            specimen = row["specimen"]
            digests[specimen] = digest = parts_digest(tuple(row.items()))
            if held_digests.get(specimen) == digest:
                rows[specimen] = held_rows[specimen]
            else:
                rows[specimen] = pd.Series(values, index=columns, name=specimen, dtype=object)
        self._state_rows, self._specimen_digests = rows, digests

    def _slice(self, table: str, specimen: str) -> pd.DataFrame:
        frame = getattr(self._series, table)
        rows = self._rows[table][specimen]
        if isinstance(rows, tuple):
            return frame.iloc[rows[0] : rows[1]]
        return frame.iloc[rows]

    @property
    def series(self) -> Series:
        """The validated effective series."""
        return self._series

    @property
    def revisions(self) -> tuple[Revision, ...]:
        """Every row of the revision log, as last read."""
        return self._revisions

    @property
    def effective(self) -> EffectiveSeries:
        """The effective series with the revisions applied and withdrawn, for provenance."""
        return EffectiveSeries.from_log(
            self._series, self._revisions, revisions_path(self.path), self._log_sha256
        )

    def specimen_ids(self) -> list[str]:
        """The specimens, in the order of the specimens table."""
        return list(self._state_rows)

    def has_readings(self, specimen: str, table: str = "falling_head") -> bool:
        """Whether a specimen has rows in a readings table."""
        return specimen in self._rows.get(table, {})

    def readings(self, specimen: str, table: str = "falling_head") -> pd.DataFrame:
        """One specimen's rows of a readings table (``falling_head`` or ``constant_head``)."""
        if table not in READING_TABLES:
            raise ValueError(f"unknown readings table {table!r}; expected {READING_TABLES}")
        if specimen not in self._rows[table]:
            raise KeyError(f"specimen {specimen!r} has no {table} readings in {self.path.name}")
        return self._slice(table, specimen)

    def _key(self, specimen: str, table: str) -> str:
        """The digest of everything one reduction of one specimen depends on."""
        falling = table == "falling_head"
        return parts_digest(
            self._specimen_digests[specimen],
            self._reading_digest(table, specimen),
            self._settings_digest,
            self._window_of(specimen) if falling else None,
            self._rises.get(specimen) if falling else None,
        )

    def _inputs(self) -> dict[tuple[str, str], str]:
        """The digest of every specimen's inputs to each of its reductions.

        Every change of the inputs asks for them first (to tell what it moved), so this
        is where a reduction kept without its digest (:data:`_UNKEYED`: reduced before any
        change) is given the digest of the inputs it was reduced from.
        """
        inputs = {
            (specimen, table): self._key(specimen, table)
            for table, rows in self._rows.items()
            for specimen in rows
        }
        for held, (key, result) in list(self._cache.items()):
            if key is _UNKEYED:
                self._cache[held] = (inputs.get(held), result)
        for specimen, (key, row_key, record) in list(self._records.items()):
            if key is _UNKEYED:
                self._records[specimen] = (self._readings_key(specimen), row_key, record)
        return inputs

    # --- changes ---------------------------------------------------------------------------
    def sync(self) -> tuple[str, ...]:
        """Read the revision log again and apply what was added since.

        A raw file rewritten since it was read (its size or modification time changed)
        is read again, with every table.

        Returns
        -------
        tuple of str
            The specimens whose inputs changed, in the order of the specimens table:
            their results and charts are the ones to refresh.

        Raises
        ------
        SeriesError, RevisionError, KeptTestError
            As when the workspace is opened; the workspace is then left as it was.
        """
        revisions = self._read_log()
        held = self._revisions
        self._kept_tests = read_kept_tests(self.path)  # judges no test again: no one moves
        try:
            rewritten = file_stamps(self._input_files) != self._stamps
        except OSError:
            rewritten = True
        if rewritten:  # a raw file was edited behind the workspace: read every table again
            return self._reread(revisions)
        if revisions[: len(held)] == held:
            changed = {r.table for r in revisions[len(held) :]}
        else:  # rows were changed or removed (by hand): apply the whole log again
            changed = {r.table for r in revisions} | {r.table for r in held}
        choices = self._read_choices()
        if not changed and choices == self._window_choices:
            return ()
        before = self._inputs()
        if changed:
            names = tuple(name for name in TABLE_NAMES if name in changed and name in self._written)
            tables = dict(self._tables)
            self._revisions, old = revisions, held
            try:
                tables.update({name: self._effective_table(name) for name in names})
                series = rebuild_series(self._series, tables, names)
            except Exception:
                self._revisions = old
                raise
            self._tables, self._series = tables, series
            self._log_sha256 = log_sha256(self.path)
            if {"specimens", "flexible_wall"} & set(names):
                self._index_specimens()
            self._index_readings([name for name in names if name in READING_TABLES])
        self._apply_choices(choices)
        return self._moved(before)

    def _apply_choices(self, choices) -> None:
        """Take the windows of the window log; a window set since for a specimen the log
        now names again gives way to the log."""
        if choices == self._window_choices:
            return
        logged = chosen_windows(self._series, choices)
        renamed = {c.specimen for c in choices[len(self._window_choices) :]}
        if choices[: len(self._window_choices)] != self._window_choices:
            renamed = {c.specimen for c in choices} | {c.specimen for c in self._window_choices}
        for specimen in renamed:
            self._windows.pop(specimen, None)
        self._window_choices, self._logged_windows = choices, logged

    def _window_of(self, specimen: str) -> tuple[int, int] | None:
        """The window a specimen is reduced with: set here, else from the log, else None
        (the tool proposes one)."""
        if specimen in self._windows:
            return self._windows[specimen]
        return self._logged_windows.get(specimen)

    def _reread(self, revisions) -> tuple[str, ...]:
        """Read the raw files and the log again, as when the workspace was opened."""
        held = (self._written, self._input_files, self._stamps, self._revisions, self._project)
        before = self._inputs()
        try:
            self._written, self._input_files = read_tables(self.path)
            self._project = read_project_settings(self.path)
            self._stamps = file_stamps(self._input_files)
            self._revisions = revisions
            tables = {name: self._effective_table(name) for name in self._written}
            series = build_series(tables, self.path, self._input_files)
        except Exception:
            self._written, self._input_files, self._stamps, self._revisions, self._project = held
            raise
        self._tables, self._series = tables, series
        self._log_sha256 = log_sha256(self.path)
        self._index_specimens()
        self._index_readings(READING_TABLES)
        self._window_choices = ()  # the rows are checked again against the readings read
        self._apply_choices(self._read_choices())
        return self._moved(before)

    def _moved(self, before: dict) -> tuple[str, ...]:
        after = self._inputs()
        moved = {
            key[0] for key in before.keys() | after.keys() if before.get(key) != after.get(key)
        }
        return tuple(specimen for specimen in self._state_rows if specimen in moved)

    def revise(self, **revision) -> Revision:
        """Record a revision (:func:`kitchen.revisions.revise`, same keywords) and apply it.

        The specimens it moved are those :meth:`sync` returns; see :attr:`last_moved`.
        """
        return self._recorded(lambda: revise(self.path, **revision, held=self._held()))

    def withdraw(self, revision_id: str, **details) -> Revision:
        """Withdraw a revision (:func:`kitchen.revisions.withdraw`) and apply the log again."""
        return self._recorded(
            lambda: withdraw(self.path, revision_id, **details, held=self._held())
        )

    def _recorded(self, record) -> Revision:
        started = time.perf_counter()
        row = record()
        recorded = time.perf_counter()
        self.last_moved = self.sync()
        self.last_timings = {
            "recording the revision": recorded - started,
            "effective data": time.perf_counter() - recorded,
        }
        return row

    def _held(self) -> HeldSeries:
        """The raw tables held, so that recording a revision need not read them again."""
        return HeldSeries(
            self._written, tuple(self._input_files), self._stamps, self._revisions, self._series
        )

    @property
    def settings(self) -> Settings:
        """The settings every result is computed with."""
        return self._settings

    def set_settings(self, settings: Settings) -> tuple[str, ...]:
        """Use other settings; returns the specimens whose results are now out of date."""
        before, self._settings = self._inputs(), settings
        self._settings_digest = parts_digest(settings)
        return self._moved(before)

    def set_window(self, specimen: str, window: tuple[int, int] | None) -> tuple[str, ...]:
        """Try a falling-head reading window for a specimen (None: the tool proposes one).

        The window holds in this workspace only; one recorded in the window log
        (:func:`kitchen.revisions.choose_window`) holds wherever the series is opened."""
        self.readings(specimen)
        before = self._inputs()
        self._windows[specimen] = None if window is None else tuple(int(v) for v in window)
        return self._moved(before)

    def set_capillary_rise(self, specimen: str, rise: float | None) -> tuple[str, ...]:
        """A measured capillary rise for a specimen's standpipe, or None for the setting. [m]"""
        self.readings(specimen)
        before = self._inputs()
        self._rises[specimen] = None if rise is None else float(rise)
        return self._moved(before)

    # --- reductions ------------------------------------------------------------------------
    def _cached(self, specimen: str, table: str, key, reduce):
        """The reduction held for `specimen` while its inputs' digest is `key()`; else
        `reduce()`, held. A first reduction is held without its digest (the digest of
        10⁶ readings costs tens of milliseconds, and a report never changes its inputs):
        it stands until the inputs change, and :meth:`_inputs` digests it first."""
        held = self._cache.get((specimen, table))
        if held is None:
            result = reduce()
            self._cache[specimen, table] = (_UNKEYED, result)
            return result
        if held[0] is _UNKEYED:
            return held[1]
        key = key()
        if held[0] == key:
            return held[1]
        result = reduce()
        self._cache[specimen, table] = (key, result)
        return result

    def falling_head(self, specimen: str) -> FallingHeadAnalysis:
        """One specimen's falling-head analysis; from the cache while its inputs are unchanged."""
        if not self.has_readings(specimen):
            self.readings(specimen)  # raises, naming the specimen and the file
        return self._cached(
            specimen,
            "falling_head",
            lambda: self._key(specimen, "falling_head"),
            lambda: self._analyse(specimen),
        )

    def _analyse(self, specimen: str) -> FallingHeadAnalysis:
        try:
            return self.falling_head_record(specimen).analyse(self._window_of(specimen))
        except ValueError as error:  # as kitchen.reduction.series_results words it
            raise ValueError(f"{self._series.name}, falling-head readings: {error}") from error

    def falling_head_record(self, specimen: str) -> FallingHeadRecord:
        """One specimen's falling-head readings, checked and prepared once
        (:class:`kitchen.reduction.FallingHeadRecord`), for trying reading windows and fits.

        The record is the one :meth:`falling_head` analyses: kept while the readings, the
        settings and the capillary rise stand, and moved to a revised height or diameter
        without preparing the readings again.
        """
        readings = self.readings(specimen, "falling_head")
        row_key = self._specimen_digests[specimen]
        held = self._records.get(specimen)
        if held is None:  # held without its digest (see _cached)
            readings_key = _UNKEYED
        elif held[0] is _UNKEYED:
            readings_key = _UNKEYED  # nothing changed since it was prepared
        else:
            readings_key = self._readings_key(specimen)
        if held is None or held[0] != readings_key:
            record = FallingHeadRecord(
                readings, self._state_rows[specimen], self._settings, self._rises.get(specimen)
            )
        elif held[1] != row_key:  # a revised height, diameter, ...: the readings stand
            record = held[2].with_specimen(self._state_rows[specimen])
        else:
            record = held[2]
        self._records[specimen] = (readings_key, row_key, record)
        return record

    def _readings_key(self, specimen: str) -> str:
        """The digest of what a prepared record depends on: its readings, the settings and
        the capillary rise."""
        return parts_digest(
            self._reading_digest("falling_head", specimen),
            self._settings_digest,
            self._rises.get(specimen),
        )

    def constant_head(self, specimen: str) -> ConstantHeadAnalysis:
        """One specimen's constant-head analysis; from the cache while its inputs are unchanged."""
        collections = self.readings(specimen, "constant_head")
        settings = self._settings

        def reduce():
            table = collection_table(
                collections, self._state, settings.reference_temperature, settings.viscosity
            )
            return constant_head_analysis(table, self._state_rows[specimen], settings)

        return self._cached(
            specimen, "constant_head", lambda: self._key(specimen, "constant_head"), reduce
        )

    def flow_record(self, specimen: str, table: str = "falling_head") -> FlowRecord:
        """One test's flow over its course: cumulative inflow and outflow, pore volumes of
        flow, k and outflow/inflow against time (:mod:`kitchen.reduction.test_record`)."""
        if table == "falling_head":
            return falling_head_flow(
                self.falling_head(specimen),
                self.falling_head_record(specimen),
                self._state_rows[specimen],
            )
        collections = collection_table(
            self.readings(specimen, "constant_head"),
            self._state,
            self._settings.reference_temperature,
            self._settings.viscosity,
        )
        return constant_head_flow(collections, self._state_rows[specimen])

    def prepared_state(self, specimen: str) -> pd.Series:
        """A specimen's state as prepared (:func:`kitchen.specimen.specimen_state`)."""
        return self._prepared_rows[specimen]

    def permeation_state(self, specimen: str) -> pd.Series:
        """A specimen's state with its dimensions during permeation, its ``cell`` and how
        the dimensions were got (:func:`kitchen.reduction.permeation_state`)."""
        return self._state_rows[specimen]

    def results(self) -> pd.DataFrame:
        """The results table of the effective series, as :func:`kitchen.reduction.series_results`.

        Returns
        -------
        pandas.DataFrame
            One row per specimen and method, in the order of the specimens table; only the
            reductions whose inputs changed since they were last computed are computed.
        """
        rows = []
        for specimen, state_row in self._state_rows.items():
            for table in READING_TABLES:
                if specimen in self._rows[table]:
                    rows.append(self._result_row(specimen, state_row, table))
        return pd.DataFrame(rows)

    def _result_row(self, specimen: str, state_row: pd.Series, table: str) -> dict:
        """One row of the results table; kept while the analysis and the row stand."""
        if table == "falling_head":
            analysis = self.falling_head(specimen)
            gradient = analysis.gradient_start
        else:
            analysis = self.constant_head(specimen)
            gradient = analysis.gradient_max
        held = self._result_rows.get((specimen, table))
        if held is None or held[0] is not analysis or held[1] is not state_row:
            prepared = self._prepared_rows[specimen]
            row = results_row(prepared, table, analysis, gradient, self._settings)
            held = (analysis, state_row, row)
            self._result_rows[specimen, table] = held
        row = condition_result(
            held[2],
            state_row,
            self._series.flexible_wall,
            self._series.b_value_checks,
            self._prepared_rows[specimen].get("flow_direction"),
            self.stress_limits,
            self._settings.criteria.minimum_b_value,
            self._changes.get(specimen),
        )
        # lists copied: a caller may change its table without changing the one kept here
        return {k: list(v) if isinstance(v, list) else v for k, v in row.items()}

    # --- what the views show ---------------------------------------------------------------
    @property
    def revision_count(self) -> int:
        """How many revisions stand (applied and not withdrawn)."""
        return self.effective.revision_count

    @property
    def window_choices(self) -> tuple:
        """The rows of the window log in force when the workspace last read it."""
        return self._window_choices

    @property
    def windows(self) -> dict[str, tuple[int, int]]:
        """The reading window each falling-head specimen is reduced with, where one was
        chosen (in the window log, or set here); the others get the window the tool
        proposes. ``{specimen: (start, stop)}`` as positions in its readings."""
        chosen = {}
        for specimen in self._rows.get("falling_head", {}):
            window = self._window_of(specimen)
            if window is not None:
                chosen[specimen] = window
        return chosen

    @property
    def capillary_rises(self) -> dict[str, float]:
        """Measured capillary rises set for specimens' standpipes, ``{specimen: rise}``. [m]"""
        return {specimen: rise for specimen, rise in self._rises.items() if rise is not None}

    def results_table(self) -> pd.DataFrame:
        """The exported results table (:func:`kitchen.reduction.results_table`) of
        :meth:`results`: headers with their units, checks in words."""
        return results_table(self.results(), self._settings)

    def analysis(self, criterion=None, confidence: float = 0.95) -> SeriesAnalysis:
        """The series analysis of :meth:`results` against the criterion in force
        (:func:`kitchen.analysis.analyse_series`).

        Parameters
        ----------
        criterion : float or Criterion, optional
            A criterion given for this analysis (typed on the command line or in a panel):
            the largest k allowed (a number), or a :class:`kitchen.analysis.Criterion` of
            either kind; it overrides the series' own. [m/s] None (the default) means the
            series' own (:attr:`criterion`, from its project table), else none: then no
            verdict is drawn (see :meth:`criterion_in_force`).
        confidence : float, default 0.95
            Confidence of the fitted lines' intervals.

        Raises
        ------
        SeriesError
            When the criterion of the project table cannot be read, naming its file, row
            and column (only when no criterion is given here).
        """
        from kitchen.analysis import analyse_series  # with scipy.stats: not needed to reduce

        in_force, _ = self.criterion_in_force(criterion)
        return analyse_series(
            self.results(),
            in_force,
            self._settings.reference_temperature,
            confidence,
            kept=self.kept,
        )

    @property
    def kept_tests(self) -> tuple[KeptTest, ...]:
        """Every row of the kept-tests log (:mod:`kitchen.revisions.kept_tests`), as last
        read (when the workspace was opened, and at each :meth:`sync`)."""
        return self._kept_tests

    @property
    def kept(self) -> dict[tuple[str, str], str]:
        """The tests kept on record despite a failed check, in force: ``{(specimen,
        method): the keep in words (id, who, when, why)}``, as :meth:`analysis` judges
        them."""
        return {pair: row.record for pair, row in standing_kept(self._kept_tests).items()}

    @property
    def input_files(self) -> tuple[Path, ...]:
        """Every file the series was read from, for provenance: the raw tables (or the
        workbook) and, where the series has one, the project table."""
        project, _ = project_settings_path(self.path)
        extra = (project,) if project.is_file() and project not in self._input_files else ()
        return (*self._input_files, *extra)

    @property
    def project_settings(self) -> dict:
        """The series' project table as written (:func:`kitchen.io.read_project_settings`),
        read when the workspace was opened."""
        return dict(self._project)

    @property
    def stress_limits(self) -> tuple[float | None, float | None]:
        """The effective stress of a flexible-wall test the series' project table asks for,
        lowest and highest (``minimum_effective_stress``, ``maximum_effective_stress``;
        None where not given). [Pa]

        Raises
        ------
        SeriesError
            When a value cannot be read as a pressure, naming its file, row and column.
        """
        limits = []
        for name in ("minimum_effective_stress", "maximum_effective_stress"):
            setting = self._project.get(name)
            if setting is None:
                limits.append(None)
                continue
            try:
                limits.append(parse_value(setting.value, "pressure").si)
            except ValueError as error:
                raise SeriesError(
                    [InputProblem(setting.file, setting.row, "value", f"{name}: {error}")]
                ) from None
        return limits[0], limits[1]

    @property
    def criterion(self) -> Criterion | None:
        """The criterion the series carries in its project table, or None.

        Raises
        ------
        SeriesError
            When the table's criterion cannot be read, naming its file, row and column.
        """
        setting = self._project.get("criterion")
        if setting is None:
            return None
        try:
            return parse_criterion(setting.value)
        except ValueError as error:
            raise SeriesError(
                [InputProblem(setting.file, setting.row, "value", f"criterion: {error}")]
            ) from None

    def criterion_in_force(self, criterion=None) -> tuple[Criterion | float | None, str]:
        """The criterion an analysis is judged against, and where it comes from in words.

        A criterion given here (typed on the command line or in a panel) overrides the
        series' own; without one, the criterion of the series' project table; without
        that, none, and no verdict is drawn: a limit is never assumed.

        Parameters
        ----------
        criterion : float or Criterion, optional
            A criterion given for this analysis. [m/s]

        Returns
        -------
        (Criterion or float or None, str)
            The criterion (as given, or parsed from the project table; None when there
            is none) and its source: ``"given for this analysis"``, ``"from the series'
            project table (FILE, row N, column 'value')"`` or ``"none given"``.

        Raises
        ------
        SeriesError
            When, with no criterion given, the project table's cannot be read.
        """
        if criterion is not None:
            return criterion, "given for this analysis"
        own = self.criterion
        if own is None:
            return None, "none given"
        return own, f"from the series' project table ({self._project['criterion'].where})"
