"""The kinetic workbench (Jupyter widgets).

A thin view over kinetic's public API: ``Workbench(model=None, data=None)`` is
an ipywidgets widget with live figures (ipympl). Inside this project import
ipywidgets as ``ipw``: this package is itself named ``widgets``.

>>> from widgets import Workbench     # doctest: +SKIP
>>> Workbench()                       # doctest: +SKIP
"""
from .style import MECHANISM_COLOURS, mechanism_colour
from .state import WorkbenchState
from .workbench import Workbench, default_model

__all__ = ["MECHANISM_COLOURS", "Workbench", "WorkbenchState", "default_model", "mechanism_colour"]
