"""Messages to the user: callback errors routed into an ``ipw.Output`` in plain words.

JupyterLab hides exceptions raised inside widget callbacks, so every callback
of the workbench runs under :meth:`MessageBoard.guard`. A mistake by the user
(any :class:`kinetic.KineticError`, or ``ValueError`` from a control) is shown
as its one-line message; anything else is a fault of ours and is shown as
"Unexpected problem ..." in one line, with the traceback kept in
:attr:`MessageBoard.faults` (and the ``widgets`` logger) for reports.
"""
from __future__ import annotations

import functools
import logging
import traceback

import ipywidgets as ipw

from ._engine import KineticError
from .style import css

__all__ = ["MessageBoard", "plain_message"]

log = logging.getLogger("widgets")


def plain_message(exc: BaseException) -> str:
    """One line of plain words for an exception (no traceback)."""
    text = " ".join(str(exc).split()) or type(exc).__name__
    if isinstance(exc, (KineticError, ValueError)):
        return text
    return f"Unexpected problem ({type(exc).__name__}): {text}. Please report it with the steps that led here."


class MessageBoard:
    """An ``ipw.Output`` holding the latest messages, newest last (at most ``keep``).

    Attributes
    ----------
    output : ipw.Output
        The widget to place in the layout (CSS class ``kinetic-messages``).
    messages : list of (str, str)
        ``(level, text)`` pairs shown, level one of "info", "warning", "error".
    faults : list of str
        Tracebacks of unexpected exceptions (not user mistakes).
    """

    def __init__(self, keep: int = 3):
        self.keep = int(keep)
        self.output = ipw.Output(layout=ipw.Layout(min_height="1.6em", max_height="5em",
                                                   overflow="auto"))
        self.output.add_class(css("messages"))
        self.messages: list = []
        self.faults: list = []

    # --- showing ------------------------------------------------------------------
    def _show(self, level: str, text: str) -> None:
        if self.messages and self.messages[-1] == (level, text):
            return  # the same message again: shown once
        self.messages.append((level, text))
        del self.messages[:-self.keep]
        # append_stdout works with and without a kernel (no capture context needed)
        self.output.outputs = ()
        for lv, tx in self.messages:
            p = {"error": "Problem: ", "warning": "Note: ", "info": ""}[lv]
            if lv == "error":
                self.output.append_stderr(p + tx + "\n")
            else:
                self.output.append_stdout(p + tx + "\n")

    def info(self, text: str) -> None:
        self._show("info", text)

    def warn(self, text: str) -> None:
        self._show("warning", text)

    def error(self, exc_or_text) -> None:
        if isinstance(exc_or_text, BaseException):
            exc = exc_or_text
            if not isinstance(exc, (KineticError, ValueError)):
                tb = "".join(traceback.format_exception(type(exc), exc, exc.__traceback__))
                self.faults.append(tb)
                log.error("unexpected error in a workbench callback:\n%s", tb)
            self._show("error", plain_message(exc))
        else:
            self._show("error", str(exc_or_text))

    def clear(self) -> None:
        self.messages.clear()
        self.output.outputs = ()

    @property
    def last(self) -> str:
        """Text of the newest message, or "" when there is none."""
        return self.messages[-1][1] if self.messages else ""

    @property
    def last_error(self) -> str:
        for level, text in reversed(self.messages):
            if level == "error":
                return text
        return ""

    # --- guarding callbacks -------------------------------------------------------
    def guard(self, func):
        """Wrap a callback so that exceptions become messages instead of escaping."""

        @functools.wraps(func)
        def wrapper(*args, **kwargs):
            try:
                return func(*args, **kwargs)
            except Exception as exc:  # noqa: BLE001 - every callback error is shown to the user
                self.error(exc)
                return None

        return wrapper
