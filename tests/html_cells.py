"""Reading an HTML table back with Python's own html.parser (a reference parser), for the
tests of the report pages and the panels' tables."""

from html.parser import HTMLParser


class TableCells(HTMLParser):
    """The header and data cells of a table, each as (tag, class, text), in order."""

    def __init__(self):
        super().__init__()
        self.cells, self._open = [], None

    def handle_starttag(self, tag, attrs):
        if tag in ("th", "td"):
            self._open = [tag, dict(attrs).get("class"), ""]

    def handle_data(self, data):
        if self._open is not None:
            self._open[2] += data

    def handle_endtag(self, tag):
        if tag in ("th", "td") and self._open is not None:
            self.cells.append(tuple(self._open))
            self._open = None
