"""Static chart images for the memo: PNG and SVG through kaleido's renderer and Chromium.

One image server runs per process (:func:`start_image_export`): after checking that a
Chromium is there (without one, :class:`ImageExportUnavailable` names what to install), it
opens the browser on a thread of its own and returns at once, so Chromium starts while the
series is read and reduced. Every image is then drawn in the same page, one after the
other, without reloading it (:class:`_SamePageRenderer`): plotly.js draws each figure in a
detached element of its own and removes it once the image is made, so nothing is left in
the page from one image to the next, and a reload would only cost its time (about a quarter
of a second an image). :func:`request_image` hands a figure to the server and returns at
once, so the next figure can be prepared while Chromium draws; :func:`figure_image` waits
for its image. The first image is awaited at most :data:`FIRST_IMAGE_TIMEOUT` seconds, so a
Chromium that starts but cannot render is reported instead of waited on for ever.
"""

from __future__ import annotations

import asyncio
import atexit
import threading
from concurrent.futures import Future
from concurrent.futures import TimeoutError as FutureTimeout
from pathlib import Path

__all__ = [
    "PNG_SCALE",
    "FIRST_IMAGE_TIMEOUT",
    "ImageExportUnavailable",
    "start_image_export",
    "request_image",
    "image_result",
    "figure_image",
]

PNG_SCALE = 2
"""PNG pixels per layout pixel: a 980-pixel chart prints 16 cm wide at about 300 dpi."""

_CHROMIUM_HELP = (
    "static chart export (PNG, SVG) needs Chromium and found none: install Debian's "
    "chromium package (apt-get install chromium), or set BROWSER_PATH to a Chromium or "
    "Chrome executable"
)

PAGES = 2
"""Pages drawing images at once: two, so that a two-core machine draws one image while it
encodes the other."""

FIRST_IMAGE_TIMEOUT = 180.0
"""Seconds to wait for Chromium to render the first image before giving up. [s]"""


class ImageExportUnavailable(RuntimeError):
    """Static images cannot be made on this machine (no Chromium for kaleido)."""


def _browser_path() -> str | None:
    from choreographer.browsers.chromium import Chromium

    try:
        return Chromium.find_browser(skip_local=False)
    except (RuntimeError, ValueError, OSError):
        return None


def _renderer_class():
    """kaleido's renderer, made to keep its page between images (imported when needed)."""
    import kaleido

    class _SamePageRenderer(kaleido.Kaleido):
        """A kaleido renderer that hands its page back without reloading it.

        kaleido reloads the page after every image to start the next from a clean page;
        plotly.js's ``toImage``, which draws each figure, already leaves none of it behind
        (the figure is drawn in a detached element and purged), so the page is handed back
        as it is. ``tests/memo/test_images.py`` checks that no page is reloaded and that
        the images are those of a freshly loaded page.
        """

        async def _return_kaleido_tab(self, tab) -> None:
            await self.tabs_ready.put(tab)

    return _SamePageRenderer


class _ImageServer:
    """The browser and the event loop that drives it, on a thread of their own."""

    def __init__(self) -> None:
        self.loop = asyncio.new_event_loop()
        self.thread = threading.Thread(
            target=self.loop.run_forever, name="kitchen-images", daemon=True
        )
        self.thread.start()
        self.renderer = None
        self.answered = False
        self.opened: Future = asyncio.run_coroutine_threadsafe(self._open(), self.loop)

    async def _open(self) -> None:
        renderer = _renderer_class()(mathjax=False, n=PAGES)
        await renderer.open()
        # kaleido takes a page's script context from the first one reported after it
        # navigates, which can be the blank page's it replaces (then no image is drawn);
        # one reload of each page, once, takes the context of the page itself.
        pages = [await renderer.tabs_ready.get() for _ in range(PAGES)]
        await asyncio.gather(*(page.reload() for page in pages))
        for page in pages:
            await renderer.tabs_ready.put(page)
        self.renderer = renderer

    async def _image(self, figure_dict: dict, options: dict) -> bytes:
        await asyncio.wrap_future(self.opened)
        return await self.renderer.calc_fig(figure_dict, opts=options)

    def request(self, figure_dict: dict, options: dict) -> Future:
        return asyncio.run_coroutine_threadsafe(self._image(figure_dict, options), self.loop)

    def close(self) -> None:
        """Close the browser and stop the loop; once (a later call does nothing)."""
        if not self.thread.is_alive():
            return

        async def shut() -> None:
            if self.renderer is not None:
                await self.renderer.close()

        try:
            asyncio.run_coroutine_threadsafe(shut(), self.loop).result(10)
        except Exception:  # the process is ending: a browser that will not close is left
            pass
        self.loop.call_soon_threadsafe(self.loop.stop)
        self.thread.join(10)


_image_server: dict = {"started": False, "server": None}


def start_image_export() -> None:
    """Start the image server once per process, after checking for Chromium.

    Returns at once: the browser opens on the server's thread, and the first image waits
    for it.

    Raises
    ------
    ImageExportUnavailable
        When no Chromium is found, naming what to install.
    """
    if _image_server["started"]:
        return
    path = _browser_path()
    if path is None or not Path(path).exists():
        raise ImageExportUnavailable(_CHROMIUM_HELP)
    server = _ImageServer()
    atexit.register(server.close)
    _image_server.update(started=True, server=server)


def _options(figure, image_format: str) -> dict:
    layout = figure.layout
    return dict(
        format=image_format,
        width=layout.width or 980,
        height=layout.height or 620,
        scale=PNG_SCALE if image_format == "png" else 1,
    )


def request_image(figure, image_format: str) -> Future:
    """Hand a figure to the image server and return at once.

    Returns a future of the PNG or SVG bytes; :func:`image_result` waits for it. The
    figure is copied to a plain dict here, so it may change afterwards.
    """
    start_image_export()
    return _image_server["server"].request(figure.to_dict(), _options(figure, image_format))


def image_result(request: Future) -> bytes:
    """The bytes of a requested image; the first waits at most FIRST_IMAGE_TIMEOUT seconds.

    A Chromium that starts but cannot render would otherwise leave the call waiting for
    ever; after the first image has come back, results are awaited without a bound (each
    image has kaleido's own bound of 90 s).
    """
    server = _image_server["server"]
    if server.answered:
        return request.result()
    try:
        image = request.result(FIRST_IMAGE_TIMEOUT)
    except FutureTimeout:
        reason = f"no answer within {FIRST_IMAGE_TIMEOUT:g} s"
    except Exception as error:  # named to the caller below
        reason = error
    else:
        server.answered = True
        return image
    raise ImageExportUnavailable(
        f"Chromium was found but did not render a chart ({reason}); check that it starts "
        "headless on this machine (chromium --headless --no-sandbox)"
    )


def figure_image(figure, image_format: str) -> bytes:
    """A figure as PNG or SVG bytes through the image server (started when needed)."""
    return image_result(request_image(figure, image_format))
