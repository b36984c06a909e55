"""The kinetic workbench (Jupyter widgets)."""
