"""What the memo pack and the field-check report share when they write: a figure as an HTML
fragment, and the writer that names each file as it goes and keeps the list of files."""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

from kitchen.io import atomic_write_bytes

__all__ = ["PackWriter", "figure_html", "write_chart_files"]


def figure_html(figure, name: str) -> str:
    """The figure as an HTML fragment without plotly.js (the page's head loads it)."""
    return figure.to_html(
        full_html=False,
        include_plotlyjs=False,
        div_id=f"chart-{name}",
        config={"displaylogo": False, "responsive": False},
    )


class PackWriter:
    """Writes the files of a pack into `folder`, each whole or absent
    (:func:`kitchen.io.atomic_write_bytes`), calling ``progress(done, total, what)`` before
    each; :attr:`written` lists the files in order, for the manifest."""

    def __init__(self, folder: Path, steps: list[str], progress: Callable | None = None):
        self.folder, self.steps, self.progress = Path(folder), steps, progress
        self.written: list[Path] = []

    def __call__(self, relative: str, kind: str, data: Callable[[], bytes]) -> Path:
        if self.progress is not None:
            self.progress(len(self.written) + 1, len(self.steps), f"{kind} {relative}")
        path = atomic_write_bytes(self.folder / relative, data())
        self.written.append(path)
        return path


def write_chart_files(
    write, folder, charts, cautions, provenance, script, caption, images: bool
) -> list[tuple[str, bytes]]:
    """Write each chart's page (``charts/NAME.html``) and, with `images`, its PNG and SVG
    with `caption` printed under it; return (title, PNG bytes) of each, for a document.

    `write` is called as ``write(relative, kind, data)`` (a :class:`PackWriter`, or the
    pack's own writer); `charts` holds (name, title, figure).
    """
    import posixpath

    from kitchen.charts import add_caption

    from .images import figure_image
    from .pages import chart_page

    pngs = []
    for name, title, figure in charts:
        page = f"charts/{name}.html"
        write(
            page,
            "chart",
            lambda f=figure, n=name, t=title, p=page: chart_page(
                t, figure_html(f, n), cautions, provenance, script, posixpath.dirname(p)
            ).encode("utf-8"),
        )
        if images:
            captioned = add_caption(figure, caption)
            for ext in ("png", "svg"):
                relative = f"charts/{name}.{ext}"
                write(relative, "chart", lambda c=captioned, e=ext: figure_image(c, e))
                if ext == "png":  # the document carries the same image
                    pngs.append((title, (Path(folder) / relative).read_bytes()))
    return pngs
