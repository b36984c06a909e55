"""Data area: upload a measured table or pick the built-in demo data.

The panel reads an uploaded file with :func:`kinetic.data.parse_data` (the
loader's bytes entry point) and hands the :class:`kinetic.data.Dataset` to the
workbench. A file the loader refuses leaves the previous data in place; the
loader's one-line message (it names the file, line and column) is shown in
the panel together with the text of the line it refers to.
"""
from __future__ import annotations

import re
from collections.abc import Callable

import ipywidgets as ipw

from . import _engine
from ._engine import DataError, KineticError
from .style import css, fmt

__all__ = ["DataPanel", "demo_choices", "describe_dataset"]

_LINE = re.compile(r"\bline (\d+)\b")


def demo_choices() -> dict:
    """Demo data sets offered in the chooser: label -> zero-argument factory.

    Taken from :mod:`kinetic.demo` (invented, synthetic data).
    """
    demo = _engine.demo
    out = {}
    if hasattr(demo, "demo_dataset"):
        out["demo sample (invented data)"] = demo.demo_dataset
    series = getattr(demo, "demo_series", None)
    if series is not None:
        try:
            items = series()
        except Exception:  # noqa: BLE001 - a broken demo must not break the data panel
            items = []
        for i, ds in enumerate(items):
            label = getattr(ds, "label", "") or f"series sample {i + 1}"
            out[f"series: {label}"] = (lambda d=ds: d)
    return out


def describe_dataset(ds) -> str:
    """A short HTML summary of a Dataset: label, points, temperature range, columns."""
    if ds is None:
        return "<i>No measured data: the model is shown on its own.</i>"
    T = ds.temperature
    cols = ["thermal conductivity" + (" (lattice)" if ds.kind == "lattice" else " (total)")]
    if ds.kappa_err is not None:
        cols.append("its uncertainty")
    if ds.resistivity is not None:
        cols.append("resistivity")
    if ds.seebeck is not None:
        cols.append("Seebeck coefficient")
    where = ds.source or "uploaded or built in"
    return (f"<b>{_esc(ds.label) or '(no label)'}</b>: {len(T)} points, "
            f"{fmt(T.min())}\u2013{fmt(T.max())} K; columns: {', '.join(cols)}."
            f"<br><span style='color:#666'>from {_esc(where)}</span>")


def _esc(text) -> str:
    return (str(text).replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;"))


class DataPanel(ipw.VBox):
    """Upload or pick data; calls ``on_data(dataset)`` when new data is accepted.

    Attributes
    ----------
    upload : ipw.FileUpload
    demo_choice : ipw.Dropdown
    use_demo : ipw.Button
    summary : ipw.HTML
        Describes the data in use (CSS ``kinetic-data-summary``).
    error : ipw.HTML
        The loader's message for a refused file, with the offending line
        (CSS ``kinetic-data-error``); empty when the last load succeeded.
    """

    def __init__(self, on_data: Callable, messages, loader_options: dict | None = None):
        self._on_data = on_data
        self._messages = messages
        self.loader_options = dict(loader_options or {})
        self.upload = ipw.FileUpload(accept=".csv,.tsv,.txt,.dat", multiple=False,
                                     description="Upload a table", layout=ipw.Layout(width="auto"))
        self.upload.add_class(css("upload"))
        self._demos = demo_choices()
        self.demo_choice = ipw.Dropdown(options=list(self._demos) or ["(no demo data available)"],
                                        layout=ipw.Layout(width="17em"))
        self.use_demo = ipw.Button(description="Use demo data", disabled=not self._demos,
                                   layout=ipw.Layout(width="auto"))
        self.use_demo.add_class(css("use-demo"))
        self.summary = ipw.HTML()
        self.summary.add_class(css("data-summary"))
        self.error = ipw.HTML()
        self.error.add_class(css("data-error"))
        help_text = ipw.HTML(
            "<span style='color:#666;font-size:90%'>A table with a header row, e.g. "
            "<code>T [K], kappa [W/(m K)], kappa_err [W/(m K)], rho [uOhm cm], S [uV/K]</code>. "
            "Resistivity (and Seebeck) columns allow the electronic part to be split off.</span>")
        self.upload.observe(messages.guard(self._uploaded), names="value")
        self.use_demo.on_click(messages.guard(self._demo_clicked))
        super().__init__([ipw.HBox([self.upload]), ipw.HBox([self.demo_choice, self.use_demo]),
                          self.summary, self.error, help_text])
        self.add_class(css("data-panel"))

    def show(self, ds) -> None:
        self.summary.value = describe_dataset(ds)

    # --- loading --------------------------------------------------------------------
    def load_bytes(self, content: bytes, name: str):
        """Read ``content`` (a file's bytes) as a table and use it.

        Returns the Dataset, or None when the loader refused it (the message is
        shown and the previous data are kept).
        """
        try:
            ds = _engine.parse_data(bytes(content), name=name, **self.loader_options)
        except KineticError as exc:
            self._refused(exc, bytes(content))
            return None
        self.error.value = ""
        self._on_data(ds)
        self._messages.info(f"Loaded {name}: {len(ds.temperature)} points.")
        return ds

    def _refused(self, exc, content: bytes) -> None:
        msg = " ".join(str(exc).split())
        html = f"<b>Could not use this file.</b> {_esc(msg)}"
        m = _LINE.search(msg)
        if m:
            n = int(m.group(1))
            try:
                lines = content.decode("utf-8", errors="replace").splitlines()
            except Exception:  # noqa: BLE001
                lines = []
            if 1 <= n <= len(lines):
                html += f"<br>line {n}: <code>{_esc(lines[n - 1][:160])}</code>"
        html += "<br>The previous data are still in use."
        self.error.value = f"<div style='color:#b00020'>{html}</div>"
        self._messages.error(DataError(msg) if not isinstance(exc, DataError) else exc)

    def _uploaded(self, change):
        files = change["new"]
        if not files:
            return
        f = files[0]
        name = f.get("name", "upload") if isinstance(f, dict) else getattr(f, "name", "upload")
        content = f["content"] if isinstance(f, dict) else f.content
        try:
            self.load_bytes(bytes(content), name)
        finally:
            # clear the upload so the same file can be chosen again after a fix
            self.upload.value = ()

    def _demo_clicked(self, _button=None):
        factory = self._demos.get(self.demo_choice.value)
        if factory is None:
            return
        ds = factory()
        self.error.value = ""
        self._on_data(ds)
        self._messages.info(f"Using demo data: {self.demo_choice.value}.")
