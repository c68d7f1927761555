"""Static chart images for the memo: PNG and SVG through kaleido's image server and Chromium.

The server is started once per process (:func:`start_image_export`), after checking that a
Chromium is there; without one, :class:`ImageExportUnavailable` names what to install. The
first image is awaited at most :data:`FIRST_IMAGE_TIMEOUT` seconds, so a Chromium that starts
but cannot render is reported instead of waited on for ever.
"""

from __future__ import annotations

import threading
from pathlib import Path

__all__ = [
    "PNG_SCALE",
    "FIRST_IMAGE_TIMEOUT",
    "ImageExportUnavailable",
    "start_image_export",
    "figure_image",
]

PNG_SCALE = 2
"""PNG pixels per layout pixel: a 980-pixel chart prints 16 cm wide at about 300 dpi."""

_CHROMIUM_HELP = (
    "static chart export (PNG, SVG) needs Chromium and found none: install Debian's "
    "chromium package (apt-get install chromium), or set BROWSER_PATH to a Chromium or "
    "Chrome executable"
)


class ImageExportUnavailable(RuntimeError):
    """Static images cannot be made on this machine (no Chromium for kaleido)."""


def _browser_path() -> str | None:
    from choreographer.browsers.chromium import Chromium

    try:
        return Chromium.find_browser(skip_local=False)
    except (RuntimeError, ValueError, OSError):
        return None


_image_server = {"started": False, "answered": False}

FIRST_IMAGE_TIMEOUT = 180.0
"""Seconds to wait for Chromium to render the first image before giving up. [s]"""


def start_image_export() -> None:
    """Start kaleido's image server once per process, after checking for Chromium.

    Raises
    ------
    ImageExportUnavailable
        When no Chromium is found, naming what to install.
    """
    import kaleido

    if _image_server["started"]:
        return
    path = _browser_path()
    if path is None or not Path(path).exists():
        raise ImageExportUnavailable(_CHROMIUM_HELP)
    kaleido.start_sync_server(mathjax=False, silence_warnings=True)
    _image_server["started"] = True


def _render(figure_dict: dict, options: dict) -> bytes:
    """One image from the server; the first waits at most FIRST_IMAGE_TIMEOUT seconds.

    A Chromium that starts but cannot render would otherwise leave the call waiting for
    ever; after the first image has come back, calls are made directly.
    """
    import kaleido

    if _image_server["answered"]:
        return kaleido.calc_fig_sync(figure_dict, opts=options)
    outcome: dict = {}

    def first() -> None:
        try:
            outcome["image"] = kaleido.calc_fig_sync(figure_dict, opts=options)
        except Exception as error:  # handed to the caller below
            outcome["error"] = error

    worker = threading.Thread(target=first, daemon=True)
    worker.start()
    worker.join(FIRST_IMAGE_TIMEOUT)
    if "image" in outcome:
        _image_server["answered"] = True
        return outcome["image"]
    reason = outcome.get("error") or f"no answer within {FIRST_IMAGE_TIMEOUT:g} s"
    raise ImageExportUnavailable(
        f"Chromium was found but did not render a chart ({reason}); check that it starts "
        "headless on this machine (chromium --headless --no-sandbox)"
    )


def figure_image(figure, image_format: str) -> bytes:
    """A figure as PNG or SVG bytes through kaleido's image server (started when needed)."""
    start_image_export()
    layout = figure.layout
    options = dict(
        format=image_format,
        width=layout.width or 980,
        height=layout.height or 620,
        scale=PNG_SCALE if image_format == "png" else 1,
    )
    return _render(figure.to_dict(), options)
