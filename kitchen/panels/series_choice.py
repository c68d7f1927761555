"""Which series the notebooks work on: chosen without code, remembered between notebooks.

Every notebook starts with the same row of controls (:class:`SeriesChooser`): a list of
the samples and a box for the path of one's own series folder or ``.xlsx`` workbook, and
an **Open** button. The series opened last is remembered in a small file,
``chosen_series.json``, in the *working folder* beside the notebooks (``working/``, which
git ignores; the environment variable ``KITCHEN_WORKING_FOLDER`` names another), so that
the next notebook opens on it. Only a series the engineer opens is remembered; a notebook
opened before any choice shows its own sample.

A sample is never worked on where it lies: the first time it is opened, its generated raw
tables are copied into the working folder (:func:`working_copy`), and the windows kept,
tests kept on record and revisions made while trying the notebooks are written there,
beside the copy. Deleting the copy starts the sample over. The files under
``sample_data/`` are only read.

:func:`workbook_panel` puts the chooser above one of the notebooks' panels and builds the
panel again on the series opened.
"""

from __future__ import annotations

import json
import os
import shutil
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path

import ipywidgets as widgets

from kitchen.field import FIELD_TESTS
from kitchen.io import TABLE_NAMES, atomic_write_text
from kitchen.workspace import Workspace

from .common import MessageArea

__all__ = [
    "SAMPLES",
    "SeriesChooser",
    "WorkbookPanel",
    "WORKING_FOLDER_VARIABLE",
    "forget_series",
    "remember_series",
    "remembered_series",
    "sample_folder",
    "series_chooser",
    "workbook_panel",
    "working_copy",
    "working_folder",
]

WORKING_FOLDER_VARIABLE = "KITCHEN_WORKING_FOLDER"
"""The environment variable that names the working folder (default ``./working``)."""

CHOICE_FILE = "chosen_series.json"
"""The file in the working folder that remembers the series opened last."""

SAMPLES = {
    "clay_liner": "sample clay liner (falling head, 14 specimens)",
    "drainage_sand": "sample drainage sand (constant head, 4 specimens)",
    "drainage_sand.xlsx": "sample drainage sand as one workbook",
    "flexible_wall_clay": "sample flexible-wall clay (B-value checks, burettes, 3 specimens)",
    "transducer_log": "sample transducer log (pressure every minute, 1 specimen)",
}
"""The samples under ``sample_data/`` the chooser offers: name and words."""

COPIED_TABLES = (*TABLE_NAMES, FIELD_TESTS, "project")
"""The tables a working copy carries, as ``<name>.csv``: the raw tables (the optional
flexible-wall and B-value tables among them), the field tests and the project table. Logs
left beside a sample (``windows.csv``, ``kept_tests.csv``, ``revisions.csv``) and the
generators' answer files are never copied."""

OWN = "own"
"""The chooser's entry for a series of one's own, typed in the path box."""


def working_folder() -> Path:
    """The folder that holds the working copies and the remembered choice.

    ``$KITCHEN_WORKING_FOLDER`` when set, else ``working`` in the current folder (the
    notebooks' folder when a notebook runs; git ignores it).
    """
    named = os.environ.get(WORKING_FOLDER_VARIABLE, "").strip()
    return Path(named).expanduser() if named else Path.cwd() / "working"


def sample_folder() -> Path:
    """``sample_data/``: beside the notebooks' folder, else beside the package's source."""
    for candidate in (Path.cwd().parent / "sample_data", Path(__file__).parents[2] / "sample_data"):
        if (candidate / "clay_liner").is_dir():
            return candidate
    raise FileNotFoundError(
        "sample_data/ not found beside the notebooks' folder nor beside the package; "
        "type the path of a series folder or workbook instead"
    )


def working_copy(sample: str, folder: str | Path | None = None) -> Path:
    """The working copy of a sample, made from its generated raw tables on first use.

    Parameters
    ----------
    sample : str
        A key of :data:`SAMPLES` (``"clay_liner"``, ``"drainage_sand.xlsx"``…).
    folder : str or pathlib.Path, optional
        The working folder; :func:`working_folder` by default.

    Returns
    -------
    pathlib.Path
        The copy. An existing copy is returned with whatever was recorded beside it
        (windows, kept tests, revisions); only a missing one is made, except that a field-
        tests table the sample has and an older copy lacks is added (it is not part of the
        series' tests, and a copy made before the field tests were carried needs it). The
        copy holds :data:`COPIED_TABLES`, never a log left beside the sample.
    """
    if sample not in SAMPLES:
        raise ValueError(f"unknown sample {sample!r}; expected one of {', '.join(SAMPLES)}")
    target = Path(folder) if folder is not None else working_folder()
    copy = target / sample
    if copy.is_dir():
        _add_field_tests(sample, copy)
    if copy.exists():
        return copy
    source = sample_folder() / sample
    target.mkdir(parents=True, exist_ok=True)
    if source.is_file():
        shutil.copy2(source, copy)
        return copy
    partial = target / f".{sample}.partial"
    if partial.exists():
        shutil.rmtree(partial)
    partial.mkdir()
    for name in COPIED_TABLES:
        table = source / f"{name}.csv"
        if table.is_file():
            shutil.copy2(table, partial / table.name)
    partial.rename(copy)  # the copy appears whole or not at all
    return copy


def _add_field_tests(sample: str, copy: Path) -> None:
    """Copy the sample's field tests into an existing copy that has none (never over one)."""
    name = f"{FIELD_TESTS}.csv"
    if (copy / name).exists():
        return
    try:
        source = sample_folder() / sample / name
    except FileNotFoundError:
        return
    if source.is_file():
        partial = copy / f".{name}.partial"
        shutil.copy2(source, partial)
        partial.rename(copy / name)  # whole or not at all


def remembered_series(folder: str | Path | None = None) -> Path | None:
    """The series opened last in any notebook, or None (none yet, or no longer there)."""
    path = (Path(folder) if folder is not None else working_folder()) / CHOICE_FILE
    try:
        chosen = json.loads(path.read_text(encoding="utf-8"))["series"]
    except (OSError, ValueError, KeyError, TypeError):
        return None
    chosen = Path(chosen)
    return chosen if chosen.exists() else None


def remember_series(series: str | Path, folder: str | Path | None = None) -> Path:
    """Remember `series` (made absolute) for the next notebook; returns the choice file."""
    target = Path(folder) if folder is not None else working_folder()
    target.mkdir(parents=True, exist_ok=True)
    text = json.dumps({"series": str(Path(series).resolve())}, indent=1) + "\n"
    return atomic_write_text(target / CHOICE_FILE, text)


def forget_series(folder: str | Path | None = None) -> None:
    """Forget the remembered choice (the notebooks open their own samples again)."""
    path = (Path(folder) if folder is not None else working_folder()) / CHOICE_FILE
    path.unlink(missing_ok=True)


def _sample_of(path: Path, folder: Path) -> str:
    """The sample whose working copy `path` is, or :data:`OWN`."""
    for sample in SAMPLES:
        if path.resolve() == (folder / sample).resolve():
            return sample
    return OWN


@dataclass
class SeriesChooser:
    """The row of controls that chooses the series.

    Attributes
    ----------
    widget : ipywidgets.VBox
    source : ipywidgets.Dropdown
        A sample (its working copy), or one's own series typed in ``path``.
    path : ipywidgets.Text
        The series folder or ``.xlsx`` workbook; a sample's working copy when a sample is
        chosen.
    open : ipywidgets.Button
        Opens the series in ``path`` and remembers it.
    note : ipywidgets.HTML
        Where the series comes from, in words.
    folder : pathlib.Path
        The working folder.
    on_open : list of callables
        Called with the path of each series opened.
    """

    widget: widgets.VBox
    source: widgets.Dropdown
    path: widgets.Text
    open: widgets.Button
    note: widgets.HTML
    folder: Path
    on_open: list = field(default_factory=list)

    @property
    def series_path(self) -> Path:
        """The series in the path box. [path]"""
        text = self.path.value.strip()
        if not text:
            raise ValueError(
                "type the path of a series folder or .xlsx workbook, or choose a sample"
            )
        return Path(text).expanduser()

    def _source_chosen(self, change) -> None:
        if change["new"] != OWN:
            self.path.value = str(working_copy(change["new"], self.folder))
        else:
            self.path.value = ""
        self._describe()

    def _describe(self) -> None:
        sample = self.source.value
        if sample == OWN:
            self.note.value = (
                "<small>Type the path of your series folder (CSV files) or <code>.xlsx</code> "
                "workbook and press <b>Open</b>; the other notebooks then open it too.</small>"
            )
        else:
            self.note.value = (
                f"<small>Your working copy of the {SAMPLES[sample]}: windows kept and "
                "revisions are recorded beside it; the files under <code>sample_data/</code> "
                "are never written. Delete the copy to start the sample over.</small>"
            )

    def choose(self, _button=None) -> Path:
        """Open the series in the path box: remember it and tell ``on_open``."""
        path = self.series_path
        if not path.exists():
            raise FileNotFoundError(
                f"{path}: not found; expected a series folder or .xlsx workbook"
            )
        remember_series(path, self.folder)
        for call in self.on_open:
            call(path)
        return path


def series_chooser(
    default_sample: str = "clay_liner", folder: str | Path | None = None
) -> SeriesChooser:
    """Build the chooser, on the series remembered, else on `default_sample`'s working copy.

    Parameters
    ----------
    default_sample : str, default "clay_liner"
        The sample a notebook opens before any series has been chosen (a key of
        :data:`SAMPLES`).
    folder : str or pathlib.Path, optional
        The working folder; :func:`working_folder` by default.
    """
    folder = Path(folder) if folder is not None else working_folder()
    start = remembered_series(folder) or working_copy(default_sample, folder)
    source = widgets.Dropdown(
        options=[(words, name) for name, words in SAMPLES.items()]
        + [("my own series (type its path)", OWN)],
        value=_sample_of(start, folder),
        description="Series",
        layout=widgets.Layout(width="420px"),
    )
    path = widgets.Text(
        value=str(start),
        placeholder="folder of CSV files, or a .xlsx workbook",
        layout=widgets.Layout(width="50%"),
    )
    button = widgets.Button(description="Open", icon="folder-open", button_style="primary")
    chooser = SeriesChooser(
        widget=widgets.VBox(),
        source=source,
        path=path,
        open=button,
        note=widgets.HTML(),
        folder=folder,
    )
    chooser.widget.children = [widgets.HBox([source, path, button]), chooser.note]
    chooser.widget.add_class("kitchen-series-chooser")
    chooser._describe()
    source.observe(chooser._source_chosen, names="value")
    return chooser


PANELS = {
    "open": "series_panel",
    "falling_head": "falling_head_panel",
    "constant_head": "constant_head_panel",
    "series_chart": "series_chart_panel",
    "revise": "revise_panel",
    "record": "record_panel",
    "field_checks": "field_checks_panel",
}
"""The panels :func:`workbook_panel` builds: key and factory name in :mod:`kitchen.panels`."""


@dataclass
class WorkbookPanel:
    """A notebook's panel under the series chooser, built again on each series opened.

    Attributes
    ----------
    widget : ipywidgets.VBox
        The chooser, its message area and the panel.
    chooser : SeriesChooser
    panel : object or None
        The panel on the series open (None when it could not be built: the message
        area says why).
    error : MessageArea
    series_path : pathlib.Path or None
        The series the panel shows.
    """

    widget: widgets.VBox
    chooser: SeriesChooser
    error: MessageArea
    build: Callable
    holder: widgets.Box
    panel: object = None
    series_path: Path | None = None

    def show(self, path: str | Path) -> None:
        """Build the panel on the series at `path` (the chooser's **Open** calls this)."""
        self.error.guard(f"opening {str(path)!r}")(self._show)(Path(path))

    def _show(self, path: Path) -> None:
        self.panel, self.series_path = None, None
        self.holder.children = []
        self.panel = self.build(path)
        self.series_path = path
        self.holder.children = [self.panel.widget]


def workbook_panel(
    kind: str, default_sample: str | None = None, folder=None, **options
) -> WorkbookPanel:
    """One of the notebooks' panels, with the series chosen above it (no code to edit).

    Parameters
    ----------
    kind : str
        Which panel, a key of :data:`PANELS`: ``"open"``, ``"falling_head"``,
        ``"constant_head"``, ``"series_chart"``, ``"revise"``, ``"record"`` (the test
        record) or ``"field_checks"``.
    default_sample : str, optional
        The sample to open before any series has been chosen; the drainage sand for
        ``"constant_head"``, the flexible-wall clay for ``"record"``, else the clay liner.
    folder : str or pathlib.Path, optional
        The working folder; :func:`working_folder` by default.
    **options
        Passed to the panel's factory. ``specimen`` is a starting specimen, used when the
        series has it. The series chart's memo pack goes to ``memo_packs/<series>`` in the
        working folder, and the field checks' report to ``field_checks/<series>``, unless
        ``export_folder`` says otherwise. The field checks read the series' own field tests
        (its ``field_tests.csv`` or sheet) unless ``field_tests`` names another file.

    Returns
    -------
    WorkbookPanel
    """
    from kitchen import panels

    if kind not in PANELS:
        raise ValueError(f"unknown panel {kind!r}; expected one of {', '.join(PANELS)}")
    factory = getattr(panels, PANELS[kind])
    if default_sample is None:
        default_sample = {"constant_head": "drainage_sand", "record": "flexible_wall_clay"}.get(
            kind, "clay_liner"
        )
    chooser = series_chooser(default_sample, folder)
    settings = options.pop("settings", None)
    specimen = options.pop("specimen", None)

    def build(path: Path):
        if kind == "open":
            return factory(path, settings, choose=False, **options)
        if kind == "revise":  # it opens the series itself, to append to its log
            return factory(path, settings, **options)
        workspace = Workspace(path, settings)
        extra = dict(options)
        exports = {"series_chart": "memo_packs", "field_checks": "field_checks"}
        if kind in exports and "export_folder" not in extra:
            extra["export_folder"] = chooser.folder / exports[kind] / path.stem
        if kind == "field_checks":
            extra["choose"] = False  # the chooser above names the series
        if specimen is not None and specimen in set(workspace.series.specimens["specimen"]):
            extra["specimen"] = specimen
        return factory(workspace, **extra)

    error, holder = MessageArea(), widgets.Box(layout=widgets.Layout(width="100%"))
    holder.layout.flex_flow = "column"
    workbook = WorkbookPanel(
        widget=widgets.VBox([chooser.widget, error.widget, holder]),
        chooser=chooser,
        error=error,
        build=build,
        holder=holder,
    )

    def opened(_button):
        chosen = error.guard("opening the series")(chooser.choose)()
        if chosen is not None:
            workbook.show(chosen)

    chooser.open.on_click(opened)
    workbook.show(chooser.series_path)
    return workbook
