"""What the memo pack and the field-check report share when they write: a figure as an HTML
fragment, the writer that names each file as it goes, and the chart pages and images."""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

__all__ = ["PackWriter", "PlainFigures", "figure_html", "request_images", "write_chart_files"]


class PlainFigures:
    """The figures of one export as plain dicts and HTML fragments, each made once.

    ``figure.to_dict()`` copies the whole figure, and plotly makes that copy again for each
    HTML fragment; an export needs a chart's dict for its page, for the report page and for
    its images. Made once and shared, the clay pack's 50 copies fall to 32 and its 50
    fragments to 32. A dict handed out here is shared, so it is only ever read: the
    images' caption is added to a copy (:func:`kitchen.charts.captioned_dict`).
    """

    def __init__(self) -> None:
        self._dicts: dict[int, tuple] = {}  # id(figure): (figure, its dict)
        self._html: dict[tuple[int, str], str] = {}

    def dict_of(self, figure) -> dict:
        """The figure as a plain dict (``figure.to_dict()``), made at the first call."""
        held = self._dicts.get(id(figure))
        if held is None:  # the figure is held beside its dict, so its id stays its own
            held = self._dicts[id(figure)] = (figure, figure.to_dict())
        return held[1]

    def html(self, figure, name: str) -> str:
        """:func:`figure_html` of the figure, made at the first call for its `name`."""
        key = (id(figure), name)
        if key not in self._html:
            self._html[key] = _fragment(self.dict_of(figure), name)
        return self._html[key]


def _fragment(figure_dict: dict, name: str) -> str:
    import plotly.io as pio

    return pio.to_html(
        figure_dict,
        full_html=False,
        include_plotlyjs=False,
        div_id=f"chart-{name}",
        config={"displaylogo": False, "responsive": False},
        validate=False,  # the dict of a checked figure, as figure.to_html passes it on
    )


def figure_html(figure, name: str, plain: PlainFigures | None = None) -> str:
    """The figure as an HTML fragment without plotly.js (the page's head loads it): the
    fragment ``figure.to_html`` makes, from its dict in `plain` when one is given."""
    return (plain or PlainFigures()).html(figure, name)


class PackWriter:
    """Writes the files of a pack through its :class:`~kitchen.memo.manifest.StagedPack`,
    calling ``progress(done, total, what)`` before each; :attr:`written` lists the files'
    final paths in order."""

    def __init__(self, staged, steps: list[str], progress: Callable | None = None):
        self.staged, self.steps, self.progress = staged, steps, progress
        self.written: list[Path] = []

    def __call__(self, relative: str, kind: str, data: Callable[[], bytes]) -> Path:
        if self.progress is not None:
            self.progress(len(self.written) + 1, len(self.steps), f"{kind} {relative}")
        path = self.staged.write(relative, data())
        self.written.append(path)
        return path


def request_images(figures, caption, plain: PlainFigures | None = None) -> dict:
    """Ask Chromium for the PNG and SVG of each figure, with `caption` printed under it,
    and return at once: {(name, "png" or "svg"): future of its bytes}.

    `figures` holds (name, figure); both images of a figure come from one drawing
    (:func:`kitchen.memo.images.request_png_svg`). An export asks for every image before it
    writes its first file, so Chromium draws them while the tables and pages are written.
    The figures' dicts are taken from `plain` when it is given.
    """
    from kitchen.charts import captioned_dict

    from .images import request_png_svg

    requested = {}
    for name, figure in figures:
        requested[name, "png"], requested[name, "svg"] = request_png_svg(
            captioned_dict(figure, caption, plain=None if plain is None else plain.dict_of(figure))
        )
    return requested


def write_chart_files(
    write,
    charts,
    cautions,
    provenance,
    script,
    caption,
    images: bool,
    requested=None,
    plain: PlainFigures | None = None,
) -> list[tuple[str, bytes]]:
    """Write each chart's page (``charts/NAME.html``) and, with `images`, its PNG and SVG
    with `caption` printed under it; return (title, PNG bytes) of each, for a document.

    `write` is called as ``write(relative, kind, data)``; `charts` holds (name, title,
    figure). `requested` holds the images already asked of Chromium
    (:func:`request_images`); without it every image is asked for first, and drawn while
    the pages are written. The figures' dicts and fragments are taken from `plain` when it
    is given.
    """
    import posixpath

    from .images import image_result
    from .pages import chart_page

    plain = plain or PlainFigures()
    if images and requested is None:
        requested = request_images([(name, figure) for name, _, figure in charts], caption, plain)
    pngs: list[tuple[str, bytes]] = []

    def image(request, title: str, ext: str) -> bytes:
        data = image_result(request)
        if ext == "png":  # the document carries the same image
            pngs.append((title, data))
        return data

    for name, title, figure in charts:
        page = f"charts/{name}.html"
        write(
            page,
            "chart",
            lambda f=figure, n=name, t=title, p=page: chart_page(
                t, plain.html(f, n), cautions, provenance, script, posixpath.dirname(p)
            ).encode("utf-8"),
        )
        for ext in ("png", "svg") if images else ():
            write(
                f"charts/{name}.{ext}",
                "chart",
                lambda r=requested[name, ext], t=title, e=ext: image(r, t, e),
            )
    return pngs
