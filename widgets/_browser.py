"""Browser-side help for the keyboard: Tab and Escape leave a figure.

ipympl's canvas is focusable and swallows every key (it sends keys to
matplotlib and cancels the browser's default), so Tab, Shift+Tab and Escape
never leave it. A capturing key listener on the document, installed once per
page, stops Tab and Escape from reaching a workbench's canvas: the browser then
moves the focus as usual (Escape blurs the canvas). Other keys still reach
matplotlib. The script travels as JavaScript output inside an ``ipw.Output``
(JupyterLab renders the outputs of widgets as trusted); without a browser it
does nothing.
"""
from __future__ import annotations

import ipywidgets as ipw

from .style import css

__all__ = ["TAB_SCRIPT", "keyboard_helper"]

TAB_SCRIPT = """
(function () {
  if (window.__kineticTabFix) { return; }
  window.__kineticTabFix = true;
  document.addEventListener('keydown', function (e) {
    if (e.key !== 'Tab' && e.key !== 'Escape') { return; }
    var t = e.target;
    if (!t || !t.classList || !t.classList.contains('jupyter-matplotlib-canvas-div')) { return; }
    if (!t.closest('.kinetic-workbench')) { return; }
    e.stopPropagation();          // the canvas's own handler would cancel the browser's focus move
    if (e.key === 'Escape') { t.blur(); }
  }, true);
})();
"""


def keyboard_helper() -> ipw.Output:
    """An invisible output that installs :data:`TAB_SCRIPT` in the browser."""
    out = ipw.Output(layout=ipw.Layout(height="0px", overflow="hidden", margin="0"))
    out.add_class(css("keyboard-helper"))
    out.outputs = ({"output_type": "display_data", "metadata": {},
                    "data": {"application/javascript": TAB_SCRIPT, "text/plain": ""}},)
    return out
