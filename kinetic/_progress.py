"""A one-line text progress bar on a stream (stdlib only: the command line stays light).

>>> import io
>>> out = io.StringIO()
>>> bar = TextBar(stream=out, width=10)
>>> bar.show(3, 10, "fit: ", "  note")
>>> bar.close()
>>> out.getvalue()
'\\rfit: 3/10 [###.......]  note\\x1b[K\\n'
"""
from __future__ import annotations

import sys

__all__ = ["TextBar"]


class TextBar:
    """``<prefix>done/total [####....]<suffix>`` rewritten in place; a newline when closed."""

    def __init__(self, stream=None, width: int = 30):
        self.stream = stream or sys.stderr
        self.width = width
        self.shown = False

    def show(self, done: int, total: int, prefix: str = "", suffix: str = "") -> None:
        k = int(round(self.width * done / max(total, 1)))
        self.stream.write(f"\r{prefix}{done}/{total} [{'#' * k}{'.' * (self.width - k)}]{suffix}\033[K")
        self.stream.flush()
        self.shown = True

    def close(self) -> None:
        if self.shown:
            self.stream.write("\n")
            self.stream.flush()
            self.shown = False
