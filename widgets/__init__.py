"""The kinetic workbench (Jupyter widgets).

A thin view over kinetic's public API: ``Workbench(model=None, data=None)`` is
an ipywidgets widget with live figures (ipympl). Inside this project import
ipywidgets as ``ipw``: this package is itself named ``widgets``.

Rooms (each under ~500 lines):

* ``_engine``: the one door into kinetic (public names only; words, colours,
  default models, calibrations, the conductivity chain all come from the engine);
* ``state``: one source of truth, versioned inputs, stale results;
* ``workbench`` (slim: layout and wiring), ``views`` (readouts and live plots);
* panels: ``data_panel``, ``material_panel``, ``controls`` (sliders, mechanism
  cards), ``electronic_panel``, ``fit_panel``, ``whatif_panel``, ``session_panel``;
* figure plumbing: ``figures`` (ipympl canvases, full frames, export), plots:
  ``plots`` (workbench), ``whatif_plots``; ``style``, ``feedback``, ``_browser``
  (keyboard: Tab leaves a figure).

>>> from widgets import Workbench     # doctest: +SKIP
>>> Workbench()                       # doctest: +SKIP
"""
from .style import MECHANISM_COLOURS, mechanism_colour
from .state import WorkbenchState
from .workbench import Workbench, default_model

__all__ = ["MECHANISM_COLOURS", "Workbench", "WorkbenchState", "default_model", "mechanism_colour"]
