"""The version of kinetic: the single source.

``pyproject.toml`` reads it (``[tool.setuptools.dynamic]``), the package root
re-exports it, and saved records store it. Import it from here
(``from kinetic._version import __version__``), not from the package root, so
that nothing needs the whole engine loaded to learn the version.

>>> from kinetic._version import __version__
>>> __version__.count(".") >= 2
True
"""

__version__ = "0.1.0"
